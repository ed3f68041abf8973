using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>Simulated instrument faults end <c>run</c> with the exit code of their kind, whatever the analysis of the few points measured says.</summary>
public sealed class FaultExitCodeTests
{
    private static string BenchWithFault(string fault) =>
        Some.TempFile(File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml")).TrimEnd() + $"\n  faults:\n    - {fault}\n");

    private static async Task<(int Exit, string Events)> RunAsync(string fault)
    {
        var dir = Some.TempDirectory();
        var exit = await Cli.RunAsync("run", Repo.File("sequences/ci-smoke.yaml"), "--bench", BenchWithFault(fault), "--out", dir, "--no-archive");
        return (exit, File.ReadAllText(Path.Combine(dir, "events.jsonl")));
    }

    [Fact]
    public async Task SupplyReset_MidSweep_IsASafetyAbort_NamingTheSupply_NotTheFuse()
    {
        // Regression: the supply, reset to 0 V, was taken for an opened fuse because the drop was compared with the supply's measured voltage.
        var (exit, events) = await RunAsync("{ kind: reset, instrument: supply, at: 2 s }");
        Assert.Equal(4, exit);
        var end = events.Split('\n').Single(l => l.Contains("\"run-end\"", StringComparison.Ordinal));
        Assert.Contains("supply", end, StringComparison.Ordinal);
        Assert.Contains("reset", end, StringComparison.Ordinal);
        Assert.DoesNotContain("fuse has probably opened", end, StringComparison.Ordinal);
    }

    [Fact]
    public async Task SupplyGarbledReply_IsAnInstrumentFailure()
    {
        // Two seconds in, the supply's next answer is a voltage readback (MEAS:VOLT?); one flipped byte makes it no number at all.
        var (exit, events) = await RunAsync("{ kind: garbledByte, instrument: supply, at: 2 s }");
        Assert.Equal(5, exit);
        Assert.Contains("SIM::supply", events.Split('\n').Single(l => l.Contains("\"run-end\"", StringComparison.Ordinal)), StringComparison.Ordinal);
    }
}

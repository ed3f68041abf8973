using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>What happens after the outputs are off never hides how the run ended, and never loses what was measured.</summary>
public sealed class HonestEndingTests
{
    private static readonly string Smoke = Repo.File("sequences/ci-smoke.yaml");
    private static readonly string Bench = Repo.File("simulators/handheld-tarnwell-tw18.yaml");

    [Fact]
    public async Task ArchiveThatIsNotADatabase_AfterACompletedRun_Exits6_WithTheDataSafe()
    {
        var dir = Some.TempDirectory();
        var notADatabase = Some.TempFile("this is a text file, not an SQLite database\n");
        Assert.Equal(6, await Cli.RunAsync("run", Smoke, "--bench", Bench, "--out", dir, "--archive", notADatabase));
        Assert.True(File.Exists(Path.Combine(dir, "journal.csv")));
        Assert.True(File.Exists(Path.Combine(dir, "result.json")));
        Assert.True(File.Exists(Path.Combine(dir, "report.html")));
    }

    [Fact]
    public async Task UnreachableSharedArchive_AfterACompletedRun_Exits6()
    {
        var dir = Some.TempDirectory();
        // Port 1 on loopback: nothing listens there, so the connection is refused at once.
        Assert.Equal(6, await Cli.RunAsync("run", Smoke, "--bench", Bench, "--out", dir, "--archive", "Host=127.0.0.1;Port=1;Username=nobody;Database=none;Timeout=2"));
        Assert.True(File.Exists(Path.Combine(dir, "result.json")));
    }

    [Fact]
    public async Task SafetyStop_WithABrokenArchive_StillExits4()
    {
        var dir = Some.TempDirectory();
        var notADatabase = Some.TempFile("not a database\n");
        Assert.Equal(4, await Cli.RunAsync("run", Repo.File("sequences/fault-demo-weak-fuse.yaml"), "--bench", Repo.File("simulators/handheld-tarnwell-tw18-weak-fuse.yaml"), "--out", dir, "--archive", notADatabase));
        Assert.True(File.Exists(Path.Combine(dir, "journal.csv")));
    }

    [Fact]
    public async Task SafetyStop_BeforeARangeHasThreePoints_StillExits4_AndReportsWhatWasMeasured()
    {
        var dir = Some.TempDirectory();
        var bench = File.ReadAllText(Bench).TrimEnd() + "\n  faults:\n    - { kind: fuseOpen, jack: 10A, at: 4.5 s }\n";
        var benchFile = Some.TempFile(bench);
        Assert.Equal(4, await Cli.RunAsync("run", Smoke, "--bench", benchFile, "--out", dir));
        var report = await File.ReadAllTextAsync(Path.Combine(dir, "report.html"), TestContext.Current.CancellationToken);
        Assert.Contains("Incomplete run (stopped for safety)", report, StringComparison.Ordinal);
        Assert.Contains("Analysis incomplete", report, StringComparison.Ordinal);
        Assert.Contains("range 10A", report, StringComparison.Ordinal);
        var result = Analysis.ResultJson.Read(Path.Combine(dir, "result.json"));
        Assert.Equal(["60mA"], result.Ranges.Select(r => r.Name));
    }
}

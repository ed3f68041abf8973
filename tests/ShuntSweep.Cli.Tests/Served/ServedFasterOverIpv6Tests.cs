using ShuntSweep.Core.Records;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests.Served;

/// <summary><c>sim serve --host ::1 --speed 50</c> in its own process, run through a bench file of <c>TCPIP::[::1]::…::SOCKET</c> resources.</summary>
public sealed class ServedFasterOverIpv6Tests
{
    [Fact]
    public async Task FiftyTimesFaster_OnIpv6Loopback_RunsToCompletion_WithEveryDropANumber()
    {
        var ct = TestContext.Current.CancellationToken;
        await using var bench = await ServedBench.StartAsync(File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml")), speed: 50, host: "::1");
        Assert.Contains("TCPIP::[::1]::", await File.ReadAllTextAsync(bench.BenchFile, ct), StringComparison.Ordinal);
        var sequence = Path.Combine(bench.Directory, "sequence.yaml");
        var answers = Path.Combine(bench.Directory, "answers.yaml");
        var run = Path.Combine(bench.Directory, "run");
        await File.WriteAllTextAsync(sequence, """
            sequence: Served at 50x over IPv6
            defaults: { dwell: 20 ms, samples: 2 }
            limits: { maxDrop: 1.5 V }
            steps:
              - sweep: { range: 60mA, currents: { linear: { from: 10 %, to: 100 %, points: 8 } } }
            """, ct);
        await File.WriteAllTextAsync(answers, "otherwise: done\n", ct);

        using var tool = ToolProcess.Start("run", sequence, "--bench", bench.BenchFile, "--out", run, "--answers", answers, "--yes", "--no-archive");
        Assert.True(await tool.WaitAsync(TimeSpan.FromSeconds(90)) == 0, tool.Output);

        // Regression: at --speed 50 the drop voltmeter answered +9.91E37 (not a number) within a few points.
        var samples = JournalCsv.Read(Path.Combine(run, "journal.csv")).Samples;
        Assert.Equal(16, samples.Count);
        Assert.All(samples, s => Assert.True(double.IsFinite(s.Burden.Volts) && s.Burden.Volts > 0, $"step {s.Step}: drop {s.Burden}"));
    }
}

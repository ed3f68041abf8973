using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

public sealed class DemoRunTests
{
    private static readonly string Demo = Repo.File("sequences/demo-handheld.yaml");
    private static readonly string Bench = Repo.File("simulators/handheld-tarnwell-tw18.yaml");

    [Fact]
    public async Task Demo_RecoversEachRangesSeriesResistance_WithinExpandedUncertainty()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Demo, "--bench", Bench, "--out", dir, "--seed", "7"));

        // 4 ranges × 20 points × 5 samples, and thermal holds at 10 Hz of 40 s on the 400mA range and 60 s on the 10A range.
        var samples = JournalCsv.Read(Path.Combine(dir, "journal.csv")).Samples;
        Assert.Equal((4 * 20 * 5) + 400 + 600, samples.Count);

        var result = ResultJson.Read(Path.Combine(dir, "result.json"));
        await using var truth = SimulatedBench.Create(BenchReader.Load(Bench), new VirtualBenchClock(new VirtualTimeProvider()), 7);
        Assert.Equal(["6mA", "60mA", "400mA", "10A"], result.Ranges.Select(r => r.Name));
        var misses = new List<string>();
        foreach (var range in result.Ranges)
        {
            var expected = truth.ExpectedSeriesResistance(range.Name).Ohms;
            // The fit's own k = 2 interval: the settling rule extrapolates each point's thermal drift, so the points are in steady state.
            var expanded = 2 * range.ResistanceOhms.StandardUncertainty;
            if (Math.Abs(range.ResistanceOhms.Value - expected) > expanded)
            {
                misses.Add($"{range.Name} ({range.Model}): fitted {range.ResistanceOhms.Value:G8} Ω ± {expanded:G3}, configured {expected:G8} Ω");
            }
        }

        Assert.True(misses.Count == 0, string.Join("; ", misses));
    }

    [Fact]
    public async Task Demo_SameSeed_GivesByteIdenticalJournals()
    {
        var a = Some.TempDirectory();
        var b = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Demo, "--bench", Bench, "--out", a, "--seed", "3"));
        Assert.Equal(0, await Cli.RunAsync("run", Demo, "--bench", Bench, "--out", b, "--seed", "3"));
        Assert.Equal(File.ReadAllBytes(Path.Combine(a, "journal.csv")), File.ReadAllBytes(Path.Combine(b, "journal.csv")));
    }

    [Fact]
    public async Task Demo_InsertionError_IsLargestOnTheMostSensitiveRange()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Demo, "--bench", Bench, "--out", dir));
        var result = ResultJson.Read(Path.Combine(dir, "result.json"));

        // Common practice, no source: 1 V across 100 Ω gives 10 mA; a meter's series resistance lowers it, the more so
        // on a lower-current (higher-sensitivity) range, and least on the highest-current range.
        var report = InsertionError.Predict(result, 1.0, 100.0);
        Assert.Equal(0.010, report.UndisturbedCurrentA, 12);
        var errors = report.Ranges.ToDictionary(r => r.Range, r => Math.Abs(r.RelativeError));
        Assert.True(errors["6mA"] > errors["60mA"], $"6mA {errors["6mA"]:P3} vs 60mA {errors["60mA"]:P3}");
        Assert.True(errors["60mA"] > errors["400mA"], $"60mA {errors["60mA"]:P3} vs 400mA {errors["400mA"]:P3}");
        Assert.True(errors["400mA"] > errors["10A"], $"400mA {errors["400mA"]:P3} vs 10A {errors["10A"]:P3}");
    }

    [Fact]
    public async Task Fit_FromTheJournalAlone_MatchesTheRunsResult()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Demo, "--bench", Bench, "--out", dir));
        var refit = Path.Combine(dir, "refit.json");
        Assert.Equal(0, await Cli.RunAsync("fit", Path.Combine(dir, "journal.csv"), "--uut", Bench, "--out", refit));
        var a = ResultJson.Read(Path.Combine(dir, "result.json"));
        var b = ResultJson.Read(refit);
        Assert.Equal(a.Ranges.Select(r => (r.Name, r.Model, r.ResistanceOhms)), b.Ranges.Select(r => (r.Name, r.Model, r.ResistanceOhms)));
    }

    [Fact]
    public async Task Run_OnABenchWhoseSupplyDoesNotAnswer_ExitsWithInstrumentFailure()
    {
        // Port 9 (discard) on loopback has no listener here: the connection is refused before anything is switched on.
        var bench = Some.TempFile(File.ReadAllText(Bench).Replace("\"SIM::supply\"", "\"TCPIP::127.0.0.1::9::SOCKET\"", StringComparison.Ordinal));
        Assert.Equal(5, await Cli.RunAsync("run", Repo.File("sequences/ci-smoke.yaml"), "--bench", bench, "--out", Some.TempDirectory(), "--answers", Some.TempFile("otherwise: done\n")));
    }

    [Fact]
    public async Task Fit_ReportsAMalformedRow_WithExitCodeTwo()
    {
        var journal = Some.TempFile("range,setpoint_A,reference_A,burden_V\n1A,0.1,0.1,0.01\n1A,0.2,zero,0.02\n", ".csv");
        Assert.Equal(2, await Cli.RunAsync("fit", journal));
    }
}

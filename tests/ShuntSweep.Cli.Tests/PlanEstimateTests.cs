using System.Globalization;
using System.Text.Json;
using System.Text.RegularExpressions;
using ShuntSweep.Cli.Tests.Served;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>The duration <c>plan</c> predicts is the bench time a run then takes: within ±15 % for every shipped sequence on the simulated
/// bench, with the settling waits learned from an earlier run of the sequence.</summary>
public sealed partial class PlanEstimateTests
{
    private const double Within = 0.15;

    /// <summary>Every shipped sequence that runs to its end (a fault demo stops early, so its bench time is not the plan's).</summary>
    public static TheoryData<string> Sequences() =>
        new(SampleFileTests.Sequences().Select(row => row.Data).Where(f => !File.ReadAllText(Repo.File(f)).Contains("# expect-exit:", StringComparison.Ordinal)));

    [Theory]
    [MemberData(nameof(Sequences))]
    public async Task Estimate_WithTheSettlingOfAnEarlierRun_IsWithin15PercentOfTheNextRunsBenchTime(string file)
    {
        var sequence = Repo.File(file);
        var earlier = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", sequence, "--out", earlier, "--no-archive", "--seed", "1"));
        var estimate = await EstimateAsync(sequence, "--timing-from", earlier);

        // Another seed: other noise, so other settling waits than the run the estimate learned from.
        var next = Some.TempDirectory();
        Assert.True(await Cli.RunAsync("run", sequence, "--out", next, "--no-archive", "--seed", "2") == 0, $"the run ended early: {RunEnd(next)}");
        AssertWithin(estimate, BenchTime(next), file);
    }

    internal static async Task<double> EstimateAsync(string sequence, params string[] more)
    {
        var (exit, output, error) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), ["plan", sequence, .. more]);
        Assert.True(exit == 0, error);
        var said = Estimate().Match(output);
        Assert.True(said.Success, output);
        return QuantityParser.Parse(said.Groups[1].Value, SiUnit.Second);
    }

    /// <summary>The run's bench time from its first step to its end (connecting to the instruments is not part of the plan).</summary>
    internal static double BenchTime(string runDirectory)
    {
        var events = File.ReadLines(Path.Combine(runDirectory, "events.jsonl")).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        double At(string name) => events.Last(e => e.GetProperty("event").GetString() == name).GetProperty("elapsedS").GetDouble();
        return At("run-end") - At("run-start");
    }

    /// <summary>How the run in <paramref name="runDirectory"/> ended, in its own words, for a failure message.</summary>
    private static string RunEnd(string runDirectory) =>
        File.ReadLines(Path.Combine(runDirectory, "events.jsonl")).LastOrDefault(l => l.Contains("\"run-end\"", StringComparison.Ordinal)) ?? "no run-end event";

    internal static void AssertWithin(double estimate, double measured, string file)
    {
        TestContext.Current.TestOutputHelper?.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{file}: estimated {estimate:0.###} s, measured {measured:0.###} s ({(estimate / measured) - 1:+0.0%;-0.0%})"));
        Assert.True(Math.Abs(estimate - measured) <= Within * measured, string.Create(CultureInfo.InvariantCulture, $"{file}: estimated {estimate} s, the run took {measured} s"));
    }

    [GeneratedRegex(@"about (\S+ s) on the bench")]
    private static partial Regex Estimate();

}

/// <summary>Runs alone: a real-time run's bench time is what the machine gives it, and other tests running beside it would lengthen it.</summary>
[CollectionDefinition(nameof(RunsAlone), DisableParallelization = true)]
public sealed class RunsAlone;

/// <summary>The duration <c>plan</c> predicts on the simulated bench served over TCP is, within ±15 %, the bench time of a real-time run there.</summary>
[Collection(nameof(RunsAlone))]
public sealed partial class ServedPlanEstimateTests
{
    /// <summary>Sequences short enough to run in real time on the served bench (a few seconds each).</summary>
    public static TheoryData<string> ShortSequences() =>
        ["sequences/ci-smoke.yaml", "sequences/dialect-dmm-quillon.yaml", "sequences/dialect-load-hollin.yaml", "sequences/dialect-mixed-bm5.yaml", "sequences/dialect-supply-corvane.yaml"];

    [Theory]
    [MemberData(nameof(ShortSequences))]
    public async Task Estimate_OnTheServedBench_IsWithin15PercentOfItsRealTimeRun(string file)
    {
        var sequence = Repo.File(file);
        var simulator = BenchKey().Match(File.ReadAllText(sequence)).Groups[1].Value;
        var dir = Some.TempDirectory();
        var benchFile = Path.Combine(dir, "served.yaml");
        using var serve = ToolProcess.Start("sim", "serve", Path.GetFullPath(Path.Combine(Path.GetDirectoryName(sequence)!, simulator)), "--port", "0", "--write-bench", benchFile);
        await serve.WaitUntilAsync(() => serve.Output.Contains("Ctrl-C", StringComparison.Ordinal), "sim serve listening", TimeSpan.FromSeconds(60));

        var estimate = await PlanEstimateTests.EstimateAsync(sequence, "--bench", benchFile);
        var answers = Some.TempFile("otherwise: done\n");
        var run = Path.Combine(dir, "run");
        using (var tool = ToolProcess.Start("run", sequence, "--bench", benchFile, "--out", run, "--answers", answers, "--yes", "--no-archive"))
        {
            Assert.Equal(0, await tool.WaitAsync(TimeSpan.FromSeconds(120)));
        }

        PlanEstimateTests.AssertWithin(estimate, PlanEstimateTests.BenchTime(run), file);
        serve.Signal("INT");
        await serve.WaitAsync(TimeSpan.FromSeconds(30));
    }

    [GeneratedRegex(@"(?m)^bench: (\S+)")]
    private static partial Regex BenchKey();
}

using System.Text.Json;
using System.Text.Json.Serialization;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Engine.Running;
using ShuntSweep.Reporting;
using ShuntSweep.Reporting.Comparison;

namespace ShuntSweep.Cli.Commands;

/// <summary>The machine-readable summary of a run (<c>run --json</c>), described by <c>docs/schemas/run-summary.schema.json</c>.</summary>
/// <param name="Sequence">The sequence's title.</param>
/// <param name="Bench">The bench's name.</param>
/// <param name="Uut">The unit under test.</param>
/// <param name="Simulated">Whether the bench was simulated.</param>
/// <param name="Seed">The simulated bench's seed.</param>
/// <param name="End">How the run ended: <c>completed</c>, <c>safety-stop</c>, <c>instrument-failure</c> or <c>interrupted</c>.</param>
/// <param name="Message">What ended it, in words.</param>
/// <param name="ExitCode">The process exit code.</param>
/// <param name="Steps">The plan's steps.</param>
/// <param name="StepsDone">The plan steps completed.</param>
/// <param name="OutputsConfirmedOff">Whether the load input and supply output were confirmed off at the end.</param>
/// <param name="RunDirectory">The run directory (null under <c>--reproducible</c>).</param>
/// <param name="Archive">Where the run was archived (null with <c>--no-archive</c> or under <c>--reproducible</c>).</param>
/// <param name="Ranges">One entry per characterised range.</param>
/// <param name="Verdict">The verdict on the UUT: <c>pass</c>, <c>fail</c>, <c>not-judged</c>, or <c>incomplete</c> for a run that stopped early (never a pass).</param>
internal sealed record RunSummary(
    string Sequence,
    string Bench,
    UutSummary Uut,
    bool Simulated,
    int Seed,
    string End,
    string Message,
    int ExitCode,
    int Steps,
    int StepsDone,
    bool OutputsConfirmedOff,
    string? RunDirectory,
    string? Archive,
    IReadOnlyList<RangeSummary> Ranges,
    string Verdict)
{
    /// <summary>How the summary is written: camelCase, indented, NaN as a string.</summary>
    public static readonly JsonSerializerOptions Options = new()
    {
        PropertyNamingPolicy = JsonNamingPolicy.CamelCase,
        WriteIndented = true,
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
        Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    /// <summary>Writes the summary as JSON to <paramref name="path"/>, or to standard output when the path is <c>-</c>.</summary>
    public void Write(string path)
    {
        var json = JsonSerializer.Serialize(this, Options);
        if (path == "-")
        {
            Console.Out.WriteLine(json);
        }
        else
        {
            File.WriteAllText(path, json + "\n");
        }
    }
}

/// <summary>The identity of the unit under test in a run summary.</summary>
internal sealed record UutSummary(string Manufacturer, string Model, string Serial, string? AssetId);

/// <summary>One range in a run summary: the chosen model, its runner-up, the resistance (k = 1), the drop at full scale and the verdict
/// (<c>pass</c>, <c>fail</c>, <c>not-judged</c>, <c>incomplete</c>; accuracy and burden both count).</summary>
internal sealed record RangeSummary(
    string Name,
    string Jack,
    string Model,
    string? RunnerUp,
    double ResistanceOhms,
    double ResistanceStandardUncertaintyOhms,
    double BurdenAtFullScaleVolts,
    int Points,
    int Outliers,
    string? Conformity,
    string Verdict,
    string? Burden,
    int Unsettled);

/// <summary>Builds what <c>run</c> writes for scripts and CI besides its run directory.</summary>
internal static class RunOutputs
{
    /// <summary>The summary of a run that ended with <paramref name="outcome"/>; <paramref name="result"/> is null when no sample was taken.</summary>
    public static RunSummary Summary(
        string sequenceTitle, BenchDescription bench, int seed, RunOutcome outcome, int exitCode, int steps, CharacterisationResult? result, string? runDirectory, string? archive) =>
        new(
            sequenceTitle,
            bench.Name,
            new UutSummary(bench.Uut.Manufacturer, bench.Uut.Model, bench.Uut.Serial, bench.Uut.AssetId),
            bench.IsSimulated,
            seed,
            RunEndWords.Token(outcome.End.ToString()),
            outcome.Message,
            exitCode,
            steps,
            outcome.StepsDone,
            outcome.OutputsConfirmedOff,
            runDirectory,
            archive,
            (result?.Ranges ?? []).Select(r => new RangeSummary(
                r.Name,
                r.Jack,
                r.Model,
                r.ModelComparison?.RunnerUp,
                r.ResistanceOhms.Value,
                r.ResistanceOhms.StandardUncertainty,
                r.BurdenAtFullScaleVolts,
                r.Points.Count,
                r.Points.Count(p => p.Outlier),
                r.Conformity?.SimpleAcceptance.ToString(),
                Verdicts.Token(Verdicts.Of(result!, r)),
                r.Burden is { } b ? (b.Fails ? "Fail" : "Pass") : null,
                r.UnsettledPoints)).ToList(),
            result is null ? Verdicts.Token(RecordVerdict.Incomplete) : Verdicts.Token(result.Verdict));

    /// <summary>The run's checks as JUnit cases: that it completed, that the outputs were confirmed off, and each range's conformity
    /// (skipped where the UUT was not read against a specification).</summary>
    public static IReadOnlyList<JUnitCase> Checks(RunOutcome outcome, CharacterisationResult? result)
    {
        var cases = new List<JUnitCase>
        {
            new("shuntsweep.run", "completed", outcome.End == RunEnd.Completed ? JUnitOutcome.Passed : JUnitOutcome.Failed,
                $"{RunEndWords.Describe(outcome.End.ToString())}: {outcome.Message}"),
            new("shuntsweep.run", "outputs off", outcome.OutputsConfirmedOff ? JUnitOutcome.Passed : JUnitOutcome.Failed,
                outcome.OutputsConfirmedOff ? "load input and supply output confirmed off" : "the outputs were NOT confirmed off: check the bench"),
        };
        foreach (var r in result?.Ranges ?? [])
        {
            if (r.Burden is { } b)
            {
                cases.Add(new JUnitCase($"shuntsweep.run.{r.Name}", "burden", b.Fails ? JUnitOutcome.Failed : JUnitOutcome.Passed,
                    $"drop at full scale {QuantityFormatter.Format(b.AtFullScaleVolts, SiUnit.Volt)} against {QuantityFormatter.Format(b.SpecifiedVolts, SiUnit.Volt)} specified; {b.CurvePointsAbove} of {b.CurvePoints} points above the limit curve"));
            }

            cases.Add(r.Conformity is { } c
                ? new JUnitCase($"shuntsweep.run.{r.Name}", "conformity",
                    c.SimpleAcceptance is Analysis.Uncertainty.ConformityVerdict.Pass or Analysis.Uncertainty.ConformityVerdict.ConditionalPass ? JUnitOutcome.Passed : JUnitOutcome.Failed,
                    $"simple acceptance {c.SimpleAcceptance}, guard-banded {c.GuardBanded}, over {c.Points} points")
                : new JUnitCase($"shuntsweep.run.{r.Name}", "conformity", JUnitOutcome.Skipped, "the UUT's reading was not compared with a specification on this range"));
        }

        return cases;
    }
}

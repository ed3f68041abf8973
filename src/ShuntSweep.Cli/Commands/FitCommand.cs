using System.CommandLine;
using System.Globalization;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Reporting;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep fit</c>: characterise from a journal alone.</summary>
internal static class FitCommand
{
    public static Command Create()
    {
        var journalArg = new Argument<string>("journal") { Description = "A journal CSV (columns range, setpoint_A, reference_A, burden_V; others optional)." };
        var uutOpt = new Option<string?>("--uut") { Description = "A UUT (or bench) file giving jacks, full scales and the specification; a bench file also gives the Type B inputs of the budget." };
        var outOpt = new Option<string?>("--out") { Description = "Where to write result.json (default: next to the journal)." };
        var command = new Command("fit", "Fit drop against current per range from a journal and write result.json.") { journalArg, uutOpt, outOpt };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            var journalPath = parse.GetValue(journalArg)!;
            if (Directory.Exists(journalPath))
            {
                var inside = Path.Combine(journalPath, "journal.csv");
                return Task.FromResult(Terminal.Fail(
                    $"{journalPath} is a directory; expected a journal CSV file{(File.Exists(inside) ? $" (did you mean {inside}?)" : string.Empty)}.",
                    ExitCodes.InvalidInput));
            }

            var contents = JournalCsv.Read(journalPath);
            if (contents.TornTail)
            {
                Terminal.Note("note", "the journal's last line was incomplete (an interrupted write) and was left out.");
            }

            var uutPath = parse.GetValue(uutOpt);
            UutDescription? uut = uutPath is null ? null : UutReader.Load(uutPath);
            // A journal inside a run directory brings its events: how the run ended and which points did not settle.
            var runDir = Path.GetDirectoryName(Path.GetFullPath(journalPath)) ?? ".";
            var hasEvents = File.Exists(Path.Combine(runDir, RunJournal.EventsFile));
            var options = new AnalysisOptions
            {
                Allowances = uutPath is null ? BenchAllowances.None : AllowancesOf(uutPath),
                UnsettledSteps = hasEvents ? EventLog.UnsettledSteps(runDir) : new HashSet<int>(),
            };
            var result = Characteriser.Analyse(contents.Samples, uut, options) with { RunEnd = hasEvents ? EventLog.LastRunEnd(runDir) ?? RunEndWords.CutOff : null };
            var outPath = parse.GetValue(outOpt) ?? Path.Combine(runDir, "result.json");
            ResultJson.Write(result, outPath);
            ShowRanges(result);
            ShowVerdict(result);
            AnsiConsole.MarkupLineInterpolated($"Result: {outPath}");
            return Task.FromResult(ExitCodes.Success);
        }));
        return command;
    }

    /// <summary>The Type B inputs of a bench file; none for a plain UUT file.</summary>
    public static BenchAllowances AllowancesOf(string path) =>
        Core.Documents.YamlDocument.Load(path).Optional("bench") is null ? BenchAllowances.None : BenchReader.Load(path).Allowances ?? BenchAllowances.None;

    /// <summary>Prints one row per range: model, resistance and offset with their expanded uncertainty and k, burden at full scale.</summary>
    public static void ShowRanges(CharacterisationResult result)
    {
        var p = result.CoverageProbability;
        var table = new Table().Title($"Characterisation per range (U at p = {QuantityFormatter.Format(p * 100, SiUnit.None)} %)")
            .AddColumns("range", "jack", "FS", "model", "R ± U (k)", "offset ± U (k)", "drop @ FS", "points", "verdict");
        foreach (var r in result.Ranges)
        {
            table.AddRow(
                Markup.Escape(r.Name),
                Markup.Escape(r.Jack),
                new Current(r.FullScaleA).ToString(),
                Markup.Escape(r.Model),
                Markup.Escape(Expanded(r.ResistanceOhms, SiUnit.Ohm, p)),
                Markup.Escape(Expanded(r.OffsetVolts, SiUnit.Volt, p)),
                QuantityFormatter.Format(r.BurdenAtFullScaleVolts, SiUnit.Volt),
                r.UnsettledPoints > 0 ? $"{r.Points.Count} ({r.UnsettledPoints} unsettled)" : r.Points.Count.ToString(CultureInfo.InvariantCulture),
                Markup.Escape(Verdicts.Words(Verdicts.Of(result, r)) + VerdictReasons(r)));
        }

        AnsiConsole.Write(table);
        foreach (var r in result.Ranges)
        {
            foreach (var w in r.Warnings ?? [])
            {
                Terminal.Warn($"range {r.Name}: {w}");
            }

            if (r.FullScaleSource.StartsWith("the largest", StringComparison.Ordinal))
            {
                AnsiConsole.MarkupLineInterpolated($"[yellow]note:[/] range {r.Name}: full scale taken from {r.FullScaleSource}.");
            }

            if (r.ResistanceOhms.EffectiveDegreesOfFreedom is < 5 and var nu)
            {
                AnsiConsole.MarkupLineInterpolated($"[yellow]note:[/] range {r.Name}: Type A uncertainty from few points (ν_eff = {QuantityFormatter.Format(nu, SiUnit.None, 3)}), hence k = {QuantityFormatter.FormatCoverageFactor(r.ResistanceOhms.Expansion(p).K)}.");
            }
        }
    }

    /// <summary>An estimate as value ± U (k = …) at the file's coverage probability.</summary>
    public static string Expanded(Estimate e, SiUnit unit, double coverageProbability)
    {
        var (u, k) = e.Expansion(coverageProbability);
        return QuantityFormatter.FormatExpanded(e.Value, u, k, unit);
    }

    /// <summary>Prints the verdict on the whole UUT, and every flagged unsettled point, under the table.</summary>
    public static void ShowVerdict(CharacterisationResult result)
    {
        foreach (var r in result.Ranges.Where(r => r.UnsettledPoints > 0))
        {
            var steps = string.Join(", ", r.Points.Where(p => p.Unsettled).Select(p => p.Step.ToString(CultureInfo.InvariantCulture)));
            Terminal.Note("unsettled", $"range {r.Name}: {r.UnsettledPoints} point(s) had not settled when their maximum wait ran out (steps {steps}); they are used in the fit, flagged, with the scatter their samples show.");
        }

        var verdict = result.Verdict;
        var colour = verdict switch { RecordVerdict.Pass => "green", RecordVerdict.Fail or RecordVerdict.Incomplete => "red", _ => "yellow" };
        var why = verdict switch
        {
            RecordVerdict.Fail => $": {string.Join(", ", result.Ranges.Where(r => Verdicts.Of(r) == RecordVerdict.Fail).Select(r => r.Name))} outside specification",
            RecordVerdict.Incomplete => result.RunEnd is { } end && end != Verdicts.Completed
                ? $": the run {RunEndWords.Describe(end)} before its last step"
                : ": a range could not be analysed",
            _ => string.Empty,
        };
        AnsiConsole.MarkupLineInterpolated($"[{colour}]Verdict: {Verdicts.Words(verdict)}{why}.[/]");
    }

    /// <summary>What made a range fail, in a few words: accuracy, burden at full scale, burden curve.</summary>
    private static string VerdictReasons(RangeResult r)
    {
        var reasons = new List<string>();
        if (r.Conformity?.SimpleAcceptance == ConformityVerdict.Fail)
        {
            reasons.Add("accuracy");
        }

        if (r.Burden?.AtFullScale == ConformityVerdict.Fail)
        {
            reasons.Add("burden");
        }

        if (r.Burden?.Curve == ConformityVerdict.Fail)
        {
            reasons.Add("burden curve");
        }

        return reasons.Count > 0 ? $" ({string.Join(", ", reasons)})" : string.Empty;
    }
}

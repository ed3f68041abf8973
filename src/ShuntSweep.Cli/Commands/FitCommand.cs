using System.CommandLine;
using System.Globalization;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep fit</c>: characterise from a journal alone.</summary>
internal static class FitCommand
{
    public static Command Create()
    {
        var journalArg = new Argument<string>("journal") { Description = "A journal CSV (columns range, setpoint_A, reference_A, burden_V; others optional)." };
        var uutOpt = new Option<string?>("--uut") { Description = "A UUT (or bench) file giving jacks, full scales and the specification." };
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
            var result = Characteriser.Analyse(contents.Samples, uut);
            var outPath = parse.GetValue(outOpt) ?? Path.Combine(Path.GetDirectoryName(Path.GetFullPath(journalPath)) ?? ".", "result.json");
            ResultJson.Write(result, outPath);
            ShowRanges(result);
            AnsiConsole.MarkupLineInterpolated($"Result: {outPath}");
            return Task.FromResult(ExitCodes.Success);
        }));
        return command;
    }

    /// <summary>Prints one row per range: model, resistance ± expanded uncertainty, offset, burden at full scale.</summary>
    public static void ShowRanges(CharacterisationResult result)
    {
        var table = new Table().Title("Characterisation per range")
            .AddColumns("range", "jack", "FS", "model", "R ± U (k=2)", "offset", "drop @ FS", "points");
        foreach (var r in result.Ranges)
        {
            table.AddRow(
                Markup.Escape(r.Name),
                Markup.Escape(r.Jack),
                new Current(r.FullScaleA).ToString(),
                Markup.Escape(r.Model),
                $"{QuantityFormatter.Format(r.ResistanceOhms.Value, SiUnit.Ohm, 6)} ± {QuantityFormatter.Format(2 * r.ResistanceOhms.StandardUncertainty, SiUnit.Ohm, 2)}",
                QuantityFormatter.Format(r.OffsetVolts.Value, SiUnit.Volt, 2),
                QuantityFormatter.Format(r.BurdenAtFullScaleVolts, SiUnit.Volt, 4),
                r.Points.Count.ToString(CultureInfo.InvariantCulture));
        }

        AnsiConsole.Write(table);
    }
}

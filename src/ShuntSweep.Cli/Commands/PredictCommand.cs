using System.CommandLine;
using System.Text.Json;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Quantities;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep predict</c>: the insertion error of the characterised UUT in a user's circuit, per range, and the range to use.</summary>
internal static class PredictCommand
{
    public static Command Create()
    {
        var resultOpt = new Option<string>("--result") { Description = "The result.json of a characterisation.", Required = true };
        var voltsOpt = new Option<string>("--source-volts") { Description = "The circuit's Thevenin (or rail) voltage, e.g. '3.3 V' for a sensor node's rail.", Required = true };
        var ohmsOpt = new Option<string>("--source-ohms") { Description = "The circuit's Thevenin resistance (on a rail: the circuit's own V/I), e.g. '39 ohm' for a radio drawing 85 mA from 3.3 V.", Required = true };
        var rangeOpt = new Option<string?>("--range") { Description = "Examine only this range (default: every range)." };
        var minOpt = new Option<string?>("--min-volts") { Description = "The circuit's minimum operating voltage, e.g. '3.0 V' where the radio browns out; ranges that leave less are flagged." };
        var offsetOpt = new Option<bool>("--offset-in-circuit") { Description = "Treat the fitted offset as a real voltage in the circuit (default: it is the voltmeter's zero)." };
        var jsonOpt = new Option<bool>("--json") { Description = "Write the prediction as JSON instead of a table." };
        var command = new Command("predict", "Predict the current, reading, error and voltage left with the UUT inserted in a circuit, per range; recommend a range.")
        {
            resultOpt, voltsOpt, ohmsOpt, rangeOpt, minOpt, offsetOpt, jsonOpt,
        };
        command.SetAction((parse, _) => Terminal.GuardAsync(() => Task.FromResult(Run(parse, resultOpt, voltsOpt, ohmsOpt, rangeOpt, minOpt, offsetOpt, jsonOpt))));
        return command;
    }

    /// <summary>Parses a quantity option: a bare number is taken in the SI unit; a unit, when given, must be <paramref name="unit"/>.</summary>
    internal static double ParseQuantity(string option, string text, SiUnit unit)
    {
        if (!QuantityParser.TryParse(text, out var value, out var found, out var error))
        {
            throw new FormatException($"{option}: {error}");
        }

        if (found != SiUnit.None && found != unit)
        {
            throw new FormatException($"{option}: '{text}' is not in {unit}.");
        }

        return value;
    }

    /// <summary>Reads a result file, turning a malformed or unreadable file into a clear error.</summary>
    internal static CharacterisationResult LoadResult(string path) => ResultJson.Read(path);

    private static int Run(
        ParseResult parse,
        Option<string> resultOpt,
        Option<string> voltsOpt,
        Option<string> ohmsOpt,
        Option<string?> rangeOpt,
        Option<string?> minOpt,
        Option<bool> offsetOpt,
        Option<bool> jsonOpt)
    {
        try
        {
            var result = LoadResult(parse.GetValue(resultOpt)!);
            var volts = ParseQuantity("--source-volts", parse.GetValue(voltsOpt)!, SiUnit.Volt);
            var ohms = ParseQuantity("--source-ohms", parse.GetValue(ohmsOpt)!, SiUnit.Ohm);
            var minText = parse.GetValue(minOpt);
            double? min = minText is null ? null : ParseQuantity("--min-volts", minText, SiUnit.Volt);
            var report = InsertionError.Predict(result, volts, ohms, parse.GetValue(rangeOpt), min, parse.GetValue(offsetOpt));
            if (parse.GetValue(jsonOpt))
            {
                Console.Out.WriteLine(JsonSerializer.Serialize(report, ResultJson.Options));
            }
            else
            {
                Show(report);
            }

            // A circuit that no range can measure without starving it is a failed check, so scripts can gate on it.
            return report.Recommended is null && min is not null && report.Ranges.All(r => r.BelowMinimum || r.Overload) ? ExitCodes.CheckFailed : ExitCodes.Success;
        }
        catch (Exception e) when (e is ArgumentException or InvalidDataException or KeyNotFoundException)
        {
            return Terminal.Fail(e.Message, ExitCodes.InvalidInput);
        }
    }

    private static void Show(InsertionReport report)
    {
        var circuit = $"Circuit: {new Voltage(report.SourceVolts)} through {new Resistance(report.SourceOhms)}; undisturbed current {new Current(report.UndisturbedCurrentA)}";
        if (report.MinimumVolts is { } m)
        {
            circuit += $"; circuit needs at least {new Voltage(m)}";
        }

        AnsiConsole.WriteLine(circuit);
        var table = new Table().Title("Insertion error per range")
            .AddColumns("range", "current ± U (k)", "reading", "error", "error %", "total error", "burden", "volts left", "notes");
        foreach (var p in report.Ranges)
        {
            if (p.Reason is not null)
            {
                table.AddRow(Markup.Escape(p.Range), "—", "—", "—", "—", "—", "—", "—", $"[red]{Markup.Escape(p.Reason)}[/]");
                continue;
            }

            var notes = new List<string>();
            if (p.BelowMinimum)
            {
                notes.Add("[red]rail < min[/]");
            }

            if (p.Overload)
            {
                notes.Add("[red]overload[/]");
            }

            if (p.Extrapolated)
            {
                notes.Add("[yellow]extrapolated[/]");
            }

            table.AddRow(
                Markup.Escape(p.Range),
                Markup.Escape(FitCommand.Expanded(p.CurrentA, SiUnit.Ampere, 0.95)),
                double.IsFinite(p.ReadingA)
                    ? Markup.Escape(double.IsFinite(p.ReadingResolutionA) ? QuantityFormatter.FormatAtResolution(p.ReadingA, p.ReadingResolutionA, SiUnit.Ampere) : QuantityFormatter.Format(p.ReadingA, SiUnit.Ampere, 5))
                    : "OL",
                Markup.Escape(QuantityFormatter.Format(p.ErrorA, SiUnit.Ampere, 3)),
                double.IsFinite(p.RelativeError) ? Markup.Escape($"{QuantityFormatter.Format(p.RelativeError * 100, SiUnit.None, 3)} %") : "-",
                double.IsFinite(p.TotalErrorA) ? Markup.Escape(QuantityFormatter.Format(p.TotalErrorA, SiUnit.Ampere, 2)) : "-",
                Markup.Escape(QuantityFormatter.Format(p.DropVolts, SiUnit.Volt)),
                Markup.Escape(QuantityFormatter.Format(p.VoltsLeft, SiUnit.Volt)),
                string.Join(", ", notes));
        }

        AnsiConsole.Write(table);
        if (report.Recommended is { } r)
        {
            AnsiConsole.MarkupLineInterpolated($"Recommended range: [green]{r}[/] ({report.Reason}); U is from the fitted curve, readings at the range's resolution.");
        }
        else
        {
            AnsiConsole.MarkupLineInterpolated($"[red]No range recommended:[/] {report.Reason}.");
        }
    }
}

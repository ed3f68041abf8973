using System.CommandLine;
using System.Text.Json;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Quantities;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep correct</c>: correct a reading taken in a known circuit back to the current that flows without the UUT.</summary>
internal static class CorrectCommand
{
    public static Command Create()
    {
        var resultOpt = new Option<string>("--result") { Description = "The result.json of a characterisation.", Required = true };
        var rangeOpt = new Option<string>("--range") { Description = "The range the reading was taken on.", Required = true };
        var readingOpt = new Option<string>("--reading") { Description = "The UUT's reading, e.g. '20.33 mA' for a status LED read on the 60mA range.", Required = true };
        var ohmsOpt = new Option<string>("--source-ohms") { Description = "The circuit's Thevenin resistance seen by the UUT, e.g. '150 ohm' for the LED's series resistor.", Required = true };
        var ohmsUOpt = new Option<string?>("--source-ohms-uncertainty") { Description = "The standard uncertainty of --source-ohms, e.g. '1.5 ohm' for a 1 % resistor (default: taken as exact)." };
        var offsetOpt = new Option<bool>("--offset-in-circuit") { Description = "Treat the fitted offset as a real voltage in the circuit (default: it is the voltmeter's zero)." };
        var jsonOpt = new Option<bool>("--json") { Description = "Write the correction as JSON instead of a table." };
        var command = new Command("correct", "Correct a reading taken in a circuit of known source resistance for the UUT's burden.")
        {
            resultOpt, rangeOpt, readingOpt, ohmsOpt, ohmsUOpt, offsetOpt, jsonOpt,
        };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            try
            {
                var result = PredictCommand.LoadResult(parse.GetValue(resultOpt)!);
                var reading = PredictCommand.ParseQuantity("--reading", parse.GetValue(readingOpt)!, SiUnit.Ampere);
                var ohms = PredictCommand.ParseQuantity("--source-ohms", parse.GetValue(ohmsOpt)!, SiUnit.Ohm);
                var ohmsUText = parse.GetValue(ohmsUOpt);
                var ohmsU = ohmsUText is null ? 0 : PredictCommand.ParseQuantity("--source-ohms-uncertainty", ohmsUText, SiUnit.Ohm);
                var c = InsertionError.Correct(result, parse.GetValue(rangeOpt)!, reading, ohms, ohmsU, parse.GetValue(offsetOpt));
                if (parse.GetValue(jsonOpt))
                {
                    Console.Out.WriteLine(JsonSerializer.Serialize(c, ResultJson.Options));
                    return Task.FromResult(c.Reason is null ? ExitCodes.Success : ExitCodes.CheckFailed);
                }

                if (c.Reason is not null)
                {
                    Terminal.Warn($"range {c.Range}: {c.Reason}; no correction made (the fitted curve does not describe this reading).");
                    return Task.FromResult(ExitCodes.CheckFailed);
                }

                var table = new Table().Title($"Reading corrected for the burden of range {Markup.Escape(c.Range)}").AddColumns("quantity", "value");
                table.AddRow("reading", Markup.Escape(QuantityFormatter.Format(c.ReadingA, SiUnit.Ampere, 6)));
                table.AddRow("burden at the reading", Markup.Escape(QuantityFormatter.Format(c.DropVolts, SiUnit.Volt)));
                table.AddRow("correction V_b/R", Markup.Escape(QuantityFormatter.Format(c.CorrectionA, SiUnit.Ampere)));
                table.AddRow(
                    "undisturbed current ± U (k)",
                    Markup.Escape(FitCommand.Expanded(c.UndisturbedCurrentA, SiUnit.Ampere, 0.95)));
                AnsiConsole.Write(table);
                if (c.Budget is { } budget)
                {
                    var rows = new Table().Title("Budget of the undisturbed current").AddColumns("input", "u(xᵢ)", "|cᵢ|·u(xᵢ)");
                    foreach (var line in budget.Lines)
                    {
                        rows.AddRow(Markup.Escape(line.Name), Markup.Escape(QuantityFormatter.FormatUncertainty(line.StandardUncertainty, line.Name.StartsWith("source", StringComparison.Ordinal) ? SiUnit.Ohm : line.Name.StartsWith("burden", StringComparison.Ordinal) ? SiUnit.Volt : SiUnit.Ampere)), Markup.Escape(QuantityFormatter.FormatUncertainty(line.Contribution, SiUnit.Ampere)));
                    }

                    AnsiConsole.Write(rows);
                }

                if (c.Extrapolated)
                {
                    Terminal.Note("note", "the reading is beyond the currents the range was characterised at; the correction is an extrapolation.");
                }

                return Task.FromResult(ExitCodes.Success);
            }
            catch (Exception e) when (e is ArgumentException or InvalidDataException or KeyNotFoundException)
            {
                return Task.FromResult(Terminal.Fail(e.Message, ExitCodes.InvalidInput));
            }
        }));
        return command;
    }
}

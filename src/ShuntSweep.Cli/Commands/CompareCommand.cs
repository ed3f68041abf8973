using System.CommandLine;
using ShuntSweep.Analysis;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Reporting.Comparison;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep compare RESULT GOLDEN</c>: the CI gate; exit 1 when the result moved beyond tolerance, 2 on invalid input.</summary>
internal static class CompareCommand
{
    public static Command Create()
    {
        var resultArg = new Argument<string>("result") { Description = "The result to check: a result.json or a run directory." };
        var goldenArg = new Argument<string>("golden") { Description = "The golden result: a result.json or a run directory." };
        var toleranceOpt = new Option<string?>("--tolerance") { Description = "Allowed relative change of resistance and burden at full scale, with its unit: '0.5 %' or '500 ppm' (a bare number is refused as ambiguous). Default 1 %." };
        var offsetOpt = new Option<string?>("--offset-tolerance") { Description = "Allowed absolute change of the offset, for example 50 uV. Default 100 uV." };
        var junitOpt = new Option<string?>("--junit") { Description = "Also write the checks as JUnit XML to this file." };
        var command = new Command("compare", "Compare a result with a golden result range by range; exit 1 beyond tolerance.")
        {
            resultArg, goldenArg, toleranceOpt, offsetOpt, junitOpt,
        };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            try
            {
                var resultPath = ResultPath(parse.GetValue(resultArg)!);
                var goldenPath = ResultPath(parse.GetValue(goldenArg)!);
                var tolerance = new CompareTolerance(
                    parse.GetValue(toleranceOpt) is { } t ? CompareTolerance.ParseFraction(t) : CompareTolerance.Default.Fraction,
                    parse.GetValue(offsetOpt) is { } o ? Core.Quantities.QuantityParser.Parse(o, Core.Quantities.SiUnit.Volt) : CompareTolerance.Default.OffsetVolts);
                var report = ResultComparer.Compare(ResultJson.Read(resultPath), ResultJson.Read(goldenPath), tolerance);
                var table = new Table().Title($"{Markup.Escape(resultPath)} against {Markup.Escape(goldenPath)}").AddColumns("range", "check", "", "detail");
                foreach (var c in report.Checks)
                {
                    table.AddRow(Markup.Escape(c.Range), Markup.Escape(c.Quantity), c.Passed ? "[green]ok[/]" : "[red]FAILED[/]", Markup.Escape(c.Message));
                }

                AnsiConsole.Write(table);
                if (parse.GetValue(junitOpt) is { } junit)
                {
                    JUnitReport.Write(report, junit, $"{resultPath} against {goldenPath}", TimeProvider.System.GetUtcNow());
                    AnsiConsole.MarkupLineInterpolated($"JUnit XML: {junit}");
                }

                AnsiConsole.MarkupLine(report.Passed ? "[green]Within tolerance.[/]" : $"[red]{report.Failures} of {report.Checks.Count} checks failed.[/]");
                return Task.FromResult(report.Passed ? ExitCodes.Success : ExitCodes.CheckFailed);
            }
            catch (InvalidDataException ex)
            {
                return Task.FromResult(Terminal.Fail(ex.Message, ExitCodes.InvalidInput));
            }
        }));
        return command;
    }

    private static string ResultPath(string path) => Directory.Exists(path) ? Path.Combine(path, "result.json") : path;
}

using System.CommandLine;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Reporting;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep report DIR</c>: write the HTML report and plots of a run directory.</summary>
internal static class ReportCommand
{
    public static Command Create()
    {
        var dirArg = new Argument<string>("directory") { Description = "A run directory (it must hold result.json; manifest, journal and events are used when present)." };
        var command = new Command("report", "Write report.html (one self-contained file) and plots/ (PNG and SVG) for a run directory.") { dirArg };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            try
            {
                var path = RunReport.Write(parse.GetValue(dirArg)!);
                AnsiConsole.MarkupLineInterpolated($"Report: {path}");
                return Task.FromResult(ExitCodes.Success);
            }
            catch (InvalidDataException ex)
            {
                return Task.FromResult(Terminal.Fail(ex.Message, ExitCodes.InvalidInput));
            }
        }));
        return command;
    }
}

using System.CommandLine;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Reporting;
using ShuntSweep.Reporting.Archive;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep report DIR</c>: write the HTML report and plots of a run directory, and optionally record the run in the archive.</summary>
internal static class ReportCommand
{
    public static Command Create()
    {
        var dirArg = new Argument<string>("directory") { Description = "A run directory (it must hold result.json; manifest, journal and events are used when present)." };
        var recordOpt = new Option<bool>("--record") { Description = "Also record the run in the archive (it needs the run's manifest.json)." };
        var archiveOpt = new Option<string?>("--archive")
        {
            Description = $"With --record: an SQLite file, an SQLite connection string (Data Source=...) or a PostgreSQL connection string (Host=...); default ${ArchiveLocation.EnvironmentVariable}, else {ArchiveLocation.DefaultSqlitePath}.",
        };
        var pdfOpt = new Option<bool>("--pdf")
        {
            Description = $"Also print the report to report.pdf (A4, page x of y) with a headless Chromium: /usr/bin/chromium, or the browser ${PdfPrinter.BrowserVariable} names.",
        };
        var command = new Command("report", "Write report.html (one self-contained file) and plots/ (PNG and SVG) for a run directory.") { dirArg, recordOpt, archiveOpt, pdfOpt };
        command.SetAction((parse, ct) => Terminal.GuardAsync(async () =>
        {
            try
            {
                var dir = parse.GetValue(dirArg)!;
                var path = RunReport.Write(dir);
                AnsiConsole.MarkupLineInterpolated($"Report: {path}");
                if (parse.GetValue(pdfOpt))
                {
                    if (PdfPrinter.FindBrowser() is not { } browser)
                    {
                        return Terminal.Fail($"No PDF: printing needs a Chromium browser (Debian: apt-get install chromium) or ${PdfPrinter.BrowserVariable} naming one. The HTML report is written: {path}", ExitCodes.RecordFailed);
                    }

                    try
                    {
                        var pdf = await PdfPrinter.PrintAsync(path, Path.ChangeExtension(path, ".pdf"), browser, ct);
                        AnsiConsole.MarkupLineInterpolated($"PDF: {pdf}");
                    }
                    catch (IOException ex)
                    {
                        return Terminal.Fail($"No PDF: {ex.Message} The HTML report is written: {path}", ExitCodes.RecordFailed);
                    }
                }
                if (parse.GetValue(recordOpt))
                {
                    var location = ArchiveLocation.Resolve(parse.GetValue(archiveOpt));
                    await using var archive = await location.OpenAsync(cancellationToken: ct);
                    var run = await archive.RecordRunAsync(dir, ct);
                    AnsiConsole.MarkupLineInterpolated($"Archived run {run.RunId} of {run.Serial} in {location.Display}.");
                }

                return ExitCodes.Success;
            }
            catch (InvalidDataException ex)
            {
                return Terminal.Fail(ex.Message, ExitCodes.InvalidInput);
            }
        }));
        return command;
    }
}

using System.CommandLine;
using System.Globalization;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting.Archive;
using ShuntSweep.Reporting.Plots;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep history SERIAL</c>: the archived runs of one UUT and each range's resistance over time, with drift flagged.</summary>
internal static class HistoryCommand
{
    public static Command Create()
    {
        var serialArg = new Argument<string>("serial") { Description = "The UUT's serial number." };
        var archiveOpt = new Option<string?>("--archive")
        {
            Description = $"An SQLite file, an SQLite connection string (Data Source=...) or a PostgreSQL connection string (Host=...); default ${ArchiveLocation.EnvironmentVariable}, else {ArchiveLocation.DefaultSqlitePath}.",
        };
        var driftOpt = new Option<string?>("--drift-limit") { Description = "The allowed change from the first archived run, with its unit: '0.5 %', '500 ppm' or a resistance ('2 mohm'). Default 1 %." };
        var plotOpt = new Option<string?>("--plot") { Description = "Also write the history plot here, without extension (.png and .svg are written). No plot is written without it." };
        var command = new Command("history", "List the archived runs of a UUT and each range's resistance over time; exit 1 when a range drifted beyond the limit.")
        {
            serialArg, archiveOpt, driftOpt, plotOpt,
        };
        command.SetAction((parse, ct) => Terminal.GuardAsync(async () =>
        {
            var serial = parse.GetValue(serialArg)!;
            var limit = parse.GetValue(driftOpt) is { } d ? DriftLimit.Parse(d) : DriftLimit.Default;
            var location = ArchiveLocation.Resolve(parse.GetValue(archiveOpt));
            if (location.Kind == ArchiveKind.Sqlite && new Microsoft.Data.Sqlite.SqliteConnectionStringBuilder(location.ConnectionString).DataSource is var file
                && file != ":memory:" && !File.Exists(file))
            {
                return Terminal.Fail(
                    Directory.Exists(file)
                        ? $"The archive {file} is a directory; give the archive's SQLite file (or a PostgreSQL connection string) with --archive."
                        : $"There is no archive at {file} (nothing has been archived there yet); give the archive with --archive or ${ArchiveLocation.EnvironmentVariable}.",
                    ExitCodes.InvalidInput);
            }

            RunHistory history;
            try
            {
                await using var archive = await location.OpenAsync(cancellationToken: ct);
                history = await archive.HistoryAsync(serial, ct);
            }
            catch (Exception ex) when (ex is System.Data.Common.DbException or IOException or UnauthorizedAccessException or InvalidOperationException)
            {
                return Terminal.Fail($"Cannot read the archive ({location.Display}): {ex.Message} Is it a ShuntSweep archive (an SQLite file or a PostgreSQL connection string)?", ExitCodes.InvalidInput);
            }

            if (history.Runs.Count == 0)
            {
                return Terminal.Fail($"The archive ({location.Display}) has no runs of serial '{serial}'.", ExitCodes.InvalidInput);
            }

            var runs = new Table().Title($"Runs of {Markup.Escape(serial)} in {Markup.Escape(location.Display)}").AddColumns("run", "start (UTC)", "model", "asset", "bench", "condition", "ended", "verdict");
            foreach (var r in history.Runs)
            {
                runs.AddRow(
                    Markup.Escape(r.RunId[..12]),
                    r.Start.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss", CultureInfo.InvariantCulture),
                    Markup.Escape($"{r.Manufacturer} {r.Model}"),
                    Markup.Escape(r.AssetId ?? "—"),
                    Markup.Escape(r.BenchName) + (r.Simulated ? " (sim)" : string.Empty),
                    Markup.Escape(r.Condition ?? "—"),
                    Markup.Escape(r.RunEnd is null ? "—" : ShuntSweep.Reporting.RunEndWords.Describe(r.RunEnd)),
                    Markup.Escape(VerdictOf(r)));
            }

            AnsiConsole.Write(runs);
            var drifted = 0;
            foreach (var range in history.Ranges)
            {
                var table = new Table().Title($"Range {Markup.Escape(range.Range)} ({Markup.Escape(range.Jack)}): resistance over time, drift limit {Markup.Escape(limit.ToString())}")
                    .AddColumns("start (UTC)", "model", "resistance ± u", "change", "drift");
                foreach (var p in Drift.Assess(range, limit))
                {
                    drifted += p.BeyondLimit ? 1 : 0;
                    table.AddRow(
                        p.Reading.Start.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss", CultureInfo.InvariantCulture),
                        Markup.Escape(p.Reading.Model),
                        Markup.Escape(QuantityFormatter.Format(p.Reading.ResistanceOhms, p.Reading.StandardUncertaintyOhms, SiUnit.Ohm)),
                        double.IsFinite(p.ChangeFraction) ? Markup.Escape($"{(p.ChangeFraction > 0 ? "+" : string.Empty)}{QuantityFormatter.Format(100 * p.ChangeFraction, SiUnit.None)} %") : "—",
                        p.BeyondLimit ? "[red]beyond limit[/]" : "[green]within[/]");
                }

                AnsiConsole.Write(table);
            }

            foreach (var (found, left) in history.AsFoundAsLeftPairs())
            {
                var pair = new Table().Title($"As found {Markup.Escape(found.Start.UtcDateTime.ToString("yyyy-MM-dd HH:mm", CultureInfo.InvariantCulture))} → as left {Markup.Escape(left.Start.UtcDateTime.ToString("yyyy-MM-dd HH:mm", CultureInfo.InvariantCulture))}")
                    .AddColumns("range", "as found: resistance ± u", "run verdict", "as left: resistance ± u", "run verdict", "change");
                foreach (var range in history.Ranges)
                {
                    var before = range.Readings.FirstOrDefault(x => x.RunId == found.RunId);
                    var after = range.Readings.FirstOrDefault(x => x.RunId == left.RunId);
                    pair.AddRow(
                        Markup.Escape(range.Range),
                        Markup.Escape(before is null ? "not measured" : QuantityFormatter.Format(before.ResistanceOhms, before.StandardUncertaintyOhms, SiUnit.Ohm)),
                        Markup.Escape(VerdictOf(found)),
                        Markup.Escape(after is null ? "not measured" : QuantityFormatter.Format(after.ResistanceOhms, after.StandardUncertaintyOhms, SiUnit.Ohm)),
                        Markup.Escape(VerdictOf(left)),
                        Markup.Escape(before is not null && after is not null && before.ResistanceOhms != 0
                            ? QuantityFormatter.FormatPercent((after.ResistanceOhms - before.ResistanceOhms) / before.ResistanceOhms, 3, showSign: true)
                            : "—"));
                }

                AnsiConsole.Write(pair);
            }

            if (parse.GetValue(plotOpt) is { } stem)
            {
                var (png, svg) = HistoryPlot.Write(history, limit, stem);
                AnsiConsole.MarkupLineInterpolated($"Plot: {png}, {svg}");
            }

            if (drifted > 0)
            {
                AnsiConsole.MarkupLineInterpolated($"[red]{drifted} reading(s) drifted beyond {limit}.[/]");
                return ExitCodes.CheckFailed;
            }

            return ExitCodes.Success;
        }));
        return command;
    }

    /// <summary>The run's verdict in words; a run that did not complete is incomplete whatever an older archive recorded for it.</summary>
    private static string VerdictOf(ArchivedRun run)
    {
        if (run.RunEnd is { } end && end != Verdicts.Completed)
        {
            return Verdicts.Words(RecordVerdict.Incomplete);
        }

        return run.Verdict switch
        {
            null => "—",
            "pass" => Verdicts.Words(RecordVerdict.Pass),
            "fail" => Verdicts.Words(RecordVerdict.Fail),
            "incomplete" => Verdicts.Words(RecordVerdict.Incomplete),
            "not-judged" => Verdicts.Words(RecordVerdict.NotJudged),
            var older => older,
        };
    }
}

using System.CommandLine;
using ShuntSweep.Analysis;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting;
using ShuntSweep.Reporting.Comparison;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep overlay A B [C…]</c>: two or more results (prototype revisions, units, runs) range by range against the first,
/// with differences and E<sub>n</sub> numbers; the page and plots only with <c>--out</c>.</summary>
internal static class OverlayCommand
{
    public static Command Create()
    {
        var resultsArg = new Argument<string[]>("results") { Description = "Two or more results (result.json or run directories); the first is the reference.", Arity = new ArgumentArity(2, 16) };
        var labelOpt = new Option<string[]>("--label") { Description = "A label per result, in order (default: each run directory's name).", AllowMultipleArgumentsPerToken = true };
        var outOpt = new Option<string?>("--out") { Description = "Also write overlay.html and plots/ (PNG and SVG) into this folder." };
        var command = new Command("overlay", "Overlay two or more results range by range: points, curves, differences and En numbers against the first (not a gate: exit 0).")
        {
            resultsArg, labelOpt, outOpt,
        };
        command.SetAction((parse, _) => Terminal.GuardAsync(() =>
        {
            var paths = parse.GetValue(resultsArg)!;
            var labels = parse.GetValue(labelOpt) ?? [];
            if (labels.Length > 0 && labels.Length != paths.Length)
            {
                return Task.FromResult(Terminal.Fail($"--label: {labels.Length} labels for {paths.Length} results; give one per result or none.", ExitCodes.InvalidInput));
            }

            var entries = paths.Select((p, i) => new OverlayEntry(labels.Length > 0 ? labels[i] : LabelOf(p), ResultJson.Read(ResultPath(p)))).ToList();
            if (entries.Select(e => e.Label).Distinct(StringComparer.Ordinal).Count() != entries.Count)
            {
                return Task.FromResult(Terminal.Fail("Two results have the same label; name them with --label.", ExitCodes.InvalidInput));
            }

            IReadOnlyList<RangeDifference> differences;
            if (parse.GetValue(outOpt) is { } folder)
            {
                (var page, differences) = OverlayReport.Write(entries, folder);
                Show(entries, differences);
                AnsiConsole.MarkupLineInterpolated($"Overlay: {page}");
            }
            else
            {
                differences = ResultOverlay.Compare(entries);
                Show(entries, differences);
            }

            return Task.FromResult(ExitCodes.Success);
        }));
        return command;
    }

    private static void Show(List<OverlayEntry> entries, IReadOnlyList<RangeDifference> differences)
    {
        var table = new Table().Title($"Against {Markup.Escape(entries[0].Label)} (U with k = 2; |En| ≤ 1 agrees within uncertainty)")
            .AddColumns("range", "result", "model", "quantity", "reference", "value", "difference", "En");
        foreach (var d in differences)
        {
            foreach (var q in d.Quantities)
            {
                var unit = q.Unit == "Ω" ? SiUnit.Ohm : SiUnit.Volt;
                table.AddRow(
                    Markup.Escape(d.Range),
                    Markup.Escape(d.Label),
                    Markup.Escape(d.Model),
                    Markup.Escape(q.Quantity),
                    QuantityFormatter.Format(q.Reference, q.ExpandedReference, unit),
                    QuantityFormatter.Format(q.Value, q.Expanded, unit),
                    QuantityFormatter.Format(q.Difference, unit, 3),
                    En(q.En));
            }

            table.AddRow(Markup.Escape(d.Range), Markup.Escape(d.Label), Markup.Escape(d.Model), "points", $"{d.Points.Count} at the same setpoints", string.Empty, string.Empty, d.Points.Count > 0 ? "worst " + En(d.WorstPointEn) : "—");
        }

        AnsiConsole.Write(table);
    }

    private static string En(double en) => !double.IsFinite(en) ? "—"
        : Math.Abs(en) <= 1 ? QuantityFormatter.Format(en, SiUnit.None, 3) : $"[red]{QuantityFormatter.Format(en, SiUnit.None, 3)}[/]";

    private static string ResultPath(string path) => Directory.Exists(path) ? Path.Combine(path, "result.json") : path;

    private static string LabelOf(string path)
    {
        var full = Path.GetFullPath(path).TrimEnd(Path.DirectorySeparatorChar);
        return Directory.Exists(full) ? Path.GetFileName(full)
            : Path.GetFileName(full) == "result.json" ? Path.GetFileName(Path.GetDirectoryName(full)) ?? full
            : Path.GetFileNameWithoutExtension(full);
    }
}

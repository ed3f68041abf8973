using System.Globalization;
using System.Text;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting.Comparison;
using ShuntSweep.Reporting.Plots;
using static ShuntSweep.Reporting.Html.Markup;

namespace ShuntSweep.Reporting.Html;

/// <summary>The one-file HTML page of an overlay: per range, the overlaid plot, the table of differences with E<sub>n</sub> numbers, and the points.</summary>
internal static class OverlayHtml
{
    /// <summary>The page's HTML text.</summary>
    public static string Build(IReadOnlyList<OverlayEntry> entries, IReadOnlyList<RangeDifference> differences, IReadOnlyList<RenderedPlot> plots, DateTimeOffset generatedAt, string software)
    {
        var html = new StringBuilder(128 * 1024);
        var title = $"Overlay: {string.Join(", ", entries.Select(e => e.Label))}";
        html.Append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">")
            .Append("<title>").Append(E(title)).Append("</title><style>").Append(ReportStyle.Css).Append("</style></head><body>\n")
            .Append("<header class=\"band\" id=\"top\"><h1>").Append(E(title)).Append("</h1><div class=\"sub\">")
            .Append(E($"Each result against {entries[0].Label}, range by range. En = (x − x_ref)/√(U² + U_ref²) with expanded uncertainties (k = 2); |En| ≤ 1: the two agree within their uncertainties."))
            .Append("</div></header>\n<main>\n");
        foreach (var plot in plots)
        {
            var range = differences.First(d => $"overlay-{RunPlots.Stem(d.Range)}" == plot.Name).Range;
            html.Append(CultureInfo.InvariantCulture, $"<section class=\"range\" id=\"range-{E(RunPlots.Stem(range))}\"><h2>Range {E(range)}</h2>")
                .Append(CultureInfo.InvariantCulture, $"<figure id=\"plot-{E(plot.Name)}\"><img alt=\"{E(plot.Caption)}\" src=\"data:image/png;base64,{Convert.ToBase64String(plot.Png)}\">")
                .Append(CultureInfo.InvariantCulture, $"<figcaption>{E(plot.Caption)} <a href=\"plots/{E(plot.Name)}.svg\">SVG</a></figcaption></figure>\n");
            var mine = differences.Where(d => d.Range == range).ToList();
            Table(html, "data differences", ["result", "model", "quantity", entries[0].Label, "value", "difference", "relative", "En"],
                mine.SelectMany(d => d.Quantities.Select(q => (IReadOnlyList<string>)
                [
                    E(d.Label), E(d.Model == d.ReferenceModel ? d.Model : $"{d.Model} (ref {d.ReferenceModel})"), E(q.Quantity),
                    E(QuantityFormatter.Format(q.Reference, q.ExpandedReference, UnitOf(q.Unit))), E(QuantityFormatter.Format(q.Value, q.Expanded, UnitOf(q.Unit))),
                    E(QuantityFormatter.Format(q.Difference, UnitOf(q.Unit), 3)), E(double.IsFinite(q.Relative) ? $"{QuantityFormatter.Format(100 * q.Relative, SiUnit.None, 3)} %" : "—"), EnTag(q.En),
                ])).Concat(mine.Select(d => (IReadOnlyList<string>)
                [
                    E(d.Label), E(d.Model), "points", E($"{d.Points.Count} at the same setpoints"), string.Empty, string.Empty, string.Empty,
                    d.Points.Count > 0 ? $"worst {EnTag(d.WorstPointEn)}" : "—",
                ])));
            foreach (var d in mine.Where(d => d.Points.Count > 0))
            {
                html.Append(CultureInfo.InvariantCulture, $"<details><summary>{E(d.Label)}: {d.Points.Count} points against {E(entries[0].Label)}</summary>");
                Table(html, "data points", ["setpoint", "current", $"drop {entries[0].Label}", $"drop {d.Label}", "difference", "En"],
                    d.Points.Select(p => (IReadOnlyList<string>)
                    [
                        E(Q(p.SetpointA, SiUnit.Ampere)), E(Q(p.CurrentA, SiUnit.Ampere, 6)), E(Q(p.ReferenceDropVolts, SiUnit.Volt, 6)), E(Q(p.DropVolts, SiUnit.Volt, 6)),
                        E(Q(p.Difference, SiUnit.Volt, 3)), EnTag(p.En),
                    ]));
                html.Append("</details>");
            }

            html.Append("</section>\n");
        }

        if (plots.Count == 0)
        {
            html.Append("<p class=\"note\">The results share no range with points to compare.</p>");
        }

        html.Append("</main>\n<footer>Generated ")
            .Append(E(generatedAt.ToUniversalTime().ToString("yyyy-MM-dd HH:mm:ss 'UTC'", CultureInfo.InvariantCulture)))
            .Append(" by ").Append(E(software)).Append(". Drops of a compared result are moved along its fitted slope to the reference's current before they are differenced.</footer>\n</body></html>\n");
        return html.ToString();
    }

    private static SiUnit UnitOf(string unit) => unit == "Ω" ? SiUnit.Ohm : SiUnit.Volt;

    private static string EnTag(double en) => !double.IsFinite(en) ? "—"
        : $"<span class=\"tag {(Math.Abs(en) <= 1 ? "ok" : "out")}\">{E(QuantityFormatter.Format(en, SiUnit.None, 3))}</span>";
}

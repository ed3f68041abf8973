using ScottPlot;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting.Comparison;

namespace ShuntSweep.Reporting.Plots;

/// <summary>Per range: every result's points and fitted curve on one logarithmic current axis, over the point-by-point difference from the
/// reference with its combined expanded uncertainty (a bar that crosses zero is |E<sub>n</sub>| ≤ 1).</summary>
internal static class OverlayPlots
{
    private static readonly MarkerShape[] Shapes = [MarkerShape.FilledCircle, MarkerShape.FilledSquare, MarkerShape.FilledTriangleUp, MarkerShape.FilledDiamond, MarkerShape.OpenCircle];

    /// <summary>One figure per range of the reference result that another result shares.</summary>
    public static IReadOnlyList<RenderedPlot> Render(IReadOnlyList<OverlayEntry> entries, IReadOnlyList<RangeDifference> differences)
    {
        var plots = new List<RenderedPlot>();
        foreach (var refRange in entries[0].Result.Ranges)
        {
            var mine = differences.Where(d => d.Range == refRange.Name).ToList();
            if (mine.Count == 0 || refRange.Points.All(p => p.CurrentA <= 0))
            {
                continue;
            }

            var top = PlotStyle.Create($"Range {refRange.Name}: drop against current, {entries.Count} results", string.Empty, SiUnit.Ampere, "drop", SiUnit.Volt);
            PlotStyle.Decades(top.Axes.Bottom, SiUnit.Ampere);
            var (lo, hi) = (double.MaxValue, double.MinValue);
            for (var i = 0; i < entries.Count; i++)
            {
                var range = entries[i].Result.Ranges.FirstOrDefault(r => r.Name == refRange.Name);
                var points = range?.Points.Where(p => p.CurrentA > 0).OrderBy(p => p.CurrentA).ToList();
                if (range is null || points is not { Count: > 0 })
                {
                    continue;
                }

                lo = Math.Min(lo, points[0].CurrentA);
                hi = Math.Max(hi, points[^1].CurrentA);
                var scatter = top.Add.ScatterPoints(points.Select(p => Math.Log10(p.CurrentA)).ToArray(), points.Select(p => p.DropVolts).ToArray(), PlotStyle.Of(i));
                scatter.MarkerSize = 6;
                scatter.MarkerShape = Shapes[i % Shapes.Length];
                scatter.LegendText = $"{entries[i].Label}: {range.Model}";
                try
                {
                    var curve = DropCurve.For(range, entries[i].Result.DiodeTemperatureK);
                    var grid = Enumerable.Range(0, 201).Select(k => Math.Pow(10, Math.Log10(points[0].CurrentA) + ((Math.Log10(points[^1].CurrentA) - Math.Log10(points[0].CurrentA)) * k / 200))).ToArray();
                    var line = top.Add.ScatterLine(grid.Select(Math.Log10).ToArray(), grid.Select(curve.Drop).ToArray(), PlotStyle.Of(i));
                    line.LineWidth = 1.5f;
                    line.LinePattern = i == 0 ? LinePattern.Solid : LinePattern.Dashed;
                }
                catch (InvalidDataException)
                {
                    // A model this build cannot rebuild: its points are still drawn.
                }
            }

            top.ShowLegend(Alignment.UpperLeft);
            var bottom = PlotStyle.Create(string.Empty, "current", SiUnit.Ampere, $"drop − {entries[0].Label}", SiUnit.Volt);
            PlotStyle.Decades(bottom.Axes.Bottom, SiUnit.Ampere);
            bottom.Add.HorizontalLine(0, 1, PlotStyle.Fit);
            foreach (var d in mine)
            {
                var index = entries.ToList().FindIndex(e => e.Label == d.Label);
                var pts = d.Points.Where(p => p.CurrentA > 0).ToList();
                if (pts.Count == 0)
                {
                    continue;
                }

                var xs = pts.Select(p => Math.Log10(p.CurrentA)).ToArray();
                var ys = pts.Select(p => p.Difference).ToArray();
                var marks = bottom.Add.ScatterPoints(xs, ys, PlotStyle.Of(index));
                marks.MarkerSize = 6;
                bottom.Add.ErrorBar(xs, ys, pts.Select(p => Math.Sqrt((p.Expanded * p.Expanded) + (p.ExpandedReference * p.ExpandedReference))).ToArray()).Color = PlotStyle.Of(index);
            }

            var pad = (Math.Log10(hi) - Math.Log10(lo)) * 0.04;
            top.Axes.SetLimitsX(Math.Log10(lo) - pad, Math.Log10(hi) + pad);
            bottom.Axes.SetLimitsX(Math.Log10(lo) - pad, Math.Log10(hi) + pad);
            plots.Add(Figure.Render(
                $"overlay-{RunPlots.Stem(refRange.Name)}",
                $"Range {refRange.Name}: each result's measured drop and fitted curve ({entries[0].Label} solid, the others dashed); below, each result's drop minus "
                + $"{entries[0].Label}'s at the same setpoint with the combined expanded uncertainty √(U² + U_ref²) (k = 2): a bar that crosses zero has |En| ≤ 1.",
                640,
                (top, 2.2f),
                (bottom, 1f)));
        }

        return plots;
    }
}

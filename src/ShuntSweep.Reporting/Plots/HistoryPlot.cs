using ScottPlot;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting.Archive;

namespace ShuntSweep.Reporting.Plots;

/// <summary>Draws each range's resistance change over the archived runs of one UUT, with the drift limit.</summary>
public static class HistoryPlot
{
    /// <summary>Writes the history plot to <paramref name="pathWithoutExtension"/>.png and .svg and returns both paths.</summary>
    public static (string Png, string Svg) Write(RunHistory history, DriftLimit limit, string pathWithoutExtension)
    {
        ArgumentNullException.ThrowIfNull(history);
        ArgumentNullException.ThrowIfNull(limit);
        var plot = PlotStyle.Create($"UUT {history.Serial}: resistance change from the first archived run", "run start (UTC)", SiUnit.None, "change", SiUnit.None);
        PlotStyle.IsoDates(plot);
        PlotStyle.Percent(plot.Axes.Left);
        for (var i = 0; i < history.Ranges.Count; i++)
        {
            var points = Drift.Assess(history.Ranges[i], limit).Where(p => double.IsFinite(p.ChangeFraction)).ToList();
            if (points.Count == 0)
            {
                continue;
            }

            var line = plot.Add.Scatter(
                points.Select(p => p.Reading.Start.UtcDateTime.ToOADate()).ToArray(),
                points.Select(p => 100 * p.ChangeFraction).ToArray(),
                PlotStyle.Of(i));
            line.MarkerSize = 7;
            line.LegendText = history.Ranges[i].Range;
            var flagged = points.Where(p => p.BeyondLimit).ToList();
            if (flagged.Count > 0)
            {
                var ring = plot.Add.ScatterPoints(flagged.Select(p => p.Reading.Start.UtcDateTime.ToOADate()).ToArray(), flagged.Select(p => 100 * p.ChangeFraction).ToArray(), PlotStyle.Alert);
                ring.MarkerShape = MarkerShape.OpenCircle;
                ring.MarkerSize = 16;
                ring.MarkerLineWidth = 2;
            }
        }

        if (limit.AbsoluteOhms is null)
        {
            plot.Add.HorizontalLine(100 * limit.Fraction, 1, PlotStyle.Alert).LegendText = $"drift limit {limit}";
            plot.Add.HorizontalLine(-100 * limit.Fraction, 1, PlotStyle.Alert);
        }

        plot.ShowLegend(Alignment.UpperLeft);
        var figure = Figure.Render("history", string.Empty, 480, (plot, 1f));
        var full = Path.GetFullPath(pathWithoutExtension);
        if (Path.GetDirectoryName(full) is { Length: > 0 } folder)
        {
            Directory.CreateDirectory(folder);
        }

        File.WriteAllBytes(full + ".png", figure.Png);
        File.WriteAllText(full + ".svg", figure.Svg);
        return (full + ".png", full + ".svg");
    }
}

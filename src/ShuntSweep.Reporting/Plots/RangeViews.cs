using ScottPlot;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Reporting.Plots;

/// <summary>The currents worth marking on a range's plots: full scale, the jack's fuse and its derated limit, where the reading overloaded, the knee.</summary>
/// <param name="FullScaleA">The range's full scale.</param>
/// <param name="FuseA">The jack's fuse rating, when the bench file is readable.</param>
/// <param name="DeratedFuseA">The fuse rating times the sequence's derating, when both are known.</param>
/// <param name="ReadingLimitA">The smallest current at which the UUT's reading overloaded inside the range (NaN when not seen).</param>
/// <param name="KneeA">The fitted knee of a feedback-knee range (null for other models).</param>
internal sealed record RangeMarkers(double FullScaleA, double? FuseA, double? DeratedFuseA, double ReadingLimitA, double? KneeA)
{
    /// <summary>The markers of <paramref name="range"/> from the result and, for the fuse, the run's UUT and manifest.</summary>
    public static RangeMarkers For(RangeResult range, RunRecords? run)
    {
        ArgumentNullException.ThrowIfNull(range);
        double? fuse = run?.Uut?.Jacks.FirstOrDefault(j => j.Name == range.Jack)?.FuseRating.Amperes;
        double? derated = fuse is { } f && run?.Manifest?.FuseDerating is { } d ? f * d : null;
        double? knee = range.Model == "feedback-knee" ? range.Parameters?.FirstOrDefault(p => p.Name == "kneeCurrent")?.Value : null;
        return new RangeMarkers(range.FullScaleA, fuse, derated, range.ReadingLimitA, knee);
    }

    /// <summary>Each marker that is known, with its name and line style.</summary>
    public IEnumerable<(double CurrentA, string Label, Color Color, LinePattern Pattern)> All()
    {
        yield return (FullScaleA, $"full scale {new Current(FullScaleA)}", PlotStyle.Of(4), LinePattern.Solid);
        if (KneeA is { } k && double.IsFinite(k))
        {
            yield return (k, $"knee {new Current(k)}", PlotStyle.Of(3), LinePattern.Dotted);
        }

        if (double.IsFinite(ReadingLimitA))
        {
            yield return (ReadingLimitA, $"reading overloads from {new Current(ReadingLimitA)}", PlotStyle.Of(1), LinePattern.Dashed);
        }

        if (DeratedFuseA is { } d)
        {
            yield return (d, $"derated fuse limit {new Current(d)}", PlotStyle.Alert, LinePattern.Dashed);
        }

        if (FuseA is { } f)
        {
            yield return (f, $"fuse rating {new Current(f)}", PlotStyle.Alert, LinePattern.Solid);
        }
    }
}

/// <summary>The R&amp;D views of one range: drop on a logarithmic current axis (where the clamp onset of a small range shows) with the runner-up
/// model drawn beside the chosen one, and resistance against current (V/I and dV/dI), each with the range's markers.</summary>
internal static class RangeViews
{
    private const int GridPoints = 300;

    /// <summary>Drop against log current with the chosen and the runner-up curve and the markers; null when fewer than two points carry current.</summary>
    public static RenderedPlot? DropLog(RangeResult range, int index, double diodeTemperatureK, RangeMarkers markers)
    {
        ArgumentNullException.ThrowIfNull(range);
        ArgumentNullException.ThrowIfNull(markers);
        var points = range.Points.Where(p => p.CurrentA > 0).OrderBy(p => p.CurrentA).ToList();
        if (points.Count < 2)
        {
            return null;
        }

        var plot = PlotStyle.Create($"Range {range.Name} ({range.Jack} jack): drop against current, logarithmic current axis", "current", SiUnit.Ampere, "drop", SiUnit.Volt);
        PlotStyle.Decades(plot.Axes.Bottom, SiUnit.Ampere);
        var xs = points.Select(p => Math.Log10(p.CurrentA)).ToArray();
        var ys = points.Select(p => p.DropVolts).ToArray();
        var measured = plot.Add.ScatterPoints(xs, ys, PlotStyle.Of(index));
        measured.MarkerSize = 7;
        measured.LegendText = "measured (mean of samples)";
        plot.Add.ErrorBar(xs, ys, points.Select(p => Finite(p.DropUncertaintyVolts)).ToArray()).Color = PlotStyle.Of(index);

        var (lo, hi) = (points[0].CurrentA, points[^1].CurrentA);
        var grid = LogGrid(lo, hi);
        if (Curve(range, diodeTemperatureK) is { } chosen)
        {
            var line = plot.Add.ScatterLine(grid.Select(Math.Log10).ToArray(), grid.Select(chosen.Drop).ToArray(), PlotStyle.Fit);
            line.LineWidth = 2;
            line.LegendText = $"chosen: {range.Model}";
        }

        var runnerUp = range.ModelComparison?.RunnerUp;
        var drewRunnerUp = false;
        if (runnerUp is not null && DropCurve.Candidate(range, runnerUp, diodeTemperatureK) is { } second)
        {
            var ysRunner = grid.Select(second.Drop).ToArray();
            if (ysRunner.All(double.IsFinite))
            {
                var line = plot.Add.ScatterLine(grid.Select(Math.Log10).ToArray(), ysRunner, PlotStyle.Of(2));
                line.LineWidth = 1.5f;
                line.LinePattern = LinePattern.Dashed;
                line.LegendText = $"runner-up: {runnerUp}{AiccGap(range, runnerUp)}";
                drewRunnerUp = true;
            }
        }

        Mark(plot, markers, lo, hi, log: true);
        plot.ShowLegend(Alignment.UpperLeft);
        return Figure.Render(
            $"drop-log-{RunPlots.Stem(range.Name)}",
            $"Range {range.Name}: measured drop (±u) on a logarithmic current axis, so the lowest decade shows (clamp-diode onset, offset) as clearly as the top; "
            + $"the chosen {range.Model} model solid{(drewRunnerUp ? $", the runner-up {runnerUp} dashed" : runnerUp is null ? " (no other model fitted)" : string.Empty)}; "
            + "vertical lines mark full scale, the knee, where the reading overloads and the fuse limits that fall near the measured currents.",
            520,
            (plot, 1f));
    }

    /// <summary>Resistance against log current: each point's V/I, and the fitted curve's V/I and incremental dV/dI; null when fewer than two points carry current.</summary>
    public static RenderedPlot? Resistance(RangeResult range, int index, double diodeTemperatureK, RangeMarkers markers)
    {
        ArgumentNullException.ThrowIfNull(range);
        ArgumentNullException.ThrowIfNull(markers);
        var points = range.Points.Where(p => p.CurrentA > 0).OrderBy(p => p.CurrentA).ToList();
        if (points.Count < 2)
        {
            return null;
        }

        var (lo, hi) = (points[0].CurrentA, points[^1].CurrentA);
        var curve = Curve(range, diodeTemperatureK);
        var grid = LogGrid(lo, hi);
        var chord = points.Select(p => p.DropVolts / p.CurrentA).ToArray();
        var chordU = points.Select(p => Finite(p.DropUncertaintyVolts) / p.CurrentA).ToArray();
        var fittedChord = curve is null ? [] : grid.Select(i => curve.Drop(i) / i).ToArray();
        var fittedSlope = curve is null ? [] : grid.Select(curve.Slope).ToArray();

        // Resistance spans decades across a knee or a clamp onset: a decade axis when every value is positive and they span more than a decade
        // (a decade axis labels only whole decades), a linear one otherwise.
        var all = chord.Concat(fittedChord).Concat(fittedSlope).ToList();
        var decades = all.All(v => v > 0 && double.IsFinite(v)) && all.Max() >= 10 * all.Min();
        double Y(double ohms) => decades ? Math.Log10(ohms) : ohms;
        var plot = PlotStyle.Create($"Range {range.Name} ({range.Jack} jack): resistance against current", "current", SiUnit.Ampere, "resistance", SiUnit.Ohm);
        PlotStyle.Decades(plot.Axes.Bottom, SiUnit.Ampere);
        if (decades)
        {
            PlotStyle.Decades(plot.Axes.Left, SiUnit.Ohm);
        }

        var xs = points.Select(p => Math.Log10(p.CurrentA)).ToArray();
        var measured = plot.Add.ScatterPoints(xs, chord.Select(Y).ToArray(), PlotStyle.Of(index));
        measured.MarkerSize = 7;
        measured.LegendText = "measured V/I";
        if (!decades)
        {
            plot.Add.ErrorBar(xs, chord, chordU).Color = PlotStyle.Of(index);
        }

        if (curve is not null)
        {
            var logGrid = grid.Select(Math.Log10).ToArray();
            var vi = plot.Add.ScatterLine(logGrid, fittedChord.Select(Y).ToArray(), PlotStyle.Fit);
            vi.LineWidth = 2;
            vi.LegendText = $"fitted V/I ({range.Model})";
            var slope = plot.Add.ScatterLine(logGrid, fittedSlope.Select(Y).ToArray(), PlotStyle.Of(index + 1));
            slope.LineWidth = 2;
            slope.LinePattern = LinePattern.Dashed;
            slope.LegendText = "fitted dV/dI (incremental)";
        }

        Mark(plot, markers, lo, hi, log: true);
        plot.ShowLegend(Alignment.UpperLeft);
        return Figure.Render(
            $"resistance-{RunPlots.Stem(range.Name)}",
            $"Range {range.Name}: the resistance the circuit sees, V/I (what a reading error follows) and dV/dI (what a small signal sees), against current. "
            + "Flat and equal for an ohmic range; rising with a heating fuse; falling where clamp diodes conduct; dV/dI jumps at a feedback knee. "
            + "The resistance axis is in decades when the values span more than one.",
            480,
            (plot, 1f));
    }

    /// <summary>Draws the markers that fall within a factor of two of the measured currents, and widens the current axis to show them.</summary>
    private static void Mark(Plot plot, RangeMarkers markers, double lo, double hi, bool log)
    {
        var left = log ? Math.Log10(lo) : lo;
        var right = log ? Math.Log10(hi) : hi;
        foreach (var (current, label, color, pattern) in markers.All())
        {
            if (!(current > 0) || current < lo / 2 || current > hi * 2)
            {
                continue;
            }

            var x = log ? Math.Log10(current) : current;
            var line = plot.Add.VerticalLine(x, 1.5f, color, pattern);
            line.LegendText = label;
            left = Math.Min(left, x);
            right = Math.Max(right, x);
        }

        var pad = (right - left) * 0.04;
        plot.Axes.SetLimitsX(left - pad, right + pad);
    }

    private static DropCurve? Curve(RangeResult range, double diodeTemperatureK)
    {
        try
        {
            var curve = DropCurve.For(range, diodeTemperatureK);
            return double.IsFinite(curve.Drop(range.Points.Max(p => p.CurrentA))) ? curve : null;
        }
        catch (InvalidDataException)
        {
            return null;
        }
    }

    private static double[] LogGrid(double lo, double hi)
    {
        var (a, b) = (Math.Log10(lo), Math.Log10(hi));
        return Enumerable.Range(0, GridPoints + 1).Select(k => Math.Pow(10, a + ((b - a) * k / GridPoints))).ToArray();
    }

    private static string AiccGap(RangeResult range, string runnerUp)
    {
        var candidates = range.ModelComparison?.Candidates;
        var chosen = candidates?.FirstOrDefault(c => c.Model == range.Model);
        var second = candidates?.FirstOrDefault(c => c.Model == runnerUp);
        return chosen is not null && second is not null && double.IsFinite(second.Aicc - chosen.Aicc)
            ? $" (ΔAICc {QuantityFormatter.Format(second.Aicc - chosen.Aicc, SiUnit.None, 3)})"
            : string.Empty;
    }

    private static double Finite(double v) => double.IsFinite(v) ? v : 0;
}

using System.Globalization;
using ScottPlot;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Reporting.Plots;

/// <summary>Draws every plot the run's records support; each plot reads the result (the journal for thermal holds) and evaluates curves only through the analysis, computing nothing new.</summary>
internal static class RunPlots
{
    /// <summary>The plots for <paramref name="run"/>, in report order; a plot whose data the result lacks is left out.</summary>
    /// <remarks>Each plot is drawn from its own ScottPlot plots and Skia surface, so they are drawn in parallel (drawing and PNG encoding were
    /// most of the report's time); the list keeps report order whatever order they finish in.</remarks>
    public static IReadOnlyList<RenderedPlot> Render(RunRecords run)
    {
        ArgumentNullException.ThrowIfNull(run);
        var result = run.Result;
        var plots = new List<Func<RenderedPlot?>>();
        for (var i = 0; i < result.Ranges.Count; i++)
        {
            var range = result.Ranges[i];
            var index = i;
            if (range.Points.Count > 0)
            {
                var markers = RangeMarkers.For(range, run);
                plots.Add(() => Drop(range, index, result.DiodeTemperatureK));
                plots.Add(() => RangeViews.DropLog(range, index, result.DiodeTemperatureK, markers));
                plots.Add(() => RangeViews.Resistance(range, index, result.DiodeTemperatureK, markers));
            }
        }

        if (result.Ranges.Any(r => r.Points.Any(p => p.CurrentA != 0 && p.DropVolts != 0)))
        {
            plots.Add(() => AllRanges(result));
        }

        if (result.Decomposition is { Count: > 0 } decomposition && decomposition.Any(j => j.Separations.Count > 0))
        {
            plots.Add(() => Decomposition(decomposition));
        }

        foreach (var range in result.Ranges)
        {
            foreach (var hold in range.Thermal ?? [])
            {
                var samples = run.Samples.Where(s => s.Range == range.Name && s.Step == hold.Step).OrderBy(s => s.Elapsed).ToList();
                if (samples.Count > 1)
                {
                    plots.Add(() => Thermal(range, hold, samples));
                }
            }
        }

        plots.Add(() => Insertion(result));
        foreach (var range in result.Ranges)
        {
            if (range.ReadingError is { Count: > 0 } errors)
            {
                plots.Add(() => ReadingError(range, errors));
            }
        }

        var rendered = new RenderedPlot?[plots.Count];
        Parallel.For(0, plots.Count, k => rendered[k] = plots[k]());
        return [.. rendered.OfType<RenderedPlot>()];
    }

    /// <summary>A file stem that is safe on every file system.</summary>
    public static string Stem(string text) =>
        string.Concat((text ?? string.Empty).Select(c => char.IsAsciiLetterOrDigit(c) || c is '-' or '_' or '.' ? c : '_'));

    private static RenderedPlot Drop(RangeResult range, int index, double diodeTemperatureK)
    {
        var points = range.Points.OrderBy(p => p.CurrentA).ToList();
        var xs = points.Select(p => p.CurrentA).ToArray();
        var u = points.Select(p => Finite(p.DropUncertaintyVolts)).ToArray();

        var top = PlotStyle.Create($"Range {range.Name} ({range.Jack} jack): drop against current", string.Empty, SiUnit.Ampere, "drop", SiUnit.Volt);
        var measured = top.Add.ScatterPoints(xs, points.Select(p => p.DropVolts).ToArray(), PlotStyle.Of(index));
        measured.MarkerSize = 7;
        measured.LegendText = "measured (mean of samples)";
        var bars = top.Add.ErrorBar(xs, points.Select(p => p.DropVolts).ToArray(), u);
        bars.Color = PlotStyle.Of(index);
        var (curveX, curveY) = FittedCurve(range, points, diodeTemperatureK);
        var fitted = top.Add.ScatterLine(curveX, curveY, PlotStyle.Fit);
        fitted.LineWidth = 2;
        fitted.LegendText = $"fitted: {range.Model}";
        MarkOutliers(top, points, p => p.DropVolts, inLegend: true);
        top.ShowLegend(Alignment.UpperLeft);

        var bottom = PlotStyle.Create(string.Empty, "current", SiUnit.Ampere, "residual", SiUnit.Volt);
        bottom.Add.HorizontalLine(0, 1, PlotStyle.Fit);
        var residuals = bottom.Add.ScatterPoints(xs, points.Select(p => p.ResidualVolts).ToArray(), PlotStyle.Of(index));
        residuals.MarkerSize = 6;
        var rbars = bottom.Add.ErrorBar(xs, points.Select(p => p.ResidualVolts).ToArray(), u);
        rbars.Color = PlotStyle.Of(index);
        MarkOutliers(bottom, points, p => p.ResidualVolts, inLegend: false);
        bottom.Axes.Link(bottom.Axes.Bottom, top.Axes.Bottom, top);
        bottom.Axes.SetLimitsX(top.Axes.GetDataLimits().Left, top.Axes.GetDataLimits().Right);
        top.Axes.SetLimitsX(top.Axes.GetDataLimits().Left, top.Axes.GetDataLimits().Right);

        return Figure.Render(
            $"drop-{Stem(range.Name)}",
            $"Range {range.Name}: measured drop (error bars ±u) with the fitted {range.Model} model, and the residuals below. Outliers, if any, are ringed in red.",
            620,
            (top, 2.2f),
            (bottom, 1f));
    }

    /// <summary>The chosen model's curve as the analysis evaluates it (<see cref="DropCurve"/>), on a fine grid over the fitted currents;
    /// the fitted values at the measured points when the analysis cannot rebuild the curve.</summary>
    private static (double[] X, double[] Y) FittedCurve(RangeResult range, List<PointResult> points, double diodeTemperatureK)
    {
        try
        {
            var curve = DropCurve.For(range, diodeTemperatureK);
            var lo = points[0].CurrentA;
            var hi = points[^1].CurrentA;
            var grid = Enumerable.Range(0, 301).Select(k => lo + ((hi - lo) * k / 300.0)).ToArray();
            var drop = grid.Select(curve.Drop).ToArray();
            if (drop.All(double.IsFinite))
            {
                return (grid, drop);
            }
        }
        catch (InvalidDataException)
        {
            // A model this build does not know: fall back to the fitted values the result holds.
        }

        return (points.Select(p => p.CurrentA).ToArray(), points.Select(p => p.DropVolts - p.ResidualVolts).ToArray());
    }

    private static void MarkOutliers(Plot plot, List<PointResult> points, Func<PointResult, double> y, bool inLegend)
    {
        var outliers = points.Where(p => p.Outlier).ToList();
        if (outliers.Count == 0)
        {
            return;
        }

        var ring = plot.Add.ScatterPoints(outliers.Select(p => p.CurrentA).ToArray(), outliers.Select(y).ToArray(), PlotStyle.Alert);
        ring.MarkerShape = MarkerShape.OpenCircle;
        ring.MarkerSize = 16;
        ring.MarkerLineWidth = 2;
        if (inLegend)
        {
            ring.LegendText = "outlier (flagged, kept)";
        }
    }

    private static RenderedPlot AllRanges(CharacterisationResult result)
    {
        var plot = PlotStyle.Create("All ranges: drop against current (log–log)", "|current|", SiUnit.Ampere, "|drop|", SiUnit.Volt);
        PlotStyle.Decades(plot.Axes.Bottom, SiUnit.Ampere);
        PlotStyle.Decades(plot.Axes.Left, SiUnit.Volt);
        for (var i = 0; i < result.Ranges.Count; i++)
        {
            var range = result.Ranges[i];
            var points = range.Points.Where(p => p.CurrentA != 0 && p.DropVolts != 0).OrderBy(p => Math.Abs(p.CurrentA)).ToList();
            if (points.Count == 0)
            {
                continue;
            }

            var xs = points.Select(p => Math.Log10(Math.Abs(p.CurrentA))).ToArray();
            var measured = plot.Add.ScatterPoints(xs, points.Select(p => Math.Log10(Math.Abs(p.DropVolts))).ToArray(), PlotStyle.Of(i));
            measured.MarkerSize = 6;
            measured.LegendText = $"{range.Name} ({range.Model})";
            var fittedPoints = points.Where(p => p.DropVolts - p.ResidualVolts != 0).ToList();
            var fitted = plot.Add.ScatterLine(
                fittedPoints.Select(p => Math.Log10(Math.Abs(p.CurrentA))).ToArray(),
                fittedPoints.Select(p => Math.Log10(Math.Abs(p.DropVolts - p.ResidualVolts))).ToArray(),
                PlotStyle.Of(i));
            fitted.LineWidth = 1.5f;
        }

        plot.ShowLegend(Alignment.UpperLeft);
        return Figure.Render(
            "all-ranges-loglog",
            "Every range on decade axes: a slope of one decade per decade is ohmic; bending up shows self-heating or a knee, flattening shows clamp diodes.",
            520,
            (plot, 1f));
    }

    private static RenderedPlot Decomposition(IReadOnlyList<JackDecomposition> jacks)
    {
        var plot = PlotStyle.Create("Series resistance: common part of the jack and shunt of each range", string.Empty, SiUnit.None, "share of the range's series resistance", SiUnit.None);
        PlotStyle.Percent(plot.Axes.Left);
        var bars = new List<Bar>();
        var positions = new List<double>();
        var labels = new List<string>();
        var position = 0.0;
        foreach (var jack in jacks)
        {
            // A shunt tap measures the split, so it is drawn unless its own check rejects it; otherwise the first consistent hypothesis.
            var separation = jack.Separations.FirstOrDefault(s => s.Method == "shunt-tap" && s.Consistent != false)
                ?? jack.Separations.FirstOrDefault(s => s.Consistent == true)
                ?? (jack.Separations.Count > 0 ? jack.Separations[0] : null);
            if (separation is null)
            {
                continue;
            }

            var common = separation.CommonSeriesOhms.Value;
            foreach (var (rangeName, shunt) in separation.ShuntOhms)
            {
                var total = common + shunt.Value;
                if (!(total > 0))
                {
                    continue;
                }

                var commonShare = 100 * common / total;
                bars.Add(new Bar { Position = position, ValueBase = 0, Value = commonShare, FillColor = PlotStyle.Of(0), Label = Ohms(common), CenterLabel = true });
                bars.Add(new Bar { Position = position, ValueBase = commonShare, Value = 100, FillColor = PlotStyle.Of(1), Label = Ohms(shunt.Value), CenterLabel = true });
                positions.Add(position);
                labels.Add($"{rangeName} ({jack.Jack})");
                position++;
            }

            position += 0.5;
        }

        plot.Add.Bars(bars);
        plot.Axes.Bottom.SetTicks([.. positions], [.. labels]);
        plot.Axes.SetLimitsY(0, 100);
        plot.Legend.ManualItems.Add(new LegendItem { LabelText = "common series part (fuse, contacts, leads)", FillColor = PlotStyle.Of(0) });
        plot.Legend.ManualItems.Add(new LegendItem { LabelText = "shunt of the range", FillColor = PlotStyle.Of(1) });
        plot.ShowLegend(Alignment.UpperRight);
        return Figure.Render(
            "decomposition",
            "Each range's series resistance split into the jack's common part and the range's own shunt (the first consistent separation hypothesis of each jack); labels give the values.",
            480,
            (plot, 1f));
    }

    /// <summary>Insertion error against source resistance, each range in a circuit whose undisturbed current is the range's full scale,
    /// as the analysis predicts it (<see cref="InsertionError.Predict"/>); null when no range has a usable curve.</summary>
    private static RenderedPlot? Insertion(CharacterisationResult result)
    {
        var plot = PlotStyle.Create("Insertion error against source resistance (undisturbed current = full scale)", "source resistance", SiUnit.Ohm, "reading error", SiUnit.None);
        PlotStyle.Decades(plot.Axes.Bottom, SiUnit.Ohm);
        PlotStyle.Percent(plot.Axes.Left);
        var drawn = 0;
        for (var i = 0; i < result.Ranges.Count; i++)
        {
            var r = result.Ranges[i];
            if (!(r.ResistanceOhms.Value > 0) || !(r.FullScaleA > 0))
            {
                continue;
            }

            var first = Math.Floor(Math.Log10(r.ResistanceOhms.Value)) - 1;
            var xs = new List<double>();
            var ys = new List<double>();
            for (var k = 0; k <= 60; k++)
            {
                var decade = first + (5.0 * k / 60);
                var ohms = Math.Pow(10, decade);
                try
                {
                    var prediction = InsertionError.Predict(result, r.FullScaleA * ohms, ohms, r.Name).Ranges[0];
                    if (double.IsFinite(prediction.RelativeError))
                    {
                        xs.Add(decade);
                        ys.Add(100 * prediction.RelativeError);
                    }
                }
                catch (ArgumentException)
                {
                    // No operating point on the fitted curve for this circuit: leave the point out.
                }
            }

            if (xs.Count > 1)
            {
                var line = plot.Add.ScatterLine(xs.ToArray(), ys.ToArray(), PlotStyle.Of(i));
                line.LineWidth = 2;
                line.LegendText = r.Name;
                drawn++;
            }
        }

        if (drawn == 0)
        {
            plot.Dispose();
            return null;
        }

        plot.Add.HorizontalLine(0, 1, PlotStyle.Fit);
        plot.ShowLegend(Alignment.LowerRight);
        return Figure.Render(
            "insertion-error",
            "What each range reads low by in a circuit of the given source resistance whose current without the meter would be the range's full scale, solved on the fitted drop curve by the analysis.",
            480,
            (plot, 1f));
    }

    private static RenderedPlot Thermal(RangeResult range, ThermalHoldResult hold, List<Sample> samples)
    {
        var t0 = samples[0].Elapsed.TotalSeconds;
        var plot = PlotStyle.Create(
            $"Range {range.Name}: thermal hold at {QuantityFormatter.Format(hold.CurrentA, SiUnit.Ampere, 3)} (step {hold.Step})",
            "time since the start of the hold", SiUnit.Second, "drop", SiUnit.Volt);
        var measured = plot.Add.SignalXY(samples.Select(s => s.Elapsed.TotalSeconds - t0).ToArray(), samples.Select(s => s.Burden.Volts).ToArray(), PlotStyle.Of(4));
        measured.LegendText = "measured samples";
        var grid = Enumerable.Range(0, 401).Select(k => hold.DurationSeconds * k / 400.0).ToArray();
        var curve = plot.Add.ScatterLine(grid, grid.Select(t => hold.SettledDropVolts.Value + hold.Terms.Sum(term => term.AmplitudeVolts.Value * Math.Exp(-t / term.TimeConstantSeconds.Value))).ToArray(), PlotStyle.Fit);
        curve.LineWidth = 2;
        curve.LegendText = $"fitted {hold.Model}";
        for (var k = 0; k < hold.Terms.Count; k++)
        {
            var term = hold.Terms[k];
            var line = plot.Add.ScatterLine(grid, grid.Select(t => hold.SettledDropVolts.Value + (term.AmplitudeVolts.Value * Math.Exp(-t / term.TimeConstantSeconds.Value))).ToArray(), PlotStyle.Of(k + 1));
            line.LineWidth = 1.5f;
            line.LegendText = $"τ = {QuantityFormatter.Format(term.TimeConstantSeconds.Value, SiUnit.Second, 3)} ({term.AttributedTo})";
        }

        plot.Add.HorizontalLine(hold.SettledDropVolts.Value, 1, PlotStyle.Of(3)).LegendText = "settled drop V∞";
        plot.ShowLegend(Alignment.LowerRight);
        return Figure.Render(
            $"thermal-{Stem(range.Name)}-step{hold.Step.ToString(CultureInfo.InvariantCulture)}",
            $"Range {range.Name}: the drop during the thermal hold of step {hold.Step} with the fitted exponentials (each term drawn on the settled drop).",
            480,
            (plot, 1f));
    }

    private static RenderedPlot ReadingError(RangeResult range, IReadOnlyList<ReadingErrorPoint> errors)
    {
        var points = errors.OrderBy(p => p.ReferenceA).ToList();
        var xs = points.Select(p => p.ReferenceA).ToArray();
        var plot = PlotStyle.Create($"Range {range.Name}: reading error against the specification", "reference current", SiUnit.Ampere, "reading − reference", SiUnit.Ampere);
        var envelope = plot.Add.FillY(xs, points.Select(p => -p.Statement.ToleranceLimit).ToArray(), points.Select(p => p.Statement.ToleranceLimit).ToArray());
        envelope.FillColor = Color.FromHex("#0F6E7A").WithAlpha(0.12);
        envelope.LineColor = Color.FromHex("#0F6E7A");
        envelope.LegendText = "specification ±(% of reading + counts)";
        plot.Add.HorizontalLine(0, 1, PlotStyle.Fit);
        var bars = plot.Add.ErrorBar(xs, points.Select(p => p.ErrorA).ToArray(), points.Select(p => Finite(p.Budget.ExpandedUncertainty)).ToArray());
        bars.Color = PlotStyle.Fit;
        var inside = points.Where(p => p.Statement.SimpleAcceptance == ConformityVerdict.Pass).ToList();
        var outside = points.Where(p => p.Statement.SimpleAcceptance != ConformityVerdict.Pass).ToList();
        if (inside.Count > 0)
        {
            var s = plot.Add.ScatterPoints(inside.Select(p => p.ReferenceA).ToArray(), inside.Select(p => p.ErrorA).ToArray(), PlotStyle.Of(0));
            s.MarkerSize = 7;
            s.LegendText = "error inside the specification (±U bars)";
        }

        if (outside.Count > 0)
        {
            var s = plot.Add.ScatterPoints(outside.Select(p => p.ReferenceA).ToArray(), outside.Select(p => p.ErrorA).ToArray(), PlotStyle.Alert);
            s.MarkerSize = 8;
            s.MarkerShape = MarkerShape.FilledDiamond;
            s.LegendText = "error outside the specification";
        }

        plot.ShowLegend(Alignment.UpperLeft);
        return Figure.Render(
            $"reading-error-{Stem(range.Name)}",
            $"Range {range.Name}: the UUT's reading error at each point with its expanded uncertainty U, inside the shaded specification envelope.",
            480,
            (plot, 1f));
    }

    private static double Finite(double v) => double.IsFinite(v) ? v : 0;

    private static string Ohms(double ohms) => QuantityFormatter.Format(ohms, SiUnit.Ohm, 3);
}

using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Analysis;

/// <summary>A range's drop split by a tap voltmeter across its shunt: the shunt's part is read directly, the jack's series part
/// (fuse, contacts) is the drop minus the tap, sample by sample; each part is fitted with the drop models on its own
/// (the tap against current, drop minus tap against current).</summary>
/// <param name="Range">The range.</param>
/// <param name="ShuntOhms">The shunt's small-signal resistance at zero current, its uncertainty covering the choice of model.</param>
/// <param name="SeriesOhms">The series part's small-signal (cold) resistance, likewise.</param>
internal sealed record TapFit(string Range, Estimate ShuntOhms, Estimate SeriesOhms);

/// <summary>Separates shunt from series part with the tap voltmeter, where the bench has one: no hypothesis about nominal values or
/// about which element heats is needed, only that the tap spans the shunt alone; the series parts of a jack's ranges must then agree.</summary>
internal static class TapSeparation
{
    /// <summary>Fits both parts of one range; null when the samples carry no tap readings (every sample of a fitted point must have one).</summary>
    /// <remarks>Thermal holds are left out: their drop is not in steady state, and the sweep points determine the split.</remarks>
    public static TapFit? Fit(string range, IReadOnlyList<Sample> samples, AnalysisOptions options)
    {
        ArgumentNullException.ThrowIfNull(samples);
        ArgumentNullException.ThrowIfNull(options);
        if (!samples.Any(s => s.ShuntTap is not null))
        {
            return null;
        }

        var steps = samples.GroupBy(s => s.Step)
            .Where(g => g.Count() < options.ThermalHoldMinimumSamples)
            .OrderBy(g => g.Key)
            .Select(g => g.ToList())
            .ToList();
        if (steps.Count == 0 || steps.Any(g => g.Any(s => s.ShuntTap is null)))
        {
            return null;
        }

        var shunt = Points(steps, s => s.ShuntTap!.Value.Volts, options);
        var series = Points(steps, s => s.Burden.Volts - s.ShuntTap!.Value.Volts, options);
        if (shunt is null || series is null)
        {
            return null;
        }

        return new TapFit(range, Resistance(shunt, options), Resistance(series, options));
    }

    /// <summary>The separation of one jack from its ranges' tap fits: each shunt from its tap, the common series part as the weighted mean
    /// of the ranges' series parts, and χ² of their agreement (they are the same fuse and contacts).</summary>
    public static Separation Separate(IReadOnlyList<TapFit> fits)
    {
        ArgumentNullException.ThrowIfNull(fits);
        var (common, chi2) = JackDecomposer.WeightedMean(fits.Select(f => f.SeriesOhms).ToList());
        var extra = new Dictionary<string, Estimate>();
        foreach (var f in fits)
        {
            extra["seriesOhms." + f.Range] = f.SeriesOhms;
        }

        return JackDecomposer.Make(
            "shunt-tap",
            "a tap voltmeter across each range's shunt reads the shunt alone; drop minus tap is the jack's series part (fuse, contacts), the same for every range of the jack",
            common,
            fits.ToDictionary(f => f.Range, f => f.ShuntOhms),
            chi2,
            fits.Count - 1,
            extra);
    }

    private static DropData? Points(List<List<Sample>> steps, Func<Sample, double> volts, AnalysisOptions options)
    {
        var points = steps.Select(g =>
        {
            var (v, sd) = PointTable.MeanSd(g.Select(volts));
            var (i, isd) = PointTable.MeanSd(g.Select(s => s.Reference.Amperes));
            return new MeasuredPoint(g[0].Step, g.Count, g[0].Setpoint.Amperes, i, isd, v, sd, double.NaN, double.NaN, 0);
        }).ToList();
        if (points.Select(p => p.CurrentA).Distinct().Count() < 3)
        {
            return null;
        }

        PointTable.AssignWeights(points, options.ScatterModelDegreesOfFreedom);
        return new DropData(
            points.Select(p => p.CurrentA).ToArray(),
            points.Select(p => p.DropVolts).ToArray(),
            points.Select(p => PointTable.Weight(p.DropUncertaintyVolts)).ToArray(),
            double.NaN);
    }

    private static Estimate Resistance(DropData data, AnalysisOptions options)
    {
        var candidates = DropModels.All(options.DiodeKelvin).Where(m => m.ParameterCount < data.Current.Length);
        var fits = DropFitter.DistinctHypotheses(candidates.Select(m => DropFitter.Fit(m, data)).ToList());
        var headline = DropFitter.HeadlineResistance(fits, DropFitter.Choose(fits, options.ModelSignificance).Chosen, options.ModelSignificance);
        return new Estimate(headline.Ohms, headline.StandardUncertainty);
    }
}

using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis;

/// <summary>Turns the samples of a run into a per-range characterisation: fitted drop against reference current, with uncertainties.</summary>
public static class Characteriser
{
    /// <summary>Analyses every range found in <paramref name="samples"/>.</summary>
    /// <param name="samples">The journal rows; points are the samples of one range sharing one step index.</param>
    /// <param name="uut">The UUT description, or null to take ranges, jacks and full scales from the samples alone.</param>
    /// <param name="options">Analysis settings; null for the defaults.</param>
    public static CharacterisationResult Analyse(IReadOnlyList<Sample> samples, UutDescription? uut, AnalysisOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(samples);
        options ??= new AnalysisOptions();
        if (samples.Count == 0)
        {
            throw new ArgumentException("There are no samples to analyse.", nameof(samples));
        }

        var ranges = new List<RangeResult>();
        foreach (var group in samples.GroupBy(s => s.Range))
        {
            var rangeSamples = group.ToList();
            var spec = uut?.Ranges.FirstOrDefault(r => r.Name == group.Key);
            var jack = spec?.Jack ?? rangeSamples[0].Jack;
            var fullScale = spec?.FullScale.Amperes ?? rangeSamples.Max(s => Math.Abs(s.Setpoint.Amperes));
            ranges.Add(AnalyseRange(group.Key, jack, fullScale, rangeSamples, options));
        }

        return new CharacterisationResult(ranges);
    }

    private static RangeResult AnalyseRange(string name, string jack, double fullScale, IReadOnlyList<Sample> samples, AnalysisOptions options)
    {
        var points = PointTable.Reduce(samples);
        if (points.Select(p => p.CurrentA).Distinct().Count() < 3)
        {
            throw new ArgumentException($"Range '{name}' has {points.Count} point(s); a drop fit needs at least 3 points at different currents.");
        }

        PointTable.AssignWeights(points, options.PooledScatterDegreesOfFreedom);
        var x = points.Select(p => p.CurrentA).ToArray();
        var y = points.Select(p => p.DropVolts).ToArray();
        var w = points.Select(p => 1.0 / (p.DropUncertaintyVolts * p.DropUncertaintyVolts)).ToArray();
        var fit = LinearLeastSquares.Polynomial(x, y, w, 1);
        var studentised = Diagnostics.StudentisedResiduals(fit.Residuals, w, fit.Leverages, fit.ChiSquare, fit.DegreesOfFreedom);
        var pointResults = points.Select((p, i) => new PointResult(
            p.Step,
            p.Samples,
            p.SetpointA,
            p.CurrentA,
            p.DropVolts,
            p.DropStdDevVolts,
            p.DropUncertaintyVolts,
            p.ReadingA,
            fit.Residuals[i],
            studentised[i],
            Math.Abs(studentised[i]) > options.OutlierThreshold)).ToList();

        return new RangeResult(
            name,
            jack,
            fullScale,
            "ohmic",
            new Estimate(fit.Parameters[1], fit.StandardUncertainty(1)),
            new Estimate(fit.Parameters[0], fit.StandardUncertainty(0)),
            Diagnostics.RootMeanSquare(fit.Residuals, fit.DegreesOfFreedom),
            fit.Parameters[0] + (fit.Parameters[1] * fullScale),
            pointResults);
    }
}

using ShuntSweep.Core.Records;

namespace ShuntSweep.Analysis;

/// <summary>One point of a range reduced from its samples: means, scatter and the weight it gets in a fit.</summary>
internal sealed record MeasuredPoint(
    int Step,
    int Samples,
    double SetpointA,
    double CurrentA,
    double CurrentStdDevA,
    double DropVolts,
    double DropStdDevVolts,
    double ReadingA,
    double ReadingStdDevA,
    int ReadingSamples)
{
    /// <summary>The standard uncertainty of the mean drop used to weight the point (set by <see cref="PointTable.AssignWeights"/>).</summary>
    public double DropUncertaintyVolts { get; set; } = double.NaN;

    /// <summary>An uncertainty fixed by another fit (a thermal hold's settled value) that weighting must keep; NaN otherwise.</summary>
    public double FixedUncertaintyVolts { get; init; } = double.NaN;
}

/// <summary>Groups samples into points (one per range and step) and derives each point's fit weight from its scatter.</summary>
internal static class PointTable
{
    /// <summary>Reduces the samples of one step to a point.</summary>
    public static MeasuredPoint Reduce(int step, IReadOnlyList<Sample> samples)
    {
        var (drop, dropSd) = MeanSd(samples.Select(s => s.Burden.Volts));
        var (current, currentSd) = MeanSd(samples.Select(s => s.Reference.Amperes));
        var (setpoint, _) = MeanSd(samples.Select(s => s.Setpoint.Amperes));
        var readings = samples.Select(s => s.UutReading).Where(double.IsFinite).ToList();
        var (reading, readingSd) = readings.Count > 0 && readings.Count == samples.Count ? MeanSd(readings) : (double.NaN, double.NaN);
        return new MeasuredPoint(step, samples.Count, setpoint, current, currentSd, drop, dropSd, reading, readingSd, readings.Count == samples.Count ? readings.Count : 0);
    }

    /// <summary>Sets each point's drop uncertainty from its own scatter, shrunk towards a smooth scatter model of the whole range.</summary>
    /// <remarks>The scatter model is s²(I) = a + b·I² (a voltmeter noise floor plus noise that grows with the drop), fitted by QR to the
    /// points' sample variances weighted by their degrees of freedom. Each point's variance is then
    /// (νᵢ·sᵢ² + ν₀·s²(Iᵢ)) / (νᵢ + ν₀): a few samples per point cannot give a trustworthy weight on their own.
    /// With no scatter anywhere (a noiseless or heavily quantised voltmeter) a point's uncertainty is unknown (NaN, written as
    /// null), every point weighs the same, and the resolution floor of the budget keeps the result's uncertainty from vanishing.</remarks>
    public static void AssignWeights(IReadOnlyList<MeasuredPoint> points, double modelDegreesOfFreedom)
    {
        var scattered = points.Where(p => p.Samples > 1 && double.IsFinite(p.DropStdDevVolts) && double.IsNaN(p.FixedUncertaintyVolts)).ToList();
        var model = ScatterModel(scattered);
        foreach (var p in points)
        {
            if (double.IsFinite(p.FixedUncertaintyVolts))
            {
                p.DropUncertaintyVolts = p.FixedUncertaintyVolts;
                continue;
            }

            var smooth = model(p.CurrentA);
            if (!(smooth > 0))
            {
                // No scatter anywhere: the points weigh equally (see Weight) and the drop meter's resolution sets the floor.
                p.DropUncertaintyVolts = double.NaN;
                continue;
            }

            var own = p.Samples > 1 && double.IsFinite(p.DropStdDevVolts) ? p.DropStdDevVolts * p.DropStdDevVolts : 0;
            var ownDof = p.Samples > 1 ? p.Samples - 1 : 0;
            var variance = ((ownDof * own) + (modelDegreesOfFreedom * smooth)) / (ownDof + modelDegreesOfFreedom);
            p.DropUncertaintyVolts = Math.Sqrt((variance > 0 ? variance : smooth) / p.Samples);
        }
    }

    /// <summary>The fit weight 1/u² of a point; 1 for every point when the scatter is unknown (all weigh the same).</summary>
    public static double Weight(double dropUncertaintyVolts) =>
        double.IsFinite(dropUncertaintyVolts) && dropUncertaintyVolts > 0 ? 1.0 / (dropUncertaintyVolts * dropUncertaintyVolts) : 1.0;

    /// <summary>The step of a quantised drop meter seen in the samples: the greatest common divisor of the differences between
    /// distinct readings (Euclid's algorithm with a tolerance); 0 when the readings show no quantisation.</summary>
    public static double InferResolution(IEnumerable<double> readings)
    {
        var distinct = readings.Where(double.IsFinite).Distinct().Order().ToArray();
        if (distinct.Length < 2)
        {
            return 0;
        }

        var scale = distinct.Max(Math.Abs);
        var tolerance = scale * 1e-9;
        var step = 0.0;
        for (var i = 1; i < distinct.Length; i++)
        {
            var d = distinct[i] - distinct[i - 1];
            var (a, b) = (Math.Max(step, d), Math.Min(step, d));
            while (b > tolerance)
            {
                (a, b) = (b, a % b);
                if (a - b <= tolerance && b > tolerance)
                {
                    b = 0;
                }
            }

            step = a;
            if (step <= scale * 1e-8)
            {
                return 0;
            }
        }

        return step;
    }

    private static Func<double, double> ScatterModel(List<MeasuredPoint> points)
    {
        var dofSum = points.Sum(p => p.Samples - 1.0);
        var pooled = dofSum > 0 ? points.Sum(p => (p.Samples - 1.0) * p.DropStdDevVolts * p.DropStdDevVolts) / dofSum : 0;
        if (!(pooled > 0) || points.Select(p => Math.Abs(p.CurrentA)).Distinct().Count() < 3)
        {
            return _ => pooled;
        }

        var x = points.Select(p => p.CurrentA * p.CurrentA).ToArray();
        var v = points.Select(p => p.DropStdDevVolts * p.DropStdDevVolts).ToArray();
        double a = pooled, b = 0;
        for (var iteration = 0; iteration < 3; iteration++)
        {
            // The variance of a sample variance is 2σ⁴/ν, so each point weighs ν/(2σ⁴) at the current model.
            var w = points.Select((p, i) => (p.Samples - 1.0) / Math.Pow(Math.Max(a + (b * x[i]), pooled * 1e-6), 2)).ToArray();
            var fit = Fitting.LinearLeastSquares.Polynomial(x, v, w, 1);
            (a, b) = (fit.Parameters[0], fit.Parameters[1]);
            if (b < 0)
            {
                (a, b) = (pooled, 0);
                break;
            }

            if (a < 0)
            {
                a = 0;
                b = v.Zip(x, (vi, xi) => vi * xi).Sum() / x.Sum(xi => xi * xi);
            }
        }

        return i => a + (b * i * i);
    }

    internal static (double Mean, double Sd) MeanSd(IEnumerable<double> values)
    {
        double mean = 0, m2 = 0;
        var n = 0;
        foreach (var v in values)
        {
            n++;
            var d = v - mean;
            mean += d / n;
            m2 += d * (v - mean);
        }

        return n switch
        {
            0 => (double.NaN, double.NaN),
            1 => (mean, double.NaN),
            _ => (mean, Math.Sqrt(m2 / (n - 1))),
        };
    }
}

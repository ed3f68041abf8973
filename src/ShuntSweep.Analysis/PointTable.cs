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
    /// <summary>Reduces the samples of one range to points, ordered by step.</summary>
    public static List<MeasuredPoint> Reduce(IEnumerable<Sample> samples) =>
        samples.GroupBy(s => s.Step).OrderBy(g => g.Key).Select(g => Reduce(g.Key, g.ToList())).ToList();

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

    /// <summary>Sets each point's drop uncertainty from its own scatter shrunk towards the pooled scatter of all points.</summary>
    /// <remarks>With no scatter anywhere (a noiseless or heavily quantised voltmeter) every point gets the same unit uncertainty,
    /// and the fit's residual scale sets the uncertainties.</remarks>
    public static void AssignWeights(IReadOnlyList<MeasuredPoint> points, double pooledDegreesOfFreedom)
    {
        double pooledSs = 0;
        var pooledDof = 0;
        foreach (var p in points)
        {
            if (p.Samples > 1 && double.IsFinite(p.DropStdDevVolts) && double.IsNaN(p.FixedUncertaintyVolts))
            {
                pooledSs += p.DropStdDevVolts * p.DropStdDevVolts * (p.Samples - 1);
                pooledDof += p.Samples - 1;
            }
        }

        var pooled = pooledDof > 0 ? pooledSs / pooledDof : 0;
        foreach (var p in points)
        {
            if (double.IsFinite(p.FixedUncertaintyVolts))
            {
                p.DropUncertaintyVolts = p.FixedUncertaintyVolts;
                continue;
            }

            if (pooled <= 0)
            {
                p.DropUncertaintyVolts = 1.0;
                continue;
            }

            var own = p.Samples > 1 ? p.DropStdDevVolts * p.DropStdDevVolts : 0;
            var ownDof = Math.Max(p.Samples - 1, 0);
            var variance = ((ownDof * own) + (pooledDegreesOfFreedom * pooled)) / (ownDof + pooledDegreesOfFreedom);
            if (!(variance > 0))
            {
                variance = pooled;
            }

            p.DropUncertaintyVolts = Math.Sqrt(variance / p.Samples);
        }
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

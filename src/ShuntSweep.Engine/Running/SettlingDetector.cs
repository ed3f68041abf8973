namespace ShuntSweep.Engine.Running;

/// <summary>Decides when a drop that is still drifting thermally has settled: the last readings agree, and the change still to come,
/// extrapolated from the geometric decay of the means of successive quarters of the later two thirds of the wait (Aitken's Δ²),
/// is within the tolerance.</summary>
/// <remarks>Agreement alone stops too early on a slow exponential: consecutive readings differ by far less than what is left of the step.
/// A first-order thermal drift decays geometrically from one quarter of the wait to the next (ratio q = e^(−T/τ)), so the change still
/// to come is d₂·q/(1 − q), with d₁, d₂ successive differences of the quarters' means and q = d₂/d₁. The quarters grow with the wait,
/// so a slow drift shows once the wait is a fair fraction of its time constant. When a fast element (a fuse) and a slow one (a shunt)
/// drift together, the ratio rises from one triple of quarters to the next until the slow element alone is left; while it still
/// clearly rises the drift is not settled, and then both triples are extrapolated and the larger answer counts. q is taken at its
/// upper bound (each difference moved by its noise towards q = 1), so noise never makes a drift look settled; differences within noise
/// count as settled, a drift that does not decay does not. A tolerance finer than the meter's noise is replaced by the noise, which is
/// all that can be shown.</remarks>
internal sealed class SettlingDetector
{
    private readonly int _window;
    private readonly double _tolerance;
    private const int Parts = 4;
    private readonly List<double> _readings = [];

    /// <summary>Creates a detector whose last <paramref name="window"/> readings must agree within the relative <paramref name="tolerance"/>.</summary>
    public SettlingDetector(int window, double tolerance)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(window, 1);
        ArgumentOutOfRangeException.ThrowIfNegative(tolerance);
        _window = window;
        _tolerance = tolerance;
    }

    /// <summary>The change still to come as last extrapolated, in the readings' unit (infinity while it cannot be bounded).</summary>
    public double RemainingChange { get; private set; } = double.PositiveInfinity;

    /// <summary>Adds a reading and tells whether the drop has now settled.</summary>
    public bool Add(double reading)
    {
        _readings.Add(reading);
        var n = _readings.Count;
        // The first third of the wait is left out: it holds the fastest part of the step, which says nothing of what is still to come.
        var quarter = (n - (n / 3)) / Parts;
        if (quarter < Math.Max(_window, 3))
        {
            return false;
        }

        // Equal quarters of the rest, ending at the last reading.
        var from = n - (Parts * quarter);
        var noiseOfMean = NoiseOfWindowMean(from, quarter);
        var noiseOfDifference = Math.Sqrt(2) * noiseOfMean;

        // A tolerance finer than the meter's own noise cannot be shown to hold: the noise sets the limit then (the range of a few
        // normal readings stays within 4.5 σ all but rarely).
        var last = _readings.GetRange(n - _window, _window);
        var limit = _tolerance * Math.Abs(last.Average());
        if (last.Max() - last.Min() > Math.Max(limit, 4.5 * noiseOfMean * Math.Sqrt(quarter)))
        {
            return false;
        }

        var means = Enumerable.Range(0, Parts).Select(k => Mean(from + (k * quarter), quarter)).ToArray();
        var d = Enumerable.Range(0, Parts - 1).Select(k => means[k + 1] - means[k]).ToArray();
        RemainingChange = StillChangingItsRate(d, noiseOfDifference)
            ? double.PositiveInfinity
            : Enumerable.Range(0, Parts - 2).Select(k => Remaining(d[k], d[k + 1], noiseOfDifference)).Max();
        return RemainingChange <= Math.Max(limit, 2 * noiseOfDifference);
    }

    /// <summary>True while the decay ratio is still clearly rising from one triple of quarters to the next: a fast and a slow element
    /// together, whose slow remainder any single-exponential extrapolation underestimates (the ratios of a sum of decays only grow).</summary>
    private static bool StillChangingItsRate(double[] d, double noise)
    {
        for (var k = 0; k + 2 < d.Length; k++)
        {
            var earlierUpper = (Math.Abs(d[k + 1]) + noise) / Math.Max(Math.Abs(d[k]) - noise, double.Epsilon);
            var laterLower = (Math.Abs(d[k + 2]) - noise) / (Math.Abs(d[k + 1]) + noise);
            if (Math.Abs(d[k + 1]) > 2 * noise && laterLower > earlierUpper)
            {
                return true;
            }
        }

        return false;
    }

    private static double Remaining(double d1, double d2, double noise)
    {
        // Both differences within twice their noise: no drift to see over the whole wait.
        if (Math.Abs(d1) <= 2 * noise && Math.Abs(d2) <= 2 * noise)
        {
            return Math.Abs(d2);
        }

        // The ratio at its upper bound: each difference moved by its noise towards q = 1.
        var a1 = Math.Abs(d1) - noise;
        var a2 = Math.Abs(d2) + noise;
        if (Math.Sign(d1) != Math.Sign(d2) || a1 <= 0 || a2 >= a1)
        {
            // Not (yet) a decaying drift: a ramp, an accelerating change or a reversal has no limit to extrapolate to.
            return double.PositiveInfinity;
        }

        var q = a2 / a1;
        return a2 * q / (1 - q);
    }

    private double Mean(int from, int count)
    {
        var sum = 0.0;
        for (var i = from; i < from + count; i++)
        {
            sum += _readings[i];
        }

        return sum / count;
    }

    /// <summary>The standard deviation of one window's mean, from the second differences of the readings in the last window, where the
    /// drift is least: a second difference cancels a level and a slope, and its variance is 6σ² for independent readings.</summary>
    private double NoiseOfWindowMean(int from, int count)
    {
        var start = from + ((Parts - 1) * count);
        double sum = 0;
        for (var i = start + 1; i < start + count - 1; i++)
        {
            var d = _readings[i + 1] - (2 * _readings[i]) + _readings[i - 1];
            sum += d * d;
        }

        var variance = sum / (count - 2) / 6;
        return Math.Sqrt(variance / count);
    }
}

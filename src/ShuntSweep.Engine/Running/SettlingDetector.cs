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

    // Running sums, so that each reading costs the same however long the wait: Σ readings, and Σ squared second differences.
    private readonly List<double> _sums = [0];
    private readonly List<double> _curvatureSums = [0, 0];

    /// <summary>Creates a detector whose last <paramref name="window"/> readings must agree within the relative <paramref name="tolerance"/>.</summary>
    public SettlingDetector(int window, double tolerance)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(window, 1);
        ArgumentOutOfRangeException.ThrowIfNegative(tolerance);
        _window = window;
        _tolerance = tolerance;
    }

    /// <summary>The fewest readings on which a detector over <paramref name="window"/> agreeing readings can decide: four windows of
    /// max(window, 3) readings after the first third of the wait.</summary>
    public static int MinimumReadings(int window)
    {
        var n = 1;
        while ((n - (n / 3)) / Parts < Math.Max(window, 3))
        {
            n++;
        }

        return n;
    }

    /// <summary>The limit the last decision was held to, in the readings' unit: the tolerance, or the meter's noise where that is larger.</summary>
    public double Limit { get; private set; } = double.NaN;

    /// <summary>The change still to come as last extrapolated, in the readings' unit (infinity while it cannot be bounded).</summary>
    public double RemainingChange { get; private set; } = double.PositiveInfinity;

    /// <summary>Adds a reading and tells whether the drop has now settled.</summary>
    public bool Add(double reading)
    {
        _readings.Add(reading);
        var n = _readings.Count;
        _sums.Add(_sums[^1] + reading);
        if (n >= 3)
        {
            var second = _readings[n - 1] - (2 * _readings[n - 2]) + _readings[n - 3];
            _curvatureSums.Add(_curvatureSums[^1] + (second * second));
        }

        // The first third of the wait is left out: it holds the fastest part of the step, which says nothing of what is still to come.
        var quarter = (n - (n / 3)) / Parts;
        if (quarter < Math.Max(_window, 3))
        {
            return false;
        }

        // Equal quarters of the rest, ending at the last reading.
        var from = n - (Parts * quarter);
        var noiseOfMean = NoiseOfWindowMean(from, quarter);
        // Running sums round at about 1e-16 of the level; differences below a part in 10¹² of it are that rounding, not drift.
        var noiseOfDifference = Math.Max(Math.Sqrt(2) * noiseOfMean, 1e-12 * Math.Abs(Mean(from, Parts * quarter)));

        // A tolerance finer than the meter's own noise cannot be shown to hold: the noise sets the limit then (the range of a few
        // normal readings stays within 4.5 σ all but rarely).
        var last = _readings.GetRange(n - _window, _window);
        var limit = _tolerance * Math.Abs(Mean(n - _window, _window));
        if (last.Max() - last.Min() > Math.Max(limit, 4.5 * noiseOfMean * Math.Sqrt(quarter)))
        {
            return false;
        }

        var means = Enumerable.Range(0, Parts).Select(k => Mean(from + (k * quarter), quarter)).ToArray();
        var d = Enumerable.Range(0, Parts - 1).Select(k => means[k + 1] - means[k]).ToArray();
        RemainingChange = StillChangingItsRate(d, noiseOfDifference)
            ? double.PositiveInfinity
            : Enumerable.Range(0, Parts - 2).Select(k => Remaining(d[k], d[k + 1], noiseOfDifference)).Max();
        Limit = Math.Max(limit, 2 * noiseOfDifference);
        return RemainingChange <= Limit;
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

        // A later difference of the other sign that is more than noise is a reversal: no limit to extrapolate to.
        if (Math.Sign(d1) != Math.Sign(d2) && Math.Abs(d2) > 2 * noise)
        {
            return double.PositiveInfinity;
        }

        // The ratio at its upper bound: each difference moved by its noise towards q = 1.
        var a1 = Math.Abs(d1) - noise;
        var a2 = Math.Abs(d2) + noise;
        if (a1 <= 0 || a2 >= a1)
        {
            // Not (yet) a decaying drift: a ramp or an accelerating change has no limit to extrapolate to.
            return double.PositiveInfinity;
        }

        var q = a2 / a1;
        return a2 * q / (1 - q);
    }

    private double Mean(int from, int count) => (_sums[from + count] - _sums[from]) / count;

    /// <summary>The standard deviation of one window's mean, from the second differences of the readings in the last window, where the
    /// drift is least: a second difference cancels a level and a slope, and its variance is 6σ² for independent readings.</summary>
    private double NoiseOfWindowMean(int from, int count)
    {
        // _curvatureSums[i] sums the second differences centred on readings 1 … i − 1; the last window's are centred on start + 1 … start + count − 2.
        var start = from + ((Parts - 1) * count);
        var sum = _curvatureSums[start + count - 1] - _curvatureSums[start + 1];
        var variance = sum / (count - 2) / 6;
        return Math.Sqrt(variance / count);
    }
}

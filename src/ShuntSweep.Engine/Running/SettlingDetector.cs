namespace ShuntSweep.Engine.Running;

/// <summary>Decides when a drop that is still drifting thermally has settled: the last readings agree, and the change still to come,
/// extrapolated from the geometric decay of the means of successive quarters of the wait (Aitken's Δ²), is within the tolerance.</summary>
/// <remarks>Agreement alone stops too early on a slow exponential: consecutive readings differ by far less than what is left of the step.
/// A first-order thermal drift decays geometrically from one quarter of the wait to the next (ratio q = e^(−T/τ)), so the change still
/// to come is d₂·q/(1 − q), with d₁, d₂ successive differences of the quarters' means and q = d₂/d₁. The quarters grow with the wait,
/// so a slow drift shows once the wait is a fair fraction of its time constant. Both triples of quarters are extrapolated and the
/// larger answer counts: when a fast element (a fuse) and a slow one (a shunt) drift together, the latest triple alone still sees the
/// fast decay in its first difference and underestimates the slow remainder. q is taken at its upper bound (each difference moved by
/// its noise towards q = 1), so noise never makes a drift look settled; differences within noise count as settled, a drift that does
/// not decay does not.</remarks>
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
        var quarter = n / Parts;
        if (quarter < Math.Max(_window, 3))
        {
            return false;
        }

        var last = _readings.GetRange(n - _window, _window);
        var limit = _tolerance * Math.Abs(last.Average());
        if (last.Max() - last.Min() > limit)
        {
            return false;
        }

        // Equal quarters ending at the last reading (the oldest n mod 4 readings are left out).
        var from = n - (Parts * quarter);
        var means = Enumerable.Range(0, Parts).Select(k => Mean(from + (k * quarter), quarter)).ToArray();
        var noise = Math.Sqrt(2) * NoiseOfWindowMean(from, quarter);
        RemainingChange = Enumerable.Range(0, Parts - 2)
            .Select(k => Remaining(means[k + 1] - means[k], means[k + 2] - means[k + 1], noise))
            .Max();
        return RemainingChange <= limit;
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

    /// <summary>The standard deviation of one window's mean, from the scatter of the readings about each window's own straight line.</summary>
    private double NoiseOfWindowMean(int from, int count)
    {
        double sum = 0;
        var dof = 0;
        for (var w = 0; w < Parts; w++)
        {
            var start = from + (w * count);
            var xm = (count - 1) / 2.0;
            var ym = Mean(start, count);
            double sxy = 0, sxx = 0;
            for (var i = 0; i < count; i++)
            {
                sxy += (i - xm) * (_readings[start + i] - ym);
                sxx += (i - xm) * (i - xm);
            }

            var slope = sxy / sxx;
            for (var i = 0; i < count; i++)
            {
                var e = _readings[start + i] - ym - (slope * (i - xm));
                sum += e * e;
            }

            dof += count - 2;
        }

        return Math.Sqrt(sum / dof / count);
    }
}

using System.Runtime.CompilerServices;

namespace ShuntSweep.Analysis.Uncertainty;

/// <summary>The JCGM 101:2008 Monte Carlo propagation of distributions, and its validation of the GUM result (JCGM 101 §8).</summary>
/// <param name="Trials">The number of Monte Carlo trials M.</param>
/// <param name="Mean">The mean of the output values.</param>
/// <param name="StandardUncertainty">Their standard deviation.</param>
/// <param name="Low">The lower end of the probabilistically symmetric coverage interval.</param>
/// <param name="High">The upper end.</param>
/// <param name="Tolerance">The numerical tolerance δ from two significant digits of u_c (JCGM 101 8.2).</param>
/// <param name="AgreesWithGum">Whether |y − U − low| and |y + U − high| are both within δ (JCGM 101 8.1).</param>
public sealed record MonteCarloCheck(int Trials, double Mean, double StandardUncertainty, double Low, double High, double Tolerance, bool AgreesWithGum)
{
    /// <summary>Propagates the input distributions through <paramref name="f"/> and compares with <paramref name="gum"/>.</summary>
    public static MonteCarloCheck Run(Func<double[], double> f, IReadOnlyList<InputQuantity> inputs, GumBudget gum, int trials, int seed)
    {
        ArgumentNullException.ThrowIfNull(f);
        ArgumentNullException.ThrowIfNull(inputs);
        ArgumentNullException.ThrowIfNull(gum);
        var y = Propagate(f, inputs, trials, seed);
        var mean = 0.0;
        foreach (var v in y)
        {
            mean += v;
        }

        mean /= trials;
        var ss = 0.0;
        foreach (var v in y)
        {
            ss += (v - mean) * (v - mean);
        }

        var sd = Math.Sqrt(ss / (trials - 1));
        var p = gum.CoverageProbability;
        var low = Quantile(y, (1 - p) / 2);
        var high = Quantile(y, (1 + p) / 2);
        var delta = NumericalTolerance(gum.CombinedStandardUncertainty);
        var agrees = Math.Abs(gum.Value - gum.ExpandedUncertainty - low) <= delta && Math.Abs(gum.Value + gum.ExpandedUncertainty - high) <= delta;
        return new MonteCarloCheck(trials, mean, sd, low, high, delta, agrees);
    }

    /// <summary>The Monte Carlo result as a budget for a decision: the GUM estimate and lines, the Monte Carlo standard deviation, and
    /// U the larger distance from the estimate to an end of the Monte Carlo interval (so ±U covers it), k = U/u.</summary>
    public GumBudget AsBudget(GumBudget gum)
    {
        ArgumentNullException.ThrowIfNull(gum);
        var u = Math.Max(gum.Value - Low, High - gum.Value);
        return gum with
        {
            CombinedStandardUncertainty = StandardUncertainty,
            CoverageFactor = StandardUncertainty > 0 ? u / StandardUncertainty : double.NaN,
            ExpandedUncertainty = u,
        };
    }

    /// <summary>δ = ½·10^ℓ where u_c = c·10^ℓ with c a two-digit integer (JCGM 101 7.9.2, with n_dig = 2).</summary>
    public static double NumericalTolerance(double combined)
    {
        if (!(combined > 0))
        {
            return 0;
        }

        var l = Math.Floor(Math.Log10(combined)) - 1;
        return 0.5 * Math.Pow(10, l);
    }

    /// <summary>The M output values, one per trial (JCGM 101 7.6).</summary>
    /// <remarks>Optimised at once rather than tiered: it runs millions of draws the first time it is called.</remarks>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static double[] Propagate(Func<double[], double> f, IReadOnlyList<InputQuantity> inputs, int trials, int seed)
    {
        var sampler = new Sampler(seed);
        var y = new double[trials];
        var x = new double[inputs.Count];
        var q = inputs.ToArray();
        for (var t = 0; t < trials; t++)
        {
            for (var i = 0; i < x.Length; i++)
            {
                x[i] = sampler.Draw(q[i]);
            }

            y[t] = f(x);
        }

        return y;
    }

    /// <summary>The q-quantile with linear interpolation between order statistics, found by selection (the values are reordered, not sorted).</summary>
    internal static double Quantile(double[] values, double q)
    {
        var pos = q * (values.Length - 1);
        var lo = (int)Math.Floor(pos);
        var at = Select(values, lo);
        if (lo + 1 >= values.Length)
        {
            return at;
        }

        // After selection every value right of lo is at least values[lo]; the smallest of them is the next order statistic.
        var next = double.PositiveInfinity;
        for (var i = lo + 1; i < values.Length; i++)
        {
            next = Math.Min(next, values[i]);
        }

        return at + ((pos - lo) * (next - at));
    }

    /// <summary>Hoare's selection (FIND, CACM 4 (1961) 321): reorders <paramref name="a"/> so that a[k] is its k-th smallest value, smaller ones left.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static double Select(double[] a, int k)
    {
        int left = 0, right = a.Length - 1;
        while (left < right)
        {
            var pivot = a[left + ((right - left) / 2)];
            int i = left, j = right;
            while (i <= j)
            {
                while (a[i] < pivot)
                {
                    i++;
                }

                while (a[j] > pivot)
                {
                    j--;
                }

                if (i <= j)
                {
                    (a[i], a[j]) = (a[j], a[i]);
                    i++;
                    j--;
                }
            }

            if (k <= j)
            {
                right = j;
            }
            else if (k >= i)
            {
                left = i;
            }
            else
            {
                break;
            }
        }

        return a[k];
    }

    /// <summary>Draws from the input distributions (JCGM 101 6.4): Gaussian by Box–Muller using both values of each pair, and the t
    /// distribution as z/√(χ²_ν/ν) with χ²_ν = 2·Γ(ν/2) drawn by Marsaglia and Tsang's method, so a non-integer ν is drawn as it is.</summary>
    private sealed class Sampler(int seed)
    {
        private readonly Random _rng = new(seed);
        private double _spare;
        private bool _hasSpare;

        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        public double Draw(InputQuantity q)
        {
            if (q.StandardUncertainty == 0)
            {
                return q.Value;
            }

            return q.Distribution switch
            {
                InputDistribution.Rectangular => q.Value + (Math.Sqrt(3) * q.StandardUncertainty * ((2 * _rng.NextDouble()) - 1)),

                // JCGM 101 6.4.9.7: x̄ + (s/√n)·t_ν.
                InputDistribution.StudentT when double.IsFinite(q.DegreesOfFreedom) =>
                    q.Value + (q.StandardUncertainty * Gaussian() / Math.Sqrt(2 * Gamma(q.DegreesOfFreedom / 2) / q.DegreesOfFreedom)),
                _ => q.Value + (q.StandardUncertainty * Gaussian()),
            };
        }

        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        private double Gaussian()
        {
            if (_hasSpare)
            {
                _hasSpare = false;
                return _spare;
            }

            var radius = Math.Sqrt(-2.0 * Math.Log(1.0 - _rng.NextDouble()));
            var (sin, cos) = Math.SinCos(2.0 * Math.PI * _rng.NextDouble());
            _spare = radius * sin;
            _hasSpare = true;
            return radius * cos;
        }

        /// <summary>A Γ(shape, 1) variate (G. Marsaglia and W. W. Tsang, ACM TOMS 26 (2000) 363–372); shape &lt; 1 through Γ(shape + 1)·U^(1/shape).</summary>
        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        private double Gamma(double shape)
        {
            if (shape < 1)
            {
                return Gamma(shape + 1) * Math.Pow(1.0 - _rng.NextDouble(), 1 / shape);
            }

            var d = shape - (1.0 / 3);
            var c = 1 / Math.Sqrt(9 * d);
            while (true)
            {
                double z, v;
                do
                {
                    z = Gaussian();
                    v = 1 + (c * z);
                }
                while (v <= 0);

                v = v * v * v;
                var u = 1.0 - _rng.NextDouble();
                if (u < 1 - (0.0331 * z * z * z * z) || Math.Log(u) < (0.5 * z * z) + (d * (1 - v + Math.Log(v))))
                {
                    return d * v;
                }
            }
        }
    }
}

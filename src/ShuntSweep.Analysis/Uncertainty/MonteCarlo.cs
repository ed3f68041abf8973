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
        var rng = new Random(seed);
        var y = new double[trials];
        var x = new double[inputs.Count];
        for (var t = 0; t < trials; t++)
        {
            for (var i = 0; i < x.Length; i++)
            {
                x[i] = Draw(inputs[i], rng);
            }

            y[t] = f(x);
        }

        var mean = y.Average();
        var sd = Math.Sqrt(y.Sum(v => (v - mean) * (v - mean)) / (trials - 1));
        Array.Sort(y);
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

    private static double Quantile(double[] sorted, double q)
    {
        var pos = q * (sorted.Length - 1);
        var lo = (int)Math.Floor(pos);
        var hi = Math.Min(lo + 1, sorted.Length - 1);
        return sorted[lo] + ((pos - lo) * (sorted[hi] - sorted[lo]));
    }

    private static double Draw(InputQuantity q, Random rng)
    {
        switch (q.Distribution)
        {
            case InputDistribution.Rectangular:
                return q.Value + (Math.Sqrt(3) * q.StandardUncertainty * ((2 * rng.NextDouble()) - 1));
            case InputDistribution.StudentT when double.IsFinite(q.DegreesOfFreedom):
                {
                    // JCGM 101 6.4.9.7: x̄ + (s/√n)·t_ν, t_ν = z/√(χ²_ν/ν).
                    var nu = q.DegreesOfFreedom;
                    var chi2 = 0.0;
                    var whole = (int)Math.Floor(nu);
                    for (var k = 0; k < whole; k++)
                    {
                        var g = Gaussian(rng);
                        chi2 += g * g;
                    }

                    return q.Value + (q.StandardUncertainty * Gaussian(rng) / Math.Sqrt(chi2 / whole));
                }

            default:
                return q.Value + (q.StandardUncertainty * Gaussian(rng));
        }
    }

    private static double Gaussian(Random rng)
    {
        var u1 = 1.0 - rng.NextDouble();
        var u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2.0 * Math.PI * u2);
    }
}

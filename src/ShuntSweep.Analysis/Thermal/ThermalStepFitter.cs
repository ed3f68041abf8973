using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Analysis.Thermal;

/// <summary>Fits one and two exponentials to the drop against time of a thermal hold and keeps the one the data support.</summary>
internal static class ThermalStepFitter
{
    /// <summary>Fits the hold; returns null when the drop shows no settling (no exponential beats a constant).</summary>
    /// <param name="time">Seconds since the first sample of the hold.</param>
    /// <param name="drop">The burden samples, V.</param>
    /// <param name="step">The hold's step index.</param>
    /// <param name="currentA">The hold's mean current.</param>
    public static ThermalHoldResult? Fit(double[] time, double[] drop, int step, double currentA)
    {
        ArgumentNullException.ThrowIfNull(time);
        ArgumentNullException.ThrowIfNull(drop);
        var n = time.Length;
        if (n < 8 || time[^1] <= time[0])
        {
            return null;
        }

        var span = time[^1] - time[0];
        var tail = Math.Max(n / 20, 3);
        var vinf = drop.TakeLast(tail).Average();
        var head = Math.Max(n / 100, 1);
        var a0 = drop.Take(head).Average() - vinf;
        var tau0 = span / 3;
        for (var i = 0; i < n; i++)
        {
            if (Math.Abs(drop[i] - vinf) < Math.Abs(a0) / Math.E)
            {
                tau0 = Math.Max(time[i] - time[0], span / n);
                break;
            }
        }

        var constantChi2 = 0.0;
        var mean = drop.Average();
        foreach (var v in drop)
        {
            constantChi2 += (v - mean) * (v - mean);
        }

        NonlinearFit? one;
        try
        {
            one = LevenbergMarquardt.Fit(new ExponentialSum(1), time, drop, [], [vinf, a0, tau0], p => p[2] > 0 && p[2] < 100 * span);
        }
        catch (FitFailedException)
        {
            return null;
        }

        var fOne = (constantChi2 - one.ChiSquare) / 2 / (one.ChiSquare / one.DegreesOfFreedom);
        if (!(fOne > 25))
        {
            return null;
        }

        NonlinearFit? two = null;
        var useTwo = false;
        foreach (var (fastShare, fastRatio) in new[] { (0.5, 0.2), (0.7, 0.05) })
        {
            double[] start = [one.Parameters[0], one.Parameters[1] * fastShare, one.Parameters[2] * fastRatio, one.Parameters[1] * (1 - fastShare), one.Parameters[2] * 1.5];
            try
            {
                var t = LevenbergMarquardt.Fit(new ExponentialSum(2), time, drop, [], start, p => p[2] > 0 && p[4] > 0 && p[4] < 100 * span);
                if (two is null || t.ChiSquare < two.ChiSquare)
                {
                    two = t;
                }
            }
            catch (FitFailedException)
            {
                // The two-term model is not determined from this start; try the next, or keep the single term.
                continue;
            }

            useTwo = Supported(one, two);
            if (useTwo)
            {
                break;
            }
        }

        var fit = useTwo ? two! : one;
        var terms = Enumerable.Range(0, useTwo ? 2 : 1)
            .Select(k => new ThermalTerm(
                new Estimate(fit.Parameters[1 + (2 * k)], fit.StandardUncertainty(1 + (2 * k))),
                new Estimate(fit.Parameters[2 + (2 * k)], fit.StandardUncertainty(2 + (2 * k))),
                string.Empty))
            .OrderBy(t => t.TimeConstantSeconds.Value)
            .ToList();
        if (useTwo)
        {
            terms[0] = terms[0] with { AttributedTo = "fuse (fast element)" };
            terms[1] = terms[1] with { AttributedTo = "shunt and body (slow element)" };
        }
        else
        {
            terms[0] = terms[0] with { AttributedTo = "fuse or shunt (one term resolved; not separable)" };
        }

        return new ThermalHoldResult(
            step,
            n,
            currentA,
            span,
            useTwo ? "two-exponential" : "one-exponential",
            new Estimate(fit.Parameters[0], fit.StandardUncertainty(0)),
            terms,
            fit.ResidualStdDev);
    }

    /// <summary>Two terms are kept when the F-test against one term gives p &lt; 0.001, both terms are resolved (&gt; 3 u) and their τ differ by more than 1.5×.</summary>
    private static bool Supported(NonlinearFit one, NonlinearFit two)
    {
        var f = (one.ChiSquare - two.ChiSquare) / 2 / (two.ChiSquare / two.DegreesOfFreedom);
        var p = 1 - MathNet.Numerics.Distributions.FisherSnedecor.CDF(2, two.DegreesOfFreedom, Math.Max(f, 0));
        var resolved = Enumerable.Range(0, 2).All(k => Math.Abs(two.Parameters[1 + (2 * k)]) > 3 * two.StandardUncertainty(1 + (2 * k))
            && two.Parameters[2 + (2 * k)] > 3 * two.StandardUncertainty(2 + (2 * k)));
        var distinct = Math.Abs(Math.Log(two.Parameters[2] / two.Parameters[4])) > Math.Log(1.5);
        return p < 0.001 && resolved && distinct;
    }
}

namespace ShuntSweep.Analysis.Fitting;

/// <summary>Residual diagnostics shared by the linear and nonlinear fits.</summary>
internal static class Diagnostics
{
    /// <summary>Externally studentised residuals eᵢ√wᵢ / (s₍ᵢ₎√(1 − hᵢᵢ)), s₍ᵢ₎ being the residual scale without point i.</summary>
    public static double[] StudentisedResiduals(IReadOnlyList<double> residuals, IReadOnlyList<double> weights, IReadOnlyList<double> leverages, double chiSquare, int dof)
    {
        var t = new double[residuals.Count];
        for (var i = 0; i < t.Length; i++)
        {
            var oneMinusH = 1.0 - leverages[i];
            var we2 = weights[i] * residuals[i] * residuals[i];
            if (dof < 2 || oneMinusH <= 1e-12)
            {
                t[i] = double.NaN;
                continue;
            }

            var s2 = Math.Max((chiSquare - (we2 / oneMinusH)) / (dof - 1), 0);
            t[i] = s2 > 0 ? residuals[i] * Math.Sqrt(weights[i]) / Math.Sqrt(s2 * oneMinusH) : double.NaN;
        }

        return t;
    }

    /// <summary>The unweighted residual standard deviation sqrt(Σe²/ν), in the units of the observations.</summary>
    public static double RootMeanSquare(IReadOnlyList<double> residuals, int dof)
    {
        var s = 0.0;
        foreach (var e in residuals)
        {
            s += e * e;
        }

        return Math.Sqrt(s / dof);
    }
}

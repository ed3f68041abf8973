namespace ShuntSweep.Analysis.Fitting;

/// <summary>The law of propagation of uncertainty for a function of correlated estimates (JCGM 100 §5.2), with a central-difference gradient.</summary>
internal static class Propagation
{
    /// <summary>The variance of g(x) for estimates <paramref name="x"/> with covariance <paramref name="covariance"/>.</summary>
    public static double Variance(Func<double[], double> g, double[] x, double[,] covariance)
    {
        ArgumentNullException.ThrowIfNull(g);
        ArgumentNullException.ThrowIfNull(x);
        ArgumentNullException.ThrowIfNull(covariance);
        var m = x.Length;
        var grad = Gradient(g, x, covariance);
        var v = 0.0;
        for (var i = 0; i < m; i++)
        {
            for (var j = 0; j < m; j++)
            {
                v += grad[i] * covariance[i, j] * grad[j];
            }
        }

        return Math.Max(v, 0);
    }

    /// <summary>The central-difference gradient of g at <paramref name="x"/>, each step a thousandth of that estimate's standard uncertainty.</summary>
    public static double[] Gradient(Func<double[], double> g, double[] x, double[,] covariance)
    {
        ArgumentNullException.ThrowIfNull(g);
        ArgumentNullException.ThrowIfNull(x);
        ArgumentNullException.ThrowIfNull(covariance);
        var m = x.Length;
        var grad = new double[m];
        var q = (double[])x.Clone();
        for (var j = 0; j < m; j++)
        {
            var h = Math.Max(Math.Sqrt(Math.Max(covariance[j, j], 0)) * 1e-3, Math.Abs(x[j]) * 1e-9) + 1e-300;
            q[j] = x[j] + h;
            var up = g(q);
            q[j] = x[j] - h;
            var down = g(q);
            q[j] = x[j];
            grad[j] = (up - down) / (2 * h);
        }

        return grad;
    }
}

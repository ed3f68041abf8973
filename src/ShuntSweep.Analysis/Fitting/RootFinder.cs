namespace ShuntSweep.Analysis.Fitting;

/// <summary>Brent's bracketed root finder: as safe as bisection, usually as fast as the secant method.</summary>
internal static class RootFinder
{
    /// <summary>Finds x in [<paramref name="a"/>, <paramref name="b"/>] with f(x) = 0; f(a) and f(b) must differ in sign.</summary>
    /// <exception cref="ArgumentException">When the interval does not bracket a root.</exception>
    public static double Brent(Func<double, double> f, double a, double b, double tolerance = 0, int maxIterations = 200)
    {
        ArgumentNullException.ThrowIfNull(f);
        var fa = f(a);
        var fb = f(b);
        if (fa == 0)
        {
            return a;
        }

        if (fb == 0)
        {
            return b;
        }

        if (Math.Sign(fa) == Math.Sign(fb) || double.IsNaN(fa) || double.IsNaN(fb))
        {
            throw new ArgumentException($"The interval [{a:G6}, {b:G6}] does not bracket a root (f = {fa:G6} and {fb:G6}).");
        }

        var c = a;
        var fc = fa;
        var d = b - a;
        var e = d;
        for (var iter = 0; iter < maxIterations; iter++)
        {
            if (Math.Sign(fb) == Math.Sign(fc))
            {
                c = a;
                fc = fa;
                d = b - a;
                e = d;
            }

            if (Math.Abs(fc) < Math.Abs(fb))
            {
                a = b;
                b = c;
                c = a;
                fa = fb;
                fb = fc;
                fc = fa;
            }

            var tol = (2 * double.Epsilon) + (4 * 2.220446049250313e-16 * Math.Abs(b)) + (0.5 * tolerance);
            var m = 0.5 * (c - b);
            if (Math.Abs(m) <= tol || fb == 0)
            {
                return b;
            }

            if (Math.Abs(e) >= tol && Math.Abs(fa) > Math.Abs(fb))
            {
                double p, q;
                var s = fb / fa;
                if (a == c)
                {
                    p = 2 * m * s;
                    q = 1 - s;
                }
                else
                {
                    var qq = fa / fc;
                    var r = fb / fc;
                    p = s * ((2 * m * qq * (qq - r)) - ((b - a) * (r - 1)));
                    q = (qq - 1) * (r - 1) * (s - 1);
                }

                if (p > 0)
                {
                    q = -q;
                }
                else
                {
                    p = -p;
                }

                if (2 * p < Math.Min((3 * m * q) - Math.Abs(tol * q), Math.Abs(e * q)))
                {
                    e = d;
                    d = p / q;
                }
                else
                {
                    d = m;
                    e = m;
                }
            }
            else
            {
                d = m;
                e = m;
            }

            a = b;
            fa = fb;
            b += Math.Abs(d) > tol ? d : (m > 0 ? tol : -tol);
            fb = f(b);
        }

        return b;
    }
}

using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests.Fitting;

public sealed class LevenbergMarquardtTests
{
    [Theory]
    // NIST StRD nonlinear regression, data/reference/nist-strd/<Name>.dat: Misra1a is of lower difficulty (≥ 6 digits),
    // Thurber of higher difficulty (≥ 4 digits); both from the file's start 1 and start 2.
    [InlineData("Misra1a", 0, 6.0)]
    [InlineData("Misra1a", 1, 6.0)]
    [InlineData("Thurber", 0, 4.0)]
    [InlineData("Thurber", 1, 4.0)]
    public void Fit_MatchesNistCertifiedValues_FromBothStarts(string dataset, int start, double digits)
    {
        var d = StrdDataset.Load(dataset);
        IModelFunction model = dataset == "Misra1a" ? new Misra1a() : new Thurber();

        var fit = LevenbergMarquardt.Fit(model, d.X, d.Y, [], d.Starts[start]);

        for (var j = 0; j < d.Certified.Length; j++)
        {
            Assert.True(StrdDataset.Digits(fit.Parameters[j], d.Certified[j]) >= digits, $"{dataset} b{j + 1}: {fit.Parameters[j]:R} vs {d.Certified[j]:R}");
            Assert.True(StrdDataset.Digits(fit.StandardUncertainty(j), d.CertifiedSd[j]) >= digits, $"{dataset} SD(b{j + 1}): {fit.StandardUncertainty(j):R} vs {d.CertifiedSd[j]:R}");
        }

        Assert.True(StrdDataset.Digits(fit.ResidualStdDev, d.ResidualSd) >= digits, $"{dataset} residual SD {fit.ResidualStdDev:R} vs {d.ResidualSd:R}");
    }

    [Fact]
    public void Fit_Throws_WhenParametersAreNotDetermined()
    {
        // y = b1·exp(b2·x) on a single repeated x cannot separate b1 from b2.
        double[] x = [1, 1, 1, 1, 1];
        double[] y = [2, 2.1, 1.9, 2, 2.05];

        Assert.Throws<FitFailedException>(() => LevenbergMarquardt.Fit(new Exponential(), x, y, [], [1.0, 0.5]));
    }

    private sealed class Misra1a : IModelFunction
    {
        public int ParameterCount => 2;

        public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> g)
        {
            var e = Math.Exp(-p[1] * x);
            if (!g.IsEmpty)
            {
                g[0] = 1 - e;
                g[1] = p[0] * x * e;
            }

            return p[0] * (1 - e);
        }
    }

    private sealed class Thurber : IModelFunction
    {
        public int ParameterCount => 7;

        public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> g)
        {
            var num = p[0] + (p[1] * x) + (p[2] * x * x) + (p[3] * x * x * x);
            var den = 1 + (p[4] * x) + (p[5] * x * x) + (p[6] * x * x * x);
            var f = num / den;
            if (!g.IsEmpty)
            {
                g[0] = 1 / den;
                g[1] = x / den;
                g[2] = x * x / den;
                g[3] = x * x * x / den;
                g[4] = -f * x / den;
                g[5] = -f * x * x / den;
                g[6] = -f * x * x * x / den;
            }

            return f;
        }
    }

    private sealed class Exponential : IModelFunction
    {
        public int ParameterCount => 2;

        public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> g)
        {
            var f = p[0] * Math.Exp(p[1] * x);
            if (!g.IsEmpty)
            {
                g[0] = Math.Exp(p[1] * x);
                g[1] = x * f;
            }

            return f;
        }
    }
}

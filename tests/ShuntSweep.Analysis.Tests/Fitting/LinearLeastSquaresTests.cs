using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests.Fitting;

public sealed class LinearLeastSquaresTests
{
    [Theory]
    // NIST StRD linear least squares, certified values in data/reference/nist-strd/<Name>.dat.
    // Norris and Pontius are of lower difficulty (≥ 6 digits required), Wampler4 and Filip higher (≥ 4 digits).
    [InlineData("Norris", 1, 6.0)]
    [InlineData("Pontius", 2, 6.0)]
    [InlineData("Wampler4", 5, 4.0)]
    [InlineData("Filip", 10, 4.0)]
    public void Polynomial_MatchesNistCertifiedValues_ToRequiredDigits(string dataset, int degree, double digits)
    {
        var d = StrdDataset.Load(dataset);

        var fit = LinearLeastSquares.Polynomial(d.X, d.Y, [], degree);

        Assert.Equal(d.Certified.Length, fit.Parameters.Length);
        for (var j = 0; j < fit.Parameters.Length; j++)
        {
            Assert.True(StrdDataset.Digits(fit.Parameters[j], d.Certified[j]) >= digits, $"{dataset} B{j}: {fit.Parameters[j]:R} vs certified {d.Certified[j]:R}");
            Assert.True(StrdDataset.Digits(fit.StandardUncertainty(j), d.CertifiedSd[j]) >= digits, $"{dataset} SD(B{j}): {fit.StandardUncertainty(j):R} vs certified {d.CertifiedSd[j]:R}");
        }

        Assert.True(StrdDataset.Digits(fit.ResidualStdDev, d.ResidualSd) >= digits, $"{dataset} residual SD: {fit.ResidualStdDev:R} vs {d.ResidualSd:R}");
    }

    [Fact]
    public void Polynomial_ReproducesWampler1ExactData()
    {
        // NIST StRD Wampler1: y is an exact 5th-degree polynomial with all coefficients certified as 1 and residual SD 0.
        var d = StrdDataset.Load("Wampler1");

        var fit = LinearLeastSquares.Polynomial(d.X, d.Y, [], 5);

        Assert.All(fit.Parameters, b => Assert.True(StrdDataset.Digits(b, 1.0) >= 6, $"B = {b:R}"));
    }

    [Fact]
    public void Fit_RejectsRankDeficientDesign()
    {
        double[] x = [1, 1, 1, 1];
        double[] y = [1, 2, 3, 4];

        var e = Assert.Throws<ArgumentException>(() => LinearLeastSquares.Polynomial(x, y, [], 1));

        Assert.Contains("rank deficient", e.Message, StringComparison.Ordinal);
    }
}

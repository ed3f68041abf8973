using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Analysis.Tests.Support;

/// <summary>Assertions on estimates that carry a standard uncertainty, and on model gradients.</summary>
internal static class Check
{
    /// <summary>Asserts that <paramref name="truth"/> lies within <paramref name="k"/> standard uncertainties of <paramref name="estimate"/>.</summary>
    public static void Within(double truth, Estimate estimate, double k)
    {
        Assert.True(
            Math.Abs(estimate.Value - truth) <= k * estimate.StandardUncertainty,
            $"true {truth:G6} vs estimate {estimate.Value:G6} ± {estimate.StandardUncertainty:G3} (|z| = {Math.Abs(estimate.Value - truth) / estimate.StandardUncertainty:G3}, allowed {k})");
    }

    /// <summary>Asserts that the model's analytic gradient at (<paramref name="x"/>, <paramref name="p"/>) matches central differences to 10⁻⁵ relative.</summary>
    public static void GradientMatchesFiniteDifferences(IModelFunction model, double x, double[] p, double absoluteFloor)
    {
        var g = new double[p.Length];
        model.Evaluate(x, p, g);
        for (var j = 0; j < p.Length; j++)
        {
            var h = (Math.Abs(p[j]) * 1e-6) + 1e-9;
            var up = (double[])p.Clone();
            var down = (double[])p.Clone();
            up[j] += h;
            down[j] -= h;
            var fd = (model.Evaluate(x, up, []) - model.Evaluate(x, down, [])) / (2 * h);
            Assert.Equal(fd, g[j], Math.Max(Math.Abs(fd) * 1e-5, absoluteFloor));
        }
    }
}

using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Analysis.Tests.Support;

/// <summary>Assertions on estimates that carry a standard uncertainty.</summary>
internal static class Check
{
    /// <summary>Asserts that <paramref name="truth"/> lies within <paramref name="k"/> standard uncertainties of <paramref name="estimate"/>.</summary>
    public static void Within(double truth, Estimate estimate, double k)
    {
        Assert.True(
            Math.Abs(estimate.Value - truth) <= k * estimate.StandardUncertainty,
            $"true {truth:G6} vs estimate {estimate.Value:G6} ± {estimate.StandardUncertainty:G3} (|z| = {Math.Abs(estimate.Value - truth) / estimate.StandardUncertainty:G3}, allowed {k})");
    }
}

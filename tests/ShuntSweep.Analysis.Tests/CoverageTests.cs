using MathNet.Numerics.Distributions;
using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests;

/// <summary>Over many seeds, the 95 % intervals (k = t₉₇.₅(ν)·u) contain the true value about 95 % of the time.</summary>
public sealed class CoverageTests
{
    [Fact]
    public void OhmicFit_95PercentIntervals_CoverTheTrueResistance()
    {
        const int seeds = 400;
        var hits = 0;
        for (var seed = 0; seed < seeds; seed++)
        {
            var samples = Some.Sweep("60mA", "mA", Some.Linear(0, 0.06, 12), i => 2e-5 + (2.04 * i), 40e-6, 5, new Random(seed));
            var r = Characteriser.Analyse(samples, null, new AnalysisOptions { MonteCarloTrials = 0 }).Ranges[0];
            var k = StudentT.InvCDF(0, 1, r.Points.Count - 2, 0.975);
            hits += Math.Abs(r.ResistanceOhms.Value - 2.04) <= k * r.ResistanceOhms.StandardUncertainty ? 1 : 0;
        }

        // Binomial(400, 0.95) has a standard deviation of 1.1 %; allow about ±3 of them.
        Assert.InRange(hits / (double)seeds, 0.915, 0.985);
    }

    [Fact]
    public void SelfHeatingFit_95PercentIntervals_CoverTheTrueHeatingCoefficient()
    {
        const int seeds = 200;
        var hits = 0;
        for (var seed = 0; seed < seeds; seed++)
        {
            var samples = Some.Sweep("10A", "A", Some.Linear(0, 10, 20), i => 0.02 * i / (1 - (1e-3 * i * i)), 50e-6, 5, new Random(1000 + seed));
            var r = Characteriser.Analyse(samples, null).Ranges[0];
            var beta = r.Parameters!.Single(p => p.Name == "heatingCoefficient");
            var k = StudentT.InvCDF(0, 1, r.Points.Count - 3, 0.975);
            hits += r.Model == "self-heating" && Math.Abs(beta.Value - 1e-3) <= k * beta.StandardUncertainty ? 1 : 0;
        }

        // Binomial(200, 0.95): standard deviation 1.5 %.
        Assert.InRange(hits / (double)seeds, 0.90, 0.99);
    }
}

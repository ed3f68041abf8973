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

    [Fact]
    public void FaintlyHeatingShunt_HeadlineIntervals_CoverTheColdResistanceAtLeast70PercentOfTheTime()
    {
        // Self-heating R = R₀/(1 − β·I²) (common practice, no source). A 10 mΩ shunt heating by 58 ppm at 1.2 A, about what 0.3 µV of noise can just see: the straight line and the heating model
        // trade places from seed to seed, and the chosen line's slope alone sits high. Averaging only over the hypotheses that survive
        // (F-test, or a lower AICc than the chosen line) covers 75 % here (measured); averaging in every curve covered 90 % but
        // inflated an ohmic range's uncertainty two- to fourfold. The edge of visibility is the known limit, stated in the docs.
        const int seeds = 200;
        int hits = 0, straight = 0;
        for (var seed = 0; seed < seeds; seed++)
        {
            var samples = Some.Sweep("1A", "IN", Some.Linear(0.05, 1.2, 25), i => 2e-7 + (0.01 * i / (1 - (4e-5 * i * i))), 0.3e-6, 4, new Random(3000 + seed));
            var r = Characteriser.Analyse(samples, null, new AnalysisOptions { MonteCarloTrials = 0 }).Ranges[0];
            straight += r.Model == "ohmic" ? 1 : 0;
            var k = StudentT.InvCDF(0, 1, r.Points.Count - 2, 0.975);
            hits += Math.Abs(r.ResistanceOhms.Value - 0.01) <= k * r.ResistanceOhms.StandardUncertainty ? 1 : 0;
        }

        Assert.InRange(straight, seeds / 10, seeds - (seeds / 10));
        Assert.InRange(hits / (double)seeds, 0.70, 0.995);
    }

    [Fact]
    public void HeatedElementFit_95PercentIntervals_CoverTheColdAndTheHeatedResistance()
    {
        // A 0.3 Ω fuse heating with β = 0.8 A⁻² in series with a 1.5 Ω stable shunt, swept to 0.4 A (the TW-18's mA jack, invented values).
        const int seeds = 100;
        int coldHits = 0, heatedHits = 0;
        for (var seed = 0; seed < seeds; seed++)
        {
            var samples = Some.Sweep("400mA", "mA", Some.Linear(0.004, 0.4, 20), i => (1.5 * i) + (0.3 * i / (1 - (0.8 * i * i))), 2e-6, 5, new Random(5000 + seed));
            var r = Characteriser.Analyse(samples, null, new AnalysisOptions { MonteCarloTrials = 0 }).Ranges[0];
            Assert.Equal("heated-element", r.Model);
            var k = StudentT.InvCDF(0, 1, r.Points.Count - 4, 0.975);
            var heated = r.Parameters!.Single(p => p.Name == "heatedResistance");
            coldHits += Math.Abs(r.ResistanceOhms.Value - 1.8) <= k * r.ResistanceOhms.StandardUncertainty ? 1 : 0;
            heatedHits += Math.Abs(heated.Value - 0.3) <= k * heated.StandardUncertainty ? 1 : 0;
        }

        // Binomial(100, 0.95): standard deviation 2.2 %.
        Assert.InRange(coldHits / (double)seeds, 0.88, 1.0);
        Assert.InRange(heatedHits / (double)seeds, 0.88, 1.0);
    }
}

using MathNet.Numerics.Distributions;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Core.Bench;

namespace ShuntSweep.Analysis.Tests;

/// <summary>The numbers a user reads: expanded uncertainties with their k, the resolution floor, Type B rows, refusals and validity.</summary>
public sealed class HeadlineNumbersTests
{
    private static readonly AnalysisOptions NoMonteCarlo = new() { MonteCarloTrials = 0 };

    [Fact]
    public void QuantisedDrops_WithoutScatter_GetTheResolutionFloorOfTheFormula()
    {
        // A noiseless 0.1 Ω shunt read by a voltmeter with 0.1 mV steps: every point is quantised, the fit has no scatter to speak of.
        // Floor: each point's quantisation error is rectangular with u = q/√12 (JCGM 100 F.2.2.1); through an unweighted straight
        // line u(R) = (q/√12)/√Σ(Iᵢ − Ī)² (slope variance of ordinary least squares, common practice, no source).
        const double q = 1e-4;
        var currents = Some.Linear(0.1, 0.97, 13).ToArray();
        var samples = Some.Sweep("1A", "A", currents, i => Math.Round(0.1 * i / q) * q, 0, 3, new Random(1));
        var r = Characteriser.Analyse(samples, null, NoMonteCarlo).Ranges[0];
        var mean = currents.Average();
        var expected = q / Math.Sqrt(12) / Math.Sqrt(currents.Sum(i => (i - mean) * (i - mean)));
        var floor = r.ResistanceBudget!.Lines.Single(l => l.Name == "drop meter resolution").Contribution;
        Assert.Equal(q, r.DropResolutionVolts, 12);
        Assert.Equal(expected, floor, expected * 1e-6);
        Assert.True(r.ResistanceOhms.StandardUncertainty >= expected);
        Assert.True(double.IsNaN(r.Points[0].DropUncertaintyVolts));
    }

    [Fact]
    public void AllZeroDrops_AreRefusedAsAWiringProblem()
    {
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 5), _ => 0, 0, 3, new Random(1));
        var e = Assert.Throws<InvalidDataException>(() => Characteriser.Analyse(samples, null, NoMonteCarlo));
        Assert.Contains("the drop meter read 0 V at every current: is it connected across the jacks?", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void NegativeResistance_IsFlaggedAsReversedLeads()
    {
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 8), i => -0.1 * i, 1e-5, 3, new Random(2));
        var r = Characteriser.Analyse(samples, null, NoMonteCarlo).Ranges[0];
        Assert.Contains(r.Warnings!, w => w.Contains("reversed", StringComparison.Ordinal));
    }

    [Fact]
    public void ThreePointRange_HasOneDegreeOfFreedom_AndTheStudentCoverageFactor()
    {
        // JCGM 100:2008 Table G.2: t₉₅(1) = 12.71.
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 3), i => 0.1 * i, 1e-5, 4, new Random(3));
        var r = Characteriser.Analyse(samples, null, NoMonteCarlo).Ranges[0];
        Assert.Equal(1, r.ResistanceOhms.EffectiveDegreesOfFreedom!.Value, 6);
        Assert.Equal(12.71, r.ResistanceOhms.CoverageFactor, 2);
        Assert.Equal(r.ResistanceOhms.CoverageFactor * r.ResistanceOhms.StandardUncertainty, r.ResistanceOhms.ExpandedUncertainty, 15);
    }

    [Fact]
    public void BenchTypeB_RowsEnterTheBudget_AndWelchSatterthwaiteCombinesThem()
    {
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 10), i => 0.1 * i, 1e-5, 4, new Random(4));
        var allowances = new BenchAllowances(new MeterSpecification(30e-6, 5e-6, 0), new MeterSpecification(50e-6, 1e-6, 0), 2e-6, 1e-5);
        var plain = Characteriser.Analyse(samples, null, NoMonteCarlo).Ranges[0];
        var r = Characteriser.Analyse(samples, null, NoMonteCarlo with { Allowances = allowances }).Ranges[0];
        var lines = r.ResistanceBudget!.Lines;

        // Rectangular limits a enter as a/√3 (JCGM 100 4.3.7), relative ones times R.
        Assert.Equal(0.1 * 30e-6 / Math.Sqrt(3), lines.Single(l => l.Name.StartsWith("drop meter accuracy", StringComparison.Ordinal)).Contribution, 1e-9);
        Assert.Equal(0.1 * 50e-6 / Math.Sqrt(3), lines.Single(l => l.Name.StartsWith("reference accuracy", StringComparison.Ordinal)).Contribution, 1e-9);
        Assert.Equal(1e-5 / Math.Sqrt(3), lines.Single(l => l.Name.StartsWith("lead", StringComparison.Ordinal)).Contribution, 1e-12);
        Assert.True(r.ResistanceOhms.StandardUncertainty > plain.ResistanceOhms.StandardUncertainty);

        // ν_eff = u_c⁴ / Σ uᵢ⁴/νᵢ (JCGM 100 G.4.1), only the fit row has finite ν.
        var fit = lines[0];
        var expectedNu = Math.Pow(r.ResistanceOhms.StandardUncertainty, 4) / (Math.Pow(fit.Contribution, 4) / fit.DegreesOfFreedom!.Value);
        Assert.Equal(expectedNu, r.ResistanceOhms.EffectiveDegreesOfFreedom!.Value, expectedNu * 1e-9);
        Assert.Equal(StudentT.InvCDF(0, 1, expectedNu, 0.975), r.ResistanceOhms.CoverageFactor, 9);
        Assert.Contains(r.OffsetBudget!.Lines, l => l.Name == "thermal EMF allowance" && Math.Abs(l.Contribution - (2e-6 / Math.Sqrt(3))) < 1e-15);
    }

    [Fact]
    public void OhmicRange_ClearChoice_ReportsTheChosenModelsOwnResistance()
    {
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 25), i => 0.1 * i, 1e-5, 4, new Random(5));
        var r = Characteriser.Analyse(samples, null, NoMonteCarlo).Ranges[0];
        Assert.Equal("ohmic", r.Model);
        Assert.Equal("chosen model: ohmic", r.ResistanceMethod);
        Assert.Equal(r.Parameters!.Single(p => p.Name == "resistance").Value, r.ResistanceOhms.Value, 15);
    }

    [Fact]
    public void SelfHeatingAndItsCubicApproximation_AreNeverBothCandidates()
    {
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 25), i => 0.1 * i / (1 - (0.05 * i * i)), 1e-5, 4, new Random(6));
        var r = Characteriser.Analyse(samples, null, NoMonteCarlo).Ranges[0];
        var fitted = r.ModelComparison!.Candidates.Where(c => c.Fitted).Select(c => Analysis.Models.ModelHypotheses.Of(c.Model)).ToList();
        Assert.Equal(fitted.Count, fitted.Distinct().Count());
        Assert.True(Analysis.Models.ModelHypotheses.Equivalent("self-heating", "self-heating-cubic"));
    }

    [Fact]
    public void Predict_BeyondASelfHeatingModelsValidity_SaysSoAndStillComputesTheOthers()
    {
        var heated = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 25), i => 0.1 * i / (1 - (0.05 * i * i)), 1e-5, 4, new Random(7));
        var ohmic = Some.Sweep("10A", "B", Some.Linear(1, 10, 10), i => 0.01 * i, 1e-5, 4, new Random(8), firstStep: 100);
        var result = Characteriser.Analyse([.. heated, .. ohmic], null, NoMonteCarlo);
        Assert.Equal("self-heating", result.Range("1A").Model);

        // 10 V behind 1 Ω asks for about 9 A: past βI² = 0.9 of the 1A range's heating law.
        var report = InsertionError.Predict(result, 10, 1);
        var beyond = report.Ranges.Single(p => p.Range == "1A");
        Assert.StartsWith("not valid beyond", beyond.Reason, StringComparison.Ordinal);
        var other = report.Ranges.Single(p => p.Range == "10A");
        Assert.Null(other.Reason);
        Assert.True(double.IsFinite(other.CurrentA.Value));

        var correction = InsertionError.Correct(result, "1A", 9, 1);
        Assert.StartsWith("not valid beyond", correction.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public void Predict_AtZeroSourceVolts_TreatsTheOffsetAsTheVoltmetersZero()
    {
        var samples = Some.Sweep("1A", "A", Some.Linear(0.1, 1.0, 10), i => 7.5e-6 + (0.1 * i), 1e-6, 4, new Random(9));
        var result = Characteriser.Analyse(samples, null, NoMonteCarlo);
        Assert.Equal(0, InsertionError.Predict(result, 0, 1000).Ranges[0].CurrentA.Value, 15);
        Assert.True(InsertionError.Predict(result, 0, 1000, offsetInCircuit: true).Ranges[0].CurrentA.Value < 0);
    }
}

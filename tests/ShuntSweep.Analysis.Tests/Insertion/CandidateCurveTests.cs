using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests.Insertion;

public sealed class CandidateCurveTests
{
    [Fact]
    public void RunnerUpCurve_IsTheFitTheComparisonScored_ItsResidualsGiveItsStatedScatter()
    {
        // A heating element: V = R0·I + c·I³ (common practice, no source); the cubic bends enough that a curved model wins over the straight line.
        var samples = Some.Sweep("400mA", "mA", Some.Linear(0.02, 0.4, 20), i => (1.5 * i) + (0.4 * i * i * i), 20e-6, 5, new Random(11));
        var range = Assert.Single(Characteriser.Analyse(samples, uut: null).Ranges);
        var comparison = range.ModelComparison!;
        Assert.NotNull(comparison.RunnerUp);

        var chosen = DropCurve.Candidate(range, range.Model, 296.15)!;
        var stored = DropCurve.For(range, 296.15);
        Assert.All(range.Points, p => Assert.Equal(stored.Drop(p.CurrentA), chosen.Drop(p.CurrentA), 12));

        var runnerUp = DropCurve.Candidate(range, comparison.RunnerUp!, 296.15)!;
        var candidate = comparison.Candidates.Single(c => c.Model == comparison.RunnerUp);
        var residuals = range.Points.Select(p => p.DropVolts - runnerUp.Drop(p.CurrentA)).ToList();
        var rms = Math.Sqrt(residuals.Sum(r => r * r) / (residuals.Count - candidate.ParameterCount));
        Assert.Equal(candidate.ResidualStdDevVolts, rms, candidate.ResidualStdDevVolts * 1e-6);
    }

    [Fact]
    public void CandidateCurve_IsNullForAModelThatWasNotFitted()
    {
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0.003, 0.06, 12), i => 2.04 * i, 20e-6, 5, new Random(3));
        var range = Assert.Single(Characteriser.Analyse(samples, uut: null).Ranges);
        Assert.Null(DropCurve.Candidate(range, "no-such-model", 296.15));
        foreach (var c in range.ModelComparison!.Candidates.Where(c => !c.Fitted))
        {
            Assert.Null(DropCurve.Candidate(range, c.Model, 296.15));
        }
    }
}

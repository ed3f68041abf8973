using ShuntSweep.Analysis.Uncertainty;

namespace ShuntSweep.Analysis.Tests.Uncertainty;

public sealed class ConformityTests
{
    [Theory]
    // ILAC-G8:09/2019 decision rules (from memory): simple acceptance (w = 0) and a non-binary statement with guard band w = U.
    [InlineData(0.5, ConformityVerdict.Pass, ConformityVerdict.Pass)]
    [InlineData(-0.9, ConformityVerdict.Pass, ConformityVerdict.ConditionalPass)]
    [InlineData(1.1, ConformityVerdict.Fail, ConformityVerdict.ConditionalFail)]
    [InlineData(-1.3, ConformityVerdict.Fail, ConformityVerdict.Fail)]
    public void Judge_AppliesSimpleAcceptanceAndGuardBand(double error, ConformityVerdict simple, ConformityVerdict guarded)
    {
        var budget = new GumBudget(error, 0.1, null, 2, 0.2, 0.95, []);

        var s = ConformityStatement.Judge(error, 1.0, budget);

        Assert.Equal(simple, s.SimpleAcceptance);
        Assert.Equal(guarded, s.GuardBanded);
        Assert.Equal(5, s.TestUncertaintyRatio, 12);
    }

    [Fact]
    public void Judge_ProbabilityOfConformance_IsHalfAtTheLimit()
    {
        var budget = new GumBudget(1.0, 0.01, null, 1.96, 0.0196, 0.95, []);

        var s = ConformityStatement.Judge(1.0, 1.0, budget);

        Assert.Equal(0.5, s.ProbabilityOfConformance, 6);
    }
}

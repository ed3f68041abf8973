using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis.Tests;

public sealed class ReadingErrorTests
{
    [Fact]
    public void Analyse_JudgesReadingsAgainstPercentOfReadingPlusCounts()
    {
        // A 60 mA range, 0.01 mA resolution, ±(0.5 % + 2 counts). The UUT reads 0.3 % high: well inside its limits.
        var uut = Uut(0.005, 2);
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0.006, 0.06, 10), i => 2 * i, 10e-6, 5, new Random(1), reading: i => Math.Round(i * 1.003 / 1e-5) * 1e-5);

        var result = Characteriser.Analyse(samples, uut);

        var range = result.Ranges[0];
        Assert.Equal(10, range.ReadingError!.Count);
        Assert.All(range.ReadingError, p => Assert.Equal(ConformityVerdict.Pass, p.Statement.SimpleAcceptance));
        Assert.Equal(ConformityVerdict.Pass, result.Conformity!.SimpleAcceptance);
        var last = range.ReadingError[^1];
        Assert.Equal((0.005 * last.ReadingA) + (2 * 1e-5), last.Statement.ToleranceLimit, 12);
        Assert.Equal(last.ReadingA - last.ReferenceA, last.ErrorA, 12);
        // For this linear error model the Monte Carlo standard deviation must equal u_c (JCGM 101 §9.2 linear case); the coverage
        // interval may legitimately differ from ±k·u_c because the two rectangular inputs dominate (a trapezoid, not a Gaussian).
        Assert.NotNull(last.MonteCarlo);
        Assert.Equal(last.Budget.CombinedStandardUncertainty, last.MonteCarlo.StandardUncertainty, last.Budget.CombinedStandardUncertainty * 0.03);
    }

    [Fact]
    public void Analyse_FailsAReadingFarOutsideItsLimit()
    {
        var uut = Uut(0.005, 2);
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0.006, 0.06, 10), i => 2 * i, 10e-6, 5, new Random(1), reading: i => Math.Round(i * 1.02 / 1e-5) * 1e-5);

        var result = Characteriser.Analyse(samples, uut);

        Assert.Equal(ConformityVerdict.Fail, result.Ranges[0].Conformity!.GuardBanded);
        Assert.Equal(ConformityVerdict.Fail, result.Conformity!.SimpleAcceptance);
    }

    private static UutDescription Uut(double fraction, int counts) =>
        new("Invented Instruments", "DM-1", "SN-0002", null,
            [new JackSpec("mA", new Current(0.8), null)],
            [new RangeSpec("60mA", "mA", new Current(0.06), new Current(1e-5), null, new AccuracySpec(fraction, counts), null, 0.1)]);
}

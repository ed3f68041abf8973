using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;
using Xunit;

namespace ShuntSweep.Analysis.Tests;

/// <summary>The burden judged against the specified burden at full scale and against a limit curve of drop against current.</summary>
public sealed class BurdenCheckTests
{
    private const double FullScale = 0.06;

    private static UutDescription Uut(double? burdenVolts, IReadOnlyList<BurdenLimitPoint>? curve = null) =>
        new("Invented Instruments", "DM-1", "SN-0003", null,
            [new JackSpec("mA", new Current(0.8), null)],
            [new RangeSpec("60mA", "mA", new Current(FullScale), new Current(1e-5), null, new AccuracySpec(0.01, 3), burdenVolts is { } b ? new Voltage(b) : null, 0.1, curve)]);

    private static RangeResult Fit(double ohms, int seed, UutDescription uut) =>
        Characteriser.Analyse(Some.Sweep("60mA", "mA", Some.Linear(0.005, 0.048, 10), i => ohms * i, 1e-3, 5, new Random(seed)), uut, new AnalysisOptions { MonteCarloTrials = 0 }).Ranges[0];

    [Fact]
    public void StraightLine_UncertaintyAtFullScale_IsTheLawOfPropagationOverTheFitsCovariance()
    {
        // JCGM 100:2008 eq. (13): for V(FS) = a + b·FS, u²(V) = u²(a) + FS²·u²(b) + 2·FS·u(a)·u(b)·r(a, b); k from the normal at p = 95 % (1.95996).
        var r = Fit(12.3, 1, Uut(1.0));
        Assert.Equal("ohmic", r.Model);
        var (ua, ub, rab) = (r.Parameters![0].StandardUncertainty, r.Parameters[1].StandardUncertainty, r.Correlation![0][1]);
        var u = Math.Sqrt((ua * ua) + (FullScale * FullScale * ub * ub) + (2 * FullScale * ua * ub * rab));
        Assert.Equal(1.959964 * u, r.Burden!.ExpandedUncertaintyVolts, 1.959964 * u * 1e-6);
        Assert.True(r.Burden.Extrapolated); // measured up to 48 mA of 60 mA
    }

    [Fact]
    public void ExpandedUncertaintyAtFullScale_CoversTheTrueDrop_AboutNinetyFivePercentOfTheTime()
    {
        const double Ohms = 12.3;
        var covered = Enumerable.Range(0, 200).Count(seed =>
        {
            var b = Fit(Ohms, seed, Uut(1.0)).Burden!;
            return Math.Abs(b.AtFullScaleVolts - (Ohms * FullScale)) <= b.ExpandedUncertaintyVolts;
        });
        Assert.InRange(covered, 178, 198); // 95 % of 200 = 190, ± about 3 binomial standard deviations
    }

    [Theory]
    [InlineData(0.80, ConformityVerdict.Pass)]  // 738 mV predicted: well inside 800 mV
    [InlineData(0.70, ConformityVerdict.Fail)]  // and well outside 700 mV
    public void SpecifiedBurden_IsAnUpperLimit_JudgedBySimpleAcceptance(double specifiedVolts, ConformityVerdict expected)
    {
        var r = Fit(12.3, 2, Uut(specifiedVolts));
        Assert.Equal(expected, r.Burden!.AtFullScale);
        Assert.Equal(expected == ConformityVerdict.Fail ? RecordVerdict.Fail : RecordVerdict.Pass, Verdicts.Of(r));
    }

    [Fact]
    public void LimitCurve_JudgesEveryPointWithinItsSpan_AndNamesTheWorst()
    {
        // The curve allows 10 Ω·I below 30 mA and then 1 V: the points of a 12.3 Ω range below 30 mA are above it, the others under it.
        var curve = new List<BurdenLimitPoint>
        {
            new(new Current(0), new Voltage(0)), new(new Current(0.03), new Voltage(0.3)), new(new Current(0.0301), new Voltage(1)), new(new Current(0.05), new Voltage(1)),
        };
        var r = Fit(12.3, 3, Uut(null, curve));
        Assert.Null(r.Burden!.AtFullScale);
        Assert.Equal(10, r.Burden.CurvePoints);
        Assert.Equal(r.Points.Count(p => p.CurrentA < 0.03), r.Burden.CurvePointsAbove);
        Assert.Equal(ConformityVerdict.Fail, r.Burden.Curve);
        Assert.Equal(RecordVerdict.Fail, Verdicts.Of(r));
    }

    [Fact]
    public void LimitAt_InterpolatesLinearlyBetweenCorners_AndIsUndefinedOutsideThem()
    {
        var curve = new List<BurdenLimitPoint> { new(new Current(0.01), new Voltage(0.1)), new(new Current(0.03), new Voltage(0.5)) };
        Assert.Equal(0.3, BurdenLimitPoint.LimitAt(curve, 0.02), 12);
        Assert.Equal(0.3, BurdenLimitPoint.LimitAt(curve, -0.02), 12);
        Assert.True(double.IsNaN(BurdenLimitPoint.LimitAt(curve, 0.031)));
    }

    [Fact]
    public void IncompleteResult_StatesNoPass_ButKeepsAFailure()
    {
        var pass = Fit(12.3, 4, Uut(0.8));
        var fail = Fit(12.3, 4, Uut(0.7)) with { Name = "other" };
        var stopped = new CharacterisationResult([pass, fail], RunEnd: "SafetyAbort");
        Assert.Equal(RecordVerdict.Incomplete, stopped.Verdict);
        Assert.Equal(RecordVerdict.Incomplete, stopped.RangeVerdicts["60mA"]);
        Assert.Equal(RecordVerdict.Fail, stopped.RangeVerdicts["other"]);
        Assert.Equal(RecordVerdict.Fail, (stopped with { RunEnd = "Completed" }).Verdict);
        Assert.Equal(RecordVerdict.Incomplete, new CharacterisationResult([pass], RunEnd: "Completed", LeftOut: ["range 10A has 2 points"]).Verdict);
    }
}

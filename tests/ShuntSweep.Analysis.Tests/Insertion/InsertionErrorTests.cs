using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Tests.Models;
using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests.Insertion;

public sealed class InsertionErrorTests
{
    [Fact]
    public void Predict_OneVoltThrough100Ohm_With2Point04OhmMeter_ReadsAbout9Point80mA()
    {
        // Common practice, no source: 1 V across 100 Ω gives 10 mA; with about 2.04 Ω of meter in series the meter reads about 9.80 mA.
        var result = Ohmic(("60mA", 2.04, 0.06));

        var p = Assert.Single(InsertionError.Predict(result, 1.0, 100.0).Ranges);

        Assert.Equal(0.010, InsertionError.Predict(result, 1.0, 100.0).UndisturbedCurrentA, 12);
        Assert.Equal(0.00980, p.ReadingA, 5);
        Assert.Equal(1.0 / 102.04, p.CurrentA.Value, 12);
        Assert.Equal(-0.0002, p.ErrorA, 5);
    }

    [Fact]
    public void DocsWorkedExample_LedBranchOnThe60mARange_ReadsLow_AndCorrectGivesTheUndisturbedCurrent()
    {
        // The worked example of docs/analysis.md (invented scenario: a BW-9 node's LED branch, 3.3 V through 150 Ω, on a 12.30 Ω range);
        // the check is Ohm's law, I = V/(R_source + R_meter) and I₀ = I + I·R_meter/R_source.
        var result = Ohmic(("60mA", 12.30, 0.06));
        var p = Assert.Single(InsertionError.Predict(result, 3.3, 150.0).Ranges);
        Assert.Equal(0.022, InsertionError.Predict(result, 3.3, 150.0).UndisturbedCurrentA, 12);
        Assert.Equal(3.3 / 162.3, p.CurrentA.Value, 9);
        Assert.Equal(0.02033, p.ReadingA, 5);
        Assert.Equal(-0.076, p.RelativeError, 3);
        Assert.Equal(0.022, InsertionError.Correct(result, "60mA", 3.3 / 162.3, 150.0).UndisturbedCurrentA.Value, 9);
    }

    [Fact]
    public void Predict_FiveVoltRailDropping0Point3V_LeavesBelowLogicMinimum_AndIsFlagged()
    {
        // Common practice, no source: a 5 V rail feeding a logic circuit through a meter that drops 0.3 V leaves 4.7 V,
        // below the 4.75 V minimum of 5 V logic. The circuit draws 100 mA at 4.7 V (47 Ω); the meter's 600mA range has 3 Ω.
        var result = Ohmic(("600mA", 3.0, 0.6));

        var report = InsertionError.Predict(result, 5.0, 47.0, minimumVolts: 4.75);

        var p = Assert.Single(report.Ranges);
        Assert.Equal(4.7, p.VoltsLeft, 9);
        Assert.Equal(0.3, p.DropVolts, 9);
        Assert.True(p.BelowMinimum);
        Assert.Null(report.Recommended);
    }

    [Fact]
    public void Predict_RecommendsTheRangeWithTheSmallestErrorThatDoesNotOverload()
    {
        // Common practice, no source: the higher-sensitivity (lower-current) range has the larger series resistance and so the larger error;
        // the highest-current range errs least, as long as the current is within its full scale.
        var result = Ohmic(("60mA", 2.04, 0.06), ("600mA", 0.24, 0.6), ("10A", 0.012, 10));

        var report = InsertionError.Predict(result, 1.0, 100.0, minimumVolts: 0.95);

        var errors = report.Ranges.Select(r => Math.Abs(r.ErrorA)).ToList();
        Assert.True(errors[0] > errors[1] && errors[1] > errors[2]);
        Assert.Equal("10A", report.Recommended);
        Assert.All(report.Ranges, r => Assert.False(r.BelowMinimum));
    }

    [Fact]
    public void Predict_FlagsOverload_AboveFullScale()
    {
        var result = Ohmic(("6mA", 20.0, 0.006), ("600mA", 0.24, 0.6));

        var report = InsertionError.Predict(result, 1.0, 100.0);

        Assert.True(report.Ranges[0].Overload);
        Assert.True(double.IsNaN(report.Ranges[0].ReadingA));
        Assert.Equal("600mA", report.Recommended);
    }

    [Fact]
    public void Predict_OnClampDiodeCurve_AgreesWithDirectSolutionOfTheCircuit()
    {
        // Fit a clamped range, then insert it in a 2 V / 10 Ω circuit driven into the diodes; compare with the circuit solved from the true physics.
        const double rsh = 10, rser = 0.1, isat = 1e-9, n = 1.8, vt = 1.380649e-23 * 296.15 / 1.602176634e-19;
        double TrueDrop(double i) => (rser * i) + ModelRecoveryTests.ShuntVoltage(i, rsh, isat, n * vt);
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0, 0.12, 30), TrueDrop, 50e-6, 5, new Random(8));
        var result = Characteriser.Analyse(samples, null);
        double lo = 0, hi = 0.2;
        for (var k = 0; k < 200; k++)
        {
            var mid = 0.5 * (lo + hi);
            if ((mid * 10) + TrueDrop(mid) > 2.0)
            {
                hi = mid;
            }
            else
            {
                lo = mid;
            }
        }

        var p = Assert.Single(InsertionError.Predict(result, 2.0, 10.0).Ranges);

        Assert.Equal("clamp-diodes", result.Ranges[0].Model);
        Assert.Equal(0.5 * (lo + hi), p.CurrentA.Value, 3 * p.CurrentA.StandardUncertainty + 1e-7);
    }

    [Fact]
    public void Correct_UndoesTheInsertionError_OfPredict()
    {
        var result = Ohmic(("60mA", 2.04, 0.06));
        var p = InsertionError.Predict(result, 1.0, 100.0).Ranges[0];

        var c = InsertionError.Correct(result, "60mA", p.ReadingA, 100.0);

        Assert.Equal(0.010, c.UndisturbedCurrentA.Value, 12);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(-5.0)]
    [InlineData(double.NaN)]
    public void Predict_RejectsSourceResistanceNotAboveZero(double ohms)
    {
        var e = Assert.Throws<ArgumentException>(() => InsertionError.Predict(Ohmic(("60mA", 2.04, 0.06)), 1.0, ohms));

        Assert.Contains("source resistance", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Correct_UnknownRange_NamesTheRangesPresent()
    {
        var e = Assert.Throws<KeyNotFoundException>(() => InsertionError.Correct(Ohmic(("60mA", 2.04, 0.06)), "6A", 0.001, 100));

        Assert.Contains("60mA", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void DropCurve_RoundTripsThroughResultJson()
    {
        var samples = Some.Sweep("10A", "A", Some.Linear(0, 10, 25), i => 0.02 * i / (1 - (1e-3 * i * i)), 20e-6, 5, new Random(5));
        var result = Characteriser.Analyse(samples, null);

        var back = ResultJson.Deserialize(ResultJson.Serialize(result));

        Assert.Equal(DropCurve.For(result, "10A").Drop(7.5), DropCurve.For(back, "10A").Drop(7.5), 15);
        Assert.Equal(DropCurve.For(result, "10A").DropUncertainty(7.5), DropCurve.For(back, "10A").DropUncertainty(7.5), 12);
    }

    private static CharacterisationResult Ohmic(params (string Name, double Ohms, double FullScale)[] ranges) =>
        new(ranges.Select(r => new RangeResult(
            r.Name, "COM", r.FullScale, "ohmic", new Estimate(r.Ohms, r.Ohms * 1e-4), new Estimate(0, 1e-7), 1e-6, r.Ohms * r.FullScale, [],
            [new ParameterResult("offset", "V", 0, 1e-7, ""), new ParameterResult("resistance", "Ω", r.Ohms, r.Ohms * 1e-4, "")],
            [[1.0, 0.0], [0.0, 1.0]],
            FittedUpToA: r.FullScale)).ToList());
}

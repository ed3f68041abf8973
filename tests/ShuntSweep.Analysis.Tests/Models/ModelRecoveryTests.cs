using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests.Models;

/// <summary>Each drop model is recovered from synthetic data generated here from its physics formula with a seeded generator.</summary>
public sealed class ModelRecoveryTests
{
    private const double VtAt23C = 1.380649e-23 * 296.15 / 1.602176634e-19; // CODATA 2018 exact k and e; 0.02552023... V (data/reference/physics/thermal-voltage.csv)

    [Fact]
    public void Analyse_ChoosesOhmic_ForALinearDrop()
    {
        var samples = Some.Sweep("600mA", "mA", Some.Linear(0, 0.6, 20), i => 0.25 * i, 30e-6, 5, new Random(11));

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("ohmic", range.Model);
        Assert.Equal("ohmic", range.ModelComparison!.Chosen);
        Assert.NotNull(range.ModelComparison.RunnerUp);
        Check.Within(0.25, range.ResistanceOhms, 3);
    }

    [Fact]
    public void Analyse_RecoversSelfHeating_R0AndBeta()
    {
        // R = R0/(1 − α·Rth·R0·I²) with β = α·Rth·R0 chosen so that β·I² = 0.1 at 10 A (a fuse element about 26 K above ambient).
        const double r0 = 0.02, beta = 1e-3;
        var samples = Some.Sweep("10A", "A", Some.Linear(0, 10, 25), i => 2e-6 + (r0 * i / (1 - (beta * i * i))), 20e-6, 5, new Random(5));

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("self-heating", range.Model);
        Check.Within(r0, P(range, "resistance"), 3);
        Check.Within(beta, P(range, "heatingCoefficient"), 3);
        var f = range.ModelComparison!.Candidates.Single(c => c.Model == "self-heating").FTestPValue;
        Assert.True(f < 1e-6, $"F-test against ohmic p = {f}");
    }

    [Fact]
    public void Analyse_RecoversHeatedElement_WhenOnlyTheFuseHeats()
    {
        // A 1.5 Ω shunt that stays cold behind a 0.3 Ω fuse that heats: R = R_sh + R_f/(1 − β·I²) with β·I² = 0.2 at 400 mA.
        // Heating the whole 1.8 Ω (the self-heating model) biases R₀ by about a milliohm here; the heated-element model does not.
        const double rsh = 1.5, rf = 0.3, beta = 1.25;
        var samples = Some.Sweep("400mA", "mA", Some.Linear(0.01, 0.4, 30), i => i * (rsh + (rf / (1 - (beta * i * i)))), 2e-6, 5, new Random(21));

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("heated-element", range.Model);
        Check.Within(rsh + rf, range.ResistanceOhms, 3);
        Check.Within(rf, P(range, "heatedResistance"), 3);
        Check.Within(beta, P(range, "heatingCoefficient"), 3);
    }

    [Fact]
    public void Analyse_RecoversClampDiodes_AcrossTheShunt()
    {
        // A 10 Ω shunt with an antiparallel diode pair (Is = 1 nA, n = 1.8) behind 0.1 Ω of fuse and contacts, swept to twice full scale.
        const double rsh = 10, rser = 0.1, isat = 1e-9, n = 1.8;
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0, 0.12, 30), i => rser * i + ShuntVoltage(i, rsh, isat, n * VtAt23C), 50e-6, 5, new Random(8));

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("clamp-diodes", range.Model);
        Check.Within(rsh, P(range, "shuntResistance"), 3);
        Check.Within(rser, P(range, "seriesResistance"), 3);
        Check.Within(n, P(range, "ideality"), 3);
        Check.Within(Math.Log(isat), P(range, "lnSaturationCurrent"), 3);
    }

    [Fact]
    public void Analyse_RecoversFeedbackKnee()
    {
        // Transimpedance front end: R_f = 1 kΩ, A_OL = 1e6 (drop 1 mΩ·I), output swing 10 V → knee at 10 mA, rounded as the model rounds it.
        const double rlo = 1e-3, ik = 0.01, rhi = 1000, w = FeedbackKneeModel.KneeWidth * ik;
        static double Softplus(double z) => z > 30 ? z : Math.Log(1 + Math.Exp(z));
        var samples = Some.Sweep("10mA", "uA", Some.Linear(0, 0.015, 31), i => 5e-6 + (rlo * i) + ((rhi - rlo) * w * Softplus((i - ik) / w)), 10e-6, 5, new Random(21));

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("feedback-knee", range.Model);
        Check.Within(ik, P(range, "kneeCurrent"), 3);
        Check.Within(rhi, P(range, "highResistance"), 3);
        Check.Within(rlo, P(range, "lowResistance"), 3);
    }

    [Fact]
    public void Analyse_NamesAmplifiedShunt_WhenTheReadingOverloadsOverAnOhmicDrop()
    {
        // A 0.1 Ω shunt and a gain-100 amplifier whose output reaches its swing at 52 mA (first overloaded point 55 mA), below the 60 mA full scale.
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0, 0.06, 13), i => 0.1 * i, 5e-6, 5, new Random(2), reading: i => i < 0.052 ? i : double.PositiveInfinity);

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("amplified-shunt", range.Model);
        Assert.Equal(0.055, range.ReadingLimitA, 9);
        Check.Within(0.1, range.ResistanceOhms, 3);
    }

    [Fact]
    public void Analyse_NamesAmplifiedShunt_WhenAPointWithoutReadingsLiesBelowTheOverload()
    {
        // The same amplified shunt, plus a hold at 40 mA that read only the drop (its reading is "not read", NaN, not overload, +∞).
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0, 0.06, 13), i => 0.1 * i, 5e-6, 5, new Random(2), reading: i => i < 0.052 ? i : double.PositiveInfinity);
        samples.AddRange(Some.Sweep("60mA", "mA", [0.04], i => 0.1 * i, 5e-6, 5, new Random(3), firstStep: 20));

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal("amplified-shunt", range.Model);
        Assert.Equal(0.055, range.ReadingLimitA, 9);
    }

    [Fact]
    public void AmplifiedShunt_WithGain100_CutsTheDropAbout100Times()
    {
        // Common practice, no source: a gain-100 amplifier after the shunt allows a shunt 100× smaller for the same signal, so ~100× less burden.
        var plain = Some.Sweep("60mA", "mA", Some.Linear(0, 0.06, 13), i => 10 * i, 5e-6, 5, new Random(3));
        var amplified = Some.Sweep("60mA", "mA", Some.Linear(0, 0.06, 13), i => 10.0 / 100 * i, 5e-6, 5, new Random(4));

        var ratio = Characteriser.Analyse(plain, null).Ranges[0].BurdenAtFullScaleVolts / Characteriser.Analyse(amplified, null).Ranges[0].BurdenAtFullScaleVolts;

        Assert.InRange(ratio, 99, 101);
    }

    [Fact]
    public void ClampDiodeModel_GradientMatchesFiniteDifferences()
    {
        Check.GradientMatchesFiniteDifferences(new ClampDiodeModel(296.15), 0.09, [1e-5, 0.1, 10, Math.Log(1e-9), 1.8], 1e-9);
    }

    internal static double ShuntVoltage(double i, double rsh, double isat, double nvt)
    {
        // Bisection on I = V/Rsh + 2·Is·sinh(V/nVT), independent of the code under test.
        double lo = 0, hi = i * rsh;
        for (var k = 0; k < 200; k++)
        {
            var mid = 0.5 * (lo + hi);
            if ((mid / rsh) + (2 * isat * Math.Sinh(mid / nvt)) > i)
            {
                hi = mid;
            }
            else
            {
                lo = mid;
            }
        }

        return 0.5 * (lo + hi);
    }

    private static Estimate P(RangeResult range, string name)
    {
        var p = range.Parameters!.Single(x => x.Name == name);
        return new Estimate(p.Value, p.StandardUncertainty);
    }
}

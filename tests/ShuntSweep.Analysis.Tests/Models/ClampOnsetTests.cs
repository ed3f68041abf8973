using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Analysis.Tests.Models;

/// <summary>Clamp diodes that only start to conduct at full scale: synthetic data from the Shockley formula (an independent bisection),
/// shaped like a handheld's 6 mA range (120 Ω shunt behind 0.3 Ω of fuse and contacts, two diodes in series each way, I_s = 1 nA, n = 1.9).</summary>
public sealed class ClampOnsetTests
{
    private const double VtAt23C = 1.380649e-23 * 296.15 / 1.602176634e-19; // CODATA 2018 exact k and e (data/reference/physics/thermal-voltage.csv)
    private const double Rsh = 120, Rser = 0.3, Isat = 1e-9, NString = 2 * 1.9, FullScale = 6e-3;

    [Fact]
    public void Analyse_ChoosesClampDiodeOnset_WhenTheDiodesStealAFewHundredPpmAtFullScale()
    {
        var range = Assert.Single(Characteriser.Analyse(Sweep(new Random(7)), null).Ranges);

        // 2·I_s·sinh(0.72 V/(3.8·V_T)) ≈ 1.7 µA of 6 mA (about 280 ppm) at full scale, decaying exponentially below it.
        Assert.Equal("clamp-diodes-onset", range.Model);
        Assert.DoesNotContain(range.Points, p => p.Outlier);
        var cubic = range.ModelComparison!.Candidates.Single(c => c.Model == "self-heating-cubic");
        Assert.True(range.ModelComparison.Candidates.Single(c => c.Model == range.Model).Aicc < cubic.Aicc - 10, "the diode shape must beat a cubic by a clear margin");
    }

    [Fact]
    public void Fit_AtOnset_RecoversResistanceSaturationCurrentAndIdeality_WithinExpandedUncertainty()
    {
        var range = Characteriser.Analyse(Sweep(new Random(7)), null).Ranges[0];

        // k = 2. The onset form puts R_s across the diodes too, which moves I_s down and n up by the fraction R_s/R_sh (0.25 %, a
        // tenth of their uncertainties here), so the truth is compared directly. The small-signal resistance at zero current is the
        // whole resistance in parallel with the diodes' zero-bias resistance n·V_T/(2·I_s) (Shockley), 2.5 ppm below R_s + R_sh.
        Check.Within(Rsh + Rser, P(range, "resistance"), 2);
        Check.Within(Math.Log(Isat), P(range, "lnSaturationCurrent"), 2);
        Check.Within(NString, P(range, "ideality"), 2);
        var diodeZeroBias = NString * VtAt23C / (2 * Isat);
        Check.Within(1 / ((1 / (Rsh + Rser)) + (1 / diodeZeroBias)), range.ResistanceOhms, 2);
    }

    [Fact]
    public void Fit_AtOnset_IsAndNAreStronglyCorrelated_AndTheReportedCorrelationSaysSo()
    {
        var range = Characteriser.Analyse(Sweep(new Random(7)), null).Ranges[0];
        var names = range.Parameters!.Select(p => p.Name).ToList();

        // Over the onset the exponential's amplitude and slope trade against each other: ln I_s and n move together.
        var rho = range.Correlation![names.IndexOf("lnSaturationCurrent")][names.IndexOf("ideality")];
        Assert.InRange(rho, 0.95, 1.0);
    }

    [Fact]
    public void Fit_AtOnset_SeriesResistanceAddsNothing_TheFiveParameterFitHasTheSameChiSquare()
    {
        var range = Characteriser.Analyse(Sweep(new Random(7)), null).Ranges[0];
        var five = range.ModelComparison!.Candidates.Single(c => c.Model == "clamp-diodes");
        var four = range.ModelComparison.Candidates.Single(c => c.Model == "clamp-diodes-onset");

        // Before the diodes clamp, moving resistance from the shunt to the series part is undone by I_s and n to first order.
        Assert.True(five.Fitted && four.Fitted);
        Assert.True(Math.Abs(five.ChiSquare - four.ChiSquare) <= 0.5, $"χ² five {five.ChiSquare:G6}, four {four.ChiSquare:G6}");
        Assert.True(five.Aicc > four.Aicc);
    }

    [Fact]
    public void Fit_AtOnset_ExpandedIntervalsCoverTheTruth_InMostOf40Sweeps()
    {
        var covered = new int[3];
        const int trials = 40;
        for (var seed = 100; seed < 100 + trials; seed++)
        {
            var range = Characteriser.Analyse(Sweep(new Random(seed)), null).Ranges[0];
            Assert.Equal("clamp-diodes-onset", range.Model);
            covered[0] += Covers(Rsh + Rser, P(range, "resistance")) ? 1 : 0;
            covered[1] += Covers(Math.Log(Isat), P(range, "lnSaturationCurrent")) ? 1 : 0;
            covered[2] += Covers(NString, P(range, "ideality")) ? 1 : 0;
        }

        // A k = 2 interval covers about 95 % of the time (GUM, JCGM 100:2008, 6.3.3); 33 of 40 is well below that yet clear of chance.
        Assert.All(covered, c => Assert.InRange(c, 33, trials));
    }

    [Fact]
    public void OnsetStart_ReturnsNull_ForADropThatCurvesUp()
    {
        // A heating fuse bends the drop upwards: the top points carry more drop than the low slope, not less, so no diode current is missing.
        var model = new ClampDiodeOnsetModel(296.15);
        var current = Some.Linear(0.003, 0.06, 20).ToArray();
        var drop = current.Select(i => 12.3 * i * (1 + (0.8 * i * i))).ToArray();

        Assert.Null(model.Start(new DropData(current, drop, current.Select(_ => 1e12).ToArray(), double.NaN)));
    }

    [Fact]
    public void ClampDiodeOnsetModel_GradientMatchesFiniteDifferences()
    {
        Check.GradientMatchesFiniteDifferences(new ClampDiodeOnsetModel(296.15), 0.006, [1e-7, 120.3, Math.Log(1e-9), 3.8], 1e-12);
    }

    private static bool Covers(double truth, Estimate e) => Math.Abs(e.Value - truth) <= 2 * e.StandardUncertainty;

    private static List<Sample> Sweep(Random rng)
    {
        // 20 points from 1 % to 100 % of full scale, logarithmic, 5 samples each with 0.5 µV of voltmeter noise.
        var currents = Enumerable.Range(0, 20).Select(k => FullScale * Math.Pow(100, (k / 19.0) - 1));
        return Some.Sweep("6mA", "mA", currents, i => (Rser * i) + ModelRecoveryTests.ShuntVoltage(i, Rsh, Isat, NString * VtAt23C), 0.5e-6, 5, rng);
    }

    private static Estimate P(RangeResult range, string name)
    {
        var p = range.Parameters!.Single(q => q.Name == name);
        return new Estimate(p.Value, p.StandardUncertainty);
    }
}

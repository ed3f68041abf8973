using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Analysis.Tests;

public sealed class TapSeparationTests
{
    // Invented test unit: one jack with a 0.30 Ω fuse (+5 mΩ contacts) that heats with β = 0.8 A⁻², and two ranges whose manganin-like
    // shunts heat too (the case where no steady-state drop model can tell the two heating elements apart). Each element follows the
    // self-heating law R = R₀/(1 − β·I²), and the drop is the tap plus the series part (Kirchhoff's voltage law): common practice, no source.
    private const double Contacts = 0.005, Fuse = 0.30, FuseBeta = 0.8;

    [Fact]
    public void ShuntTap_RecoversEachShuntAndTheCommonSeriesPart_WhenBothHeat()
    {
        var rng = new Random(11);
        var samples = Range("400mA", 1.5, 1.4e-3, 0.4, 0, rng).Concat(Range("60mA", 12, 2e-4, 0.06, 100, rng)).ToList();

        var result = Characteriser.Analyse(samples, null);

        var tap = Assert.Single(result.Decomposition!).Separations[0];
        Assert.StartsWith("a tap voltmeter across each range's shunt", tap.Hypothesis, StringComparison.Ordinal);
        Check.Within(1.5, tap.ShuntOhms["400mA"], 4);
        Check.Within(12, tap.ShuntOhms["60mA"], 4);
        Check.Within(Fuse + Contacts, tap.CommonSeriesOhms, 4);
        Assert.Equal(1, tap.DegreesOfFreedom);
        Assert.True(tap.Consistent, $"p = {tap.PValue}");
    }

    [Fact]
    public void ShuntTap_SeriesPartsThatDisagree_FailTheChiSquareCheck()
    {
        // A tap wired one terminal too far on the 60mA range also spans 50 mΩ of the series path: its series part no longer matches.
        var rng = new Random(12);
        var samples = Range("400mA", 1.5, 0, 0.4, 0, rng).Concat(Range("60mA", 12, 0, 0.06, 100, rng, tapAlsoSpans: 0.05)).ToList();

        var result = Characteriser.Analyse(samples, null);

        var tap = Assert.Single(result.Decomposition!).Separations[0];
        Assert.False(tap.Consistent, $"χ² = {tap.ChiSquare}");
    }

    [Fact]
    public void Journal_WithoutTapReadings_GivesNoTapSeparation()
    {
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0.006, 0.06, 12), i => 12.3 * i, 1e-6, 5, new Random(3));

        var result = Characteriser.Analyse(samples, null);

        Assert.DoesNotContain(result.Decomposition!.SelectMany(d => d.Separations), s => s.Hypothesis.StartsWith("a tap", StringComparison.Ordinal));
    }

    private static IEnumerable<Sample> Range(string name, double shunt, double shuntBeta, double fullScale, int firstStep, Random rng, double tapAlsoSpans = 0)
    {
        const double dropNoise = 2e-6, tapNoise = 2e-6;
        var step = firstStep;
        foreach (var i in Some.Linear(fullScale / 20, fullScale, 20))
        {
            var vShunt = shunt * i / (1 - (shuntBeta * i * i));
            var vSeries = (Contacts * i) + (Fuse * i / (1 - (FuseBeta * i * i)));
            for (var k = 0; k < 6; k++)
            {
                var drop = vShunt + vSeries + (dropNoise * Some.Gaussian(rng));
                var tap = vShunt + (tapAlsoSpans * i) + (tapNoise * Some.Gaussian(rng));
                yield return new Sample(name, "mA", step, k, new Current(i), new Current(i), double.NaN, new Voltage(drop), new Voltage(5), new Voltage(4), TimeSpan.FromSeconds((step * 6) + k), new Voltage(tap));
            }

            step++;
        }
    }
}

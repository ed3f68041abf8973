using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis.Tests;

public sealed class DecompositionTests
{
    private const double Fuse = 0.15;

    [Fact]
    public void Decompose_NominalHypothesis_RecoversTheCommonFuse_AndPassesItsChiSquareCheck()
    {
        var (samples, uut) = ThreeRangesOneJack(shuntScale: 1.0, seed: 1);

        var result = Characteriser.Analyse(samples, uut);

        var jack = Assert.Single(result.Decomposition!);
        var nominal = jack.Separations.Single(s => s.Hypothesis.StartsWith("each shunt is at its nominal", StringComparison.Ordinal));
        Check.Within(Fuse, nominal.CommonSeriesOhms, 4);
        Assert.Equal(2, nominal.DegreesOfFreedom);
        Assert.True(nominal.Consistent, $"p = {nominal.PValue}");
    }

    [Fact]
    public void Decompose_ShuntRatioHypothesis_SeesShuntsOffNominal_AndStillSeparatesTheFuse()
    {
        // All shunts 2 % above nominal (one manufacturing lot): the nominal hypothesis fails its χ² check, the ratio hypothesis holds.
        var (samples, uut) = ThreeRangesOneJack(shuntScale: 1.02, seed: 2);

        var result = Characteriser.Analyse(samples, uut);

        var seps = Assert.Single(result.Decomposition!).Separations;
        var nominal = seps.Single(s => s.Hypothesis.StartsWith("each shunt is at its nominal", StringComparison.Ordinal));
        var ratio = seps.Single(s => s.Hypothesis.StartsWith("the shunts keep the ratios", StringComparison.Ordinal));
        Assert.False(nominal.Consistent);
        Assert.True(ratio.Consistent, $"p = {ratio.PValue}");
        Check.Within(Fuse, ratio.CommonSeriesOhms, 4);
        Check.Within(1.02, ratio.Extra!["shuntScale"], 4);
        Check.Within(1.02 * 10, ratio.ShuntOhms["6mA"], 4);
    }

    [Fact]
    public void Decompose_SharedHeating_SeparatesAHeatingFuseFromAStableShunt()
    {
        // 10 A jack: fuse 10 mΩ heating with β = 4e-3 A⁻² (β·I² = 0.4 at 10 A), shunt 5 mΩ manganin (no heating).
        const double fuse = 0.010, beta = 4e-3, shunt = 0.005;
        var samples = Some.Sweep("10A", "A", Some.Linear(0, 10, 40), i => (shunt * i) + (fuse * i / (1 - (beta * i * i))), 2e-6, 10, new Random(4));

        var result = Characteriser.Analyse(samples, null);

        var heating = Assert.Single(Assert.Single(result.Decomposition!).Separations);
        Assert.StartsWith("only the jack's common element", heating.Hypothesis, StringComparison.Ordinal);
        Check.Within(fuse, heating.CommonSeriesOhms, 4);
        Check.Within(shunt, heating.ShuntOhms["10A"], 4);
        Check.Within(beta, heating.Extra!["heatingCoefficientPerA2"], 4);
    }

    private static (List<ShuntSweep.Core.Records.Sample> Samples, UutDescription Uut) ThreeRangesOneJack(double shuntScale, int seed)
    {
        var rng = new Random(seed);
        (string Name, double Nominal, double FullScale)[] ranges = [("6mA", 10, 0.006), ("60mA", 1, 0.06), ("600mA", 0.1, 0.6)];
        var samples = new List<ShuntSweep.Core.Records.Sample>();
        var step = 0;
        foreach (var (name, nominal, fs) in ranges)
        {
            samples.AddRange(Some.Sweep(name, "mA", Some.Linear(0, fs, 15), i => ((nominal * shuntScale) + Fuse) * i, 2e-6, 5, rng, step));
            step += 15;
        }

        var uut = new UutDescription(
            "Invented Instruments", "DM-1", "SN-0001", null,
            [new JackSpec("mA", new Current(0.8), null)],
            ranges.Select(r => new RangeSpec(r.Name, "mA", new Current(r.FullScale), new Current(r.FullScale / 6000), new Resistance(r.Nominal), new AccuracySpec(0.005, 2), null, 0.1)).ToList());
        return (samples, uut);
    }
}

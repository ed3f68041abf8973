using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

public sealed class DecompositionAgainstSimulationTests
{
    [Fact]
    public async Task ShuntTap_OnTheLx1_RecoversEveryShuntAndEachJacksFuseAndContacts_WithinExpandedUncertainty()
    {
        var bench = Repo.File("simulators/frontend-kestrel-lx1-proto.yaml");
        var result = await RunAsync("sequences/rnd-wide-range-lx1.yaml", bench);
        await using var truth = Truth(bench);

        var misses = new List<string>();
        foreach (var jack in result.Decomposition!)
        {
            var tap = jack.Separations.Single(s => s.Hypothesis.StartsWith("a tap voltmeter", StringComparison.Ordinal));
            // Two ranges on IN give a χ² check of their common series part; the single range on LO leaves nothing to check.
            Assert.Equal(jack.Ranges.Count > 1 ? true : null, tap.Consistent);

            // Ground truth from the simulation section: the jack's fuse (as built for this seed) plus its contacts, and each range's front end.
            // Kirchhoff's voltage law along the jack (common practice, no source): drop = tap + I·(fuse + contacts).
            var series = truth.FuseColdResistance(jack.Jack).Ohms + truth.ContactResistance(jack.Jack).Ohms;
            Expect(misses, $"{jack.Jack} series part", series, tap.CommonSeriesOhms);
            foreach (var (range, shunt) in tap.ShuntOhms)
            {
                Expect(misses, $"{range} shunt", truth.ExpectedSeriesResistance(range).Ohms - series, shunt);
            }
        }

        Assert.True(misses.Count == 0, string.Join("; ", misses));
    }

    [Fact]
    public async Task Tw18Demo_RejectsTheHypothesesItsUnitBreaks_AndEveryConsistentOneHoldsTheTruth()
    {
        var bench = Repo.File("simulators/handheld-tarnwell-tw18.yaml");
        var result = await RunAsync("sequences/demo-handheld.yaml", bench);
        await using var truth = Truth(bench);

        // The simulated TW-18's shunts are off their nominal values by up to their 0.2 % tolerance, and its 10 A shunt heats along
        // with the fuse: the nominal-shunt hypothesis on the mA jack and the fuse-only heating hypothesis on the 10A jack are false.
        var mA = result.Decomposition!.Single(d => d.Jack == "mA");
        Assert.Equal(false, mA.Separations.Single(s => s.Hypothesis.StartsWith("each shunt is at its nominal", StringComparison.Ordinal)).Consistent);
        var tenA = result.Decomposition!.Single(d => d.Jack == "10A");
        Assert.Equal(false, tenA.Separations.Single(s => s.Hypothesis.StartsWith("only the jack's common element", StringComparison.Ordinal)).Consistent);

        // The demo's thermal holds on the 400mA and 10A ranges split the heating between the fast fuse and the slow shunt. The split's own
        // check cannot tell it from no split (the first sample's timing is not known well enough), so it is unchecked, not consistent;
        // its fuse is checked against the configuration here instead.
        var thermalMisses = new List<string>();
        foreach (var d in result.Decomposition!)
        {
            var split = d.Separations.Single(s => s.Hypothesis.StartsWith("the thermal hold", StringComparison.Ordinal));
            Assert.NotEqual(false, split.Consistent);
            Expect(thermalMisses, $"{d.Jack} fuse from the thermal hold", truth.FuseColdResistance(d.Jack).Ohms, split.CommonSeriesOhms);
        }

        Assert.True(thermalMisses.Count == 0, string.Join("; ", thermalMisses));

                // One range on a jack leaves the nominal hypothesis exactly determined: no check, so it must not claim consistency.
        Assert.Null(tenA.Separations.Single(s => s.Hypothesis.StartsWith("each shunt is at its nominal", StringComparison.Ordinal)).Consistent);

        var misses = new List<string>();
        foreach (var jack in result.Decomposition!)
        {
            foreach (var s in jack.Separations.Where(s => s.Consistent == true))
            {
                var fuse = truth.FuseColdResistance(jack.Jack).Ohms;
                var fuseOnly = s.Hypothesis.StartsWith("only the jack's common element", StringComparison.Ordinal) || s.Hypothesis.StartsWith("the thermal hold", StringComparison.Ordinal);
                var expected = fuseOnly ? fuse : fuse + truth.ContactResistance(jack.Jack).Ohms;
                Expect(misses, $"{jack.Jack}: {s.Hypothesis}", expected, s.CommonSeriesOhms);
            }
        }

        Assert.True(misses.Count == 0, string.Join("; ", misses));
    }

    private static void Expect(List<string> misses, string what, double expected, Estimate fitted)
    {
        if (Math.Abs(fitted.Value - expected) > 2 * fitted.StandardUncertainty)
        {
            misses.Add($"{what}: fitted {fitted.Value:G8} ± {2 * fitted.StandardUncertainty:G3} Ω (k = 2), configured {expected:G8} Ω");
        }
    }

    private static SimulatedBench Truth(string bench) => SimulatedBench.Create(BenchReader.Load(bench), new VirtualBenchClock(new VirtualTimeProvider()), 7);

    private static async Task<CharacterisationResult> RunAsync(string sequence, string bench)
    {
        var dir = Some.TempDirectory();
        // The LX-1 prototype completes outside its accuracy and burden targets (exit 1); the decomposition is what is checked here.
        Assert.Equal(sequence.Contains("lx1", StringComparison.Ordinal) ? 1 : 0, await Cli.RunAsync("run", Repo.File(sequence), "--bench", bench, "--out", dir, "--seed", "7"));
        return ResultJson.Read(Path.Combine(dir, "result.json"));
    }
}

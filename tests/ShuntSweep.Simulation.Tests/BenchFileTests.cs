using ShuntSweep.Core.Documents;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class BenchFileTests
{
    public static TheoryData<string> Files() => [.. Benches.All.Select(f => Path.GetFileName(f))];

    [Theory]
    [MemberData(nameof(Files))]
    public async Task EverySimulatedBench_ServesItsInstruments_AndSweepsEveryRangeCleanly(string file)
    {
        await using var rig = Rig.Open(Path.Combine(Benches.Root, "simulators", file));
        Assert.Equal(4, (await rig.Supply.QueryAsync("*IDN?")).Split(',').Length);
        var ranges = rig.Bench.Description.Uut.Ranges;
        foreach (var range in ranges)
        {
            await rig.DriveAsync(range.FullScale.Amperes.ToString("R", System.Globalization.CultureInfo.InvariantCulture), (0.5 * range.FullScale.Amperes).ToString("R", System.Globalization.CultureInfo.InvariantCulture), "3");
            var drop = await rig.DropAsync(1, "AUTO");
            var expected = 0.5 * range.FullScale.Amperes * rig.Bench.ExpectedSeriesResistance(range.Name).Ohms;
            Assert.Equal(expected, drop, (expected * 0.05) + 20e-6);
            var reading = (await rig.Uut.NumbersAsync("READ?"))[0];
            Assert.Equal(0.5 * range.FullScale.Amperes, reading, 0.5 * range.FullScale.Amperes * 0.02);
            await rig.Load.SendAsync("INP OFF");
        }

        foreach (var client in new[] { rig.Supply, rig.Load, rig.Dmm, rig.Uut })
        {
            Assert.Empty(await client.DrainErrorsAsync());
        }
    }

    [Fact]
    public async Task WeakFuseDemo_OpensInsideThe400mARangesOverRange()
    {
        await using var rig = Rig.Open(Path.Combine(Benches.Root, "simulators", "handheld-tarnwell-tw18-weak-fuse.yaml"));
        await rig.DriveAsync("400 mA", "0.4");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(20), TestContext.Current.CancellationToken);
        Assert.False(rig.Bench.IsFuseOpen("mA"));
        await rig.Load.SendAsync("CURR 0.44");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(20), TestContext.Current.CancellationToken);
        Assert.True(rig.Bench.IsFuseOpen("mA"));

        // The healthy unit carries the same current.
        await using var healthy = Rig.Open(Benches.Handheld);
        await healthy.DriveAsync("400 mA", "0.44");
        await healthy.Clock.WaitAsync(TimeSpan.FromSeconds(40), TestContext.Current.CancellationToken);
        Assert.False(healthy.Bench.IsFuseOpen("mA"));
    }

    [Fact]
    public void MisspeltSimulationKey_IsAnErrorWithFileLineColumnAndSuggestion()
    {
        var text = File.ReadAllText(Benches.Handheld).Replace("contacts: 5 mohm", "contact: 5 mohm", StringComparison.Ordinal);
        var ex = Assert.Throws<DocumentException>(() => Benches.FromText(text));
        Assert.Contains("unknown key 'contact'", ex.Message, StringComparison.Ordinal);
        Assert.Contains("did you mean 'contacts'", ex.Message, StringComparison.Ordinal);
        Assert.True(ex.Line > 0 && ex.Column > 0);
    }

    [Fact]
    public void SimulationOfAnUnknownRange_IsAnError()
    {
        var text = File.ReadAllText(Benches.Handheld).Replace("      60mA: { tolerance: 0.002 }", "      60 mA: { tolerance: 0.002 }", StringComparison.Ordinal);
        var ex = Assert.Throws<DocumentException>(() => Benches.FromText(text));
        Assert.Contains("no range '60 mA'", ex.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("simulation:\n  ambient: 23 °C", "simulation:\n  ambient: -300 °C", "above absolute zero", "-300 °C")]
    [InlineData("lineFrequency: 50 Hz", "lineFrequency: 0 Hz", "50 Hz or 60 Hz", "0 Hz")]
    [InlineData("fuse: { coldResistance: 0.3 ohm", "fuse: { coldResistance: -0.3 ohm", "expected > 0 Ω", "-0.3 ohm")]
    [InlineData("contacts: 5 mohm", "contacts: -5 mohm", "expected ≥ 0 Ω", "-5 mohm")]
    [InlineData("timeConstant: 0.8 s", "timeConstant: 0 s", "expected > 0 s", "0 s")]
    [InlineData("meltingPoint: 960 °C, preArcingI2t: 0.6", "meltingPoint: 20 °C, preArcingI2t: 0.6", "above the ambient of 23 °C", "20 °C")]
    [InlineData("saturationCurrent: 1 nA, ideality: 1.9, series: 2 }\n      6mA", "saturationCurrent: -1 nA, ideality: 1.9, series: 2 }\n      6mA", "expected > 0 A", "-1 nA")]
    public void ImpossibleSimulationValue_IsRefused_AtItsPosition(string original, string replacement, string expected, string at)
    {
        var text = File.ReadAllText(Benches.Handheld);
        Assert.Contains(original, text, StringComparison.Ordinal);
        text = text.Replace(original, replacement, StringComparison.Ordinal);
        var ex = Assert.Throws<DocumentException>(() => Benches.FromText(text));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.StartsWith(at, text.Split('\n')[ex.Line - 1][(ex.Column - 1)..], StringComparison.Ordinal);
    }
}

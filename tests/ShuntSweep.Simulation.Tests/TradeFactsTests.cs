using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class TradeFactsTests
{
    [Theory]
    [InlineData("600 uA", "600e-6")]
    [InlineData("6 mA", "6e-3")]
    [InlineData("60 mA", "60e-3")]
    [InlineData("400 mA", "400e-3")]
    [InlineData("10 A", "10")]
    public async Task OrdinaryHandheld_FullScaleBurden_IsBetween0p7And1Volt(string fullScale, string current)
    {
        // Common practice, no source: the full-scale burden of an ordinary handheld meter's current ranges is often 0.7 V to 1 V.
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync(fullScale, current);
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(5), TestContext.Current.CancellationToken);
        var drop = await rig.DropAsync(1, "10");
        Assert.InRange(drop, 0.7, 1.0);
        Assert.Equal("0", await rig.Load.QueryAsync("STAT:QUES:COND?"));
    }

    [Fact]
    public async Task Gain100Amplifier_DropFallsAbout100Times_ButNotToZero()
    {
        // Common practice, no source: a gain-100 amplifier lets the shunt be 100 times smaller for the same reading, so the drop falls
        // about 100× — not quite, and not to zero, because the fuse and the contacts stay in series.
        const string ranges = """
                ranges:
                  plain: { shunt: 100 ohm }
                  amplified: { shunt: 1 ohm, amplifier: { gain: 100, inputOffset: 0 V, outputSwing: 1.2 V } }
            """;
        await using var rig = Rig.FromText(TwoRangeBench(ranges));
        await rig.DriveAsync("10 mA", "0.01");
        var plain = await rig.DropAsync(10, "10");
        var plainReading = (await rig.Uut.NumbersAsync("READ?"))[0];
        await rig.Uut.SendAsync("SIM:UUT:RANG \"amplified\"");
        var amplified = await rig.DropAsync(10, "1");
        var amplifiedReading = (await rig.Uut.NumbersAsync("READ?"))[0];

        Assert.InRange(plain / amplified, 50, 100);
        Assert.True(amplified > 0.005, $"the amplified range still drops {amplified} V");
        Assert.Equal(plainReading, amplifiedReading, 50e-6);
    }

    [Fact]
    public async Task In100Ohm1VoltCircuit_SensitiveRangeRoughlyHalvesTheCurrent_HighestRangeBarelyChangesIt()
    {
        // Common practice, no source: in a circuit of 1 V behind 100 Ω (10 mA undisturbed), a sensitive range with about 100 Ω of
        // shunt roughly halves the current; the highest-current range barely changes it. The circuit is the supply set to 1 V with
        // 100 Ω of output resistance, closed by the load held in dropout (it then behaves as a resistor of a few microohms).
        var text = File.ReadAllText(Benches.Handheld)
            .Replace("outputResistance: 2 mohm", "outputResistance: 100 ohm", StringComparison.Ordinal)
            .Replace("minimumVoltage: 0.55 V", "minimumVoltage: 1 uV", StringComparison.Ordinal)
            .Replace("wiring: 30 mohm", "wiring: 0 ohm", StringComparison.Ordinal);
        await using var rig = Rig.FromText(text);
        const double undisturbed = 1.0 / 100;

        await rig.DriveAsync("6 mA", "1", supplyVolts: "1");
        var sensitive = (await rig.Uut.NumbersAsync("READ?"))[0];
        await rig.DriveAsync("10 A", "1", supplyVolts: "1");
        var highest = rig.Bench.Truth().Current.Amperes;

        Assert.InRange(rig.Bench.ExpectedSeriesResistance("6mA").Ohms, 80, 130); // the sensitive range is about 100 Ω
        Assert.InRange(sensitive / undisturbed, 0.4, 0.6);
        Assert.InRange(highest / undisturbed, 0.998, 1.0);
    }

    internal static string TwoRangeBench(string simulationRanges) => $$"""
        bench: two ranges
        uut:
          manufacturer: Test Maker
          model: T-2
          serial: T2-0001
          jacks:
            - { name: IN, fuseRating: 1 A }
          ranges:
            - { name: plain, jack: IN, fullScale: 10 mA, resolution: 1 uA, accuracy: { reading: 0, counts: 0 } }
            - { name: amplified, jack: IN, fullScale: 10 mA, resolution: 1 uA, accuracy: { reading: 0, counts: 0 } }
        supply: { voltage: 5 V, currentLimit: 1 A }
        load: { minimumVoltage: 0.5 V, maxCurrent: 5 A }
        wiring: 10 mohm
        instruments:
          supply: { resource: "SIM::supply" }
          load: { resource: "SIM::load" }
          dropMeter: { resource: "SIM::dmm" }
          uutMeter: { resource: "SIM::uut" }
        simulation:
          uut:
            jacks:
              IN: { contacts: 2 mohm, fuse: { coldResistance: 0.1 ohm } }
        {{simulationRanges}}
        """;
}

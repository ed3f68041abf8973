using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class InstrumentTests
{
    [Fact]
    public async Task VoltmeterInputResistance_TakesItsShareOfTheLoopCurrent()
    {
        // Ohm's law on the voltmeter: across the jacks it draws V/R_in, which the UUT does not carry (10 MΩ above 10 V, 10 GΩ below).
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("600 uA", "0.0005");
        await rig.Dmm.SendAsync("CONF:VOLT:DC 100");
        var (drop, current) = rig.Bench.Truth();
        Assert.Equal(0.0005 - (drop.Volts / 10e6), current.Amperes, 1e-13);
        await rig.Dmm.SendAsync("CONF:VOLT:DC 1");
        (drop, current) = rig.Bench.Truth();
        Assert.Equal(0.0005 - (drop.Volts / 10e9), current.Amperes, 1e-13);
    }

    [Fact]
    public async Task Measurement_TakesSamplesTimesNplcOverLineFrequency_TwiceWithAutoZero()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.Dmm.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 10;:SAMP:COUN 4;:ZERO:AUTO OFF");
        var before = rig.Elapsed;
        Assert.Equal(4, (await rig.Dmm.NumbersAsync("READ?")).Length);
        Assert.Equal(TimeSpan.FromSeconds((4 * 10 / 50.0) + 0.002), rig.Elapsed - before); // 4 × 10 cycles at 50 Hz + 2 ms overhead
        await rig.Dmm.SendAsync("ZERO:AUTO ON");
        before = rig.Elapsed;
        await rig.Dmm.SendAsync("INIT");
        Assert.Equal(before, rig.Elapsed); // INITiate returns at once; FETCh? waits
        await rig.Dmm.QueryAsync("FETC?");
        Assert.Equal(TimeSpan.FromSeconds((((3 * 2) + 1) * 10 / 50.0) + 0.002), rig.Elapsed - before);
    }

    [Fact]
    public async Task VoltmeterNoise_FallsAsOneOverRootNplc()
    {
        // White noise averaged over an integration time T has σ ∝ 1/√T (standard result for averaging independent samples).
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("60 mA", "0.03");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(60), TestContext.Current.CancellationToken); // let the fuse settle: no drift in the samples
        await rig.Dmm.SendAsync("CONF:VOLT:DC 1;:SAMP:COUN 400;:VOLT:NPLC 0.1");
        var fast = StandardDeviation(await rig.Dmm.NumbersAsync("READ?"));
        await rig.Dmm.SendAsync("VOLT:NPLC 1");
        var slow = StandardDeviation(await rig.Dmm.NumbersAsync("READ?"));
        Assert.Equal(Math.Sqrt(10), fast / slow, 0.4);
    }

    [Fact]
    public async Task LoadDropsOut_WhenTheSupplyCannotKeepItsMinimumVoltage()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("60 mA", "0.05", supplyVolts: "1.5");
        Assert.Equal("0", await rig.Load.QueryAsync("STAT:QUES:COND?"));
        await rig.Supply.SendAsync("VOLT 1.0"); // 0.05 A × ~12.4 Ω leaves less than the load's 0.55 V
        Assert.Equal("2", await rig.Load.QueryAsync("STAT:QUES:COND?"));
        var current = await rig.Load.NumberAsync("MEAS:CURR?");
        Assert.InRange(current, 0.01, 0.049);
        var loadVolts = await rig.Load.NumberAsync("MEAS:VOLT?");
        Assert.Equal(0.55 * current / 0.05, loadVolts, 0.002); // below its minimum the load behaves as V_min/I_set ohms
    }

    [Fact]
    public async Task SupplyCurrentLimit_HoldsTheLoopAtItsLimit()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("60 mA", "0.05");
        await rig.Supply.SendAsync("CURR 0.02");
        Assert.Equal("2", await rig.Supply.QueryAsync("STAT:QUES:COND?"));
        Assert.Equal("2", await rig.Load.QueryAsync("STAT:QUES:COND?"));
        Assert.Equal(0.02, await rig.Supply.NumberAsync("MEAS:CURR?"), 1e-4);
        Assert.True(await rig.Supply.NumberAsync("MEAS:VOLT?") < 4.9);
    }

    [Fact]
    public async Task UutReading_IsWithinItsSpec_QuantisedToCounts_AndOverloadsAboveOverRange()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("60 mA", "0.04321");
        var reading = (await rig.Uut.NumbersAsync("READ?"))[0];
        var truth = rig.Bench.Truth().Current.Amperes;
        Assert.InRange(Math.Abs(reading - truth), 0, (0.01 * truth) + (3 * 10e-6)); // ±(1 % + 3 counts) of the spec
        Assert.Equal(0, Math.IEEERemainder(reading, 10e-6), 1e-12);

        await rig.Load.SendAsync("CURR 0.067"); // above 60 mA + 10 % over-range
        Assert.Equal("+9.900000000E+37", await rig.Uut.QueryAsync("READ?"));
    }

    [Fact]
    public async Task PerUnitErrors_AreDrawnFromTheSerial()
    {
        // Six serials are six units: their gain and offset errors (and shunt within tolerance) differ, each within its accuracy.
        var dir = Directory.CreateTempSubdirectory("shuntsweep-serials-").FullName;
        async Task<double> ReadingAsync(int unit)
        {
            var file = Path.Combine(dir, $"unit-{unit}.yaml");
            await File.WriteAllTextAsync(file, (await File.ReadAllTextAsync(Benches.Handheld)).Replace("serial: TW18-240417", $"serial: TW18-24{unit:0000}", StringComparison.Ordinal));
            await using var rig = Rig.Open(file, seed: 1);
            await rig.DriveAsync("6 mA", "0.005");
            return (await rig.Uut.NumbersAsync("READ?"))[0];
        }

        var readings = new List<double>();
        for (var unit = 1; unit <= 6; unit++)
        {
            readings.Add(await ReadingAsync(unit));
        }

        Assert.True(readings.Distinct().Count() > 2, "different units should read differently");
        Assert.All(readings, r => Assert.InRange(r, 0.005 * 0.99, 0.005 * 1.01));
    }

    [Fact]
    public async Task AmplifiedShunt_ReadingOverloadsAtOutputSwing_WhileTheDropStaysOhmic()
    {
        await using var rig = Rig.Open(Path.Combine(Benches.Root, "simulators", "frontend-kestrel-lx1-proto.yaml"));
        await rig.DriveAsync("10 mA", "0.011", supplyVolts: "3");
        var below = await rig.DropAsync(1, "0.1");
        Assert.True(double.IsFinite((await rig.Uut.NumbersAsync("READ?"))[0]));
        await rig.Load.SendAsync("CURR 0.0118"); // 100 × (11.8 mA × 1 Ω + 40 µV) > 1.15 V output swing
        var above = await rig.DropAsync(1, "0.1");
        Assert.Equal("+9.900000000E+37", await rig.Uut.QueryAsync("READ?"));
        var r = rig.Bench.ExpectedSeriesResistance("10mA").Ohms;
        Assert.Equal(r * 0.0008, above - below, r * 0.0008 * 0.02); // still Ohm's law across the overload
    }

    [Fact]
    public async Task FeedbackAmmeter_DropIsMicrovoltsBelowTheKnee_AndRisesSteeplyBeyond()
    {
        await using var rig = Rig.Open(Path.Combine(Benches.Root, "simulators", "frontend-kestrel-lx1-proto.yaml"));
        await rig.DriveAsync("100 uA", "0.0001", supplyVolts: "3");
        var atFullScale = await rig.DropAsync(10, "0.1");
        Assert.InRange(atFullScale, 0, 50e-6);
        await rig.Load.SendAsync("CURR 0.00013"); // |I·R_f| = 1.3 V > 1.2 V swing: past the knee
        var pastKnee = await rig.DropAsync(10, "1");
        Assert.InRange(pastKnee, 0.05, 0.2);
        Assert.Equal("+9.900000000E+37", await rig.Uut.QueryAsync("READ?"));
    }

    [Fact]
    public async Task ClampDiodes_HoldTheDropNearDiodeVoltagesOnOverload()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("600 uA", "0.0006");
        var fullScale = await rig.DropAsync(1, "10");
        await rig.Load.SendAsync("CURR 0.02"); // 33× full scale: a plain 1.2 kΩ would need 24 V
        var overload = await rig.DropAsync(1, "10");
        Assert.InRange(fullScale, 0.7, 0.75);
        // Two diodes in series per direction, n = 1.9: V = 2·n·V_T·asinh(I/(2·Is)) ≈ 1.63 V at 20 mA, about 0.8 V per diode.
        Assert.InRange(overload, 1.2, 1.8);
    }

    [Fact]
    public async Task RingShunt_RangesShareSections()
    {
        const string ring = """
                jacks:
                  IN: { contacts: 1 mohm, fuse: { coldResistance: 0.2 ohm }, ring: { sections: { a: 9 ohm, b: 0.9 ohm, c: 0.1 ohm } } }
                ranges:
                  10mA: { sections: [a, b, c] }
                  1A: { sections: [c] }
            """;
        var text = PhysicsTests.MinimalBench(fuse: "{ coldResistance: 0.2 ohm }")
            .Replace("""
                  jacks:
                    IN: { contacts: 1 mohm, fuse: { coldResistance: 0.2 ohm } }
                """, ring, StringComparison.Ordinal);
        await using var rig = Rig.FromText(text);
        Assert.Equal(10.0 + 0.2 + 0.001, rig.Bench.ExpectedSeriesResistance("10mA").Ohms, 1e-12);
        Assert.Equal(0.1 + 0.2 + 0.001, rig.Bench.ExpectedSeriesResistance("1A").Ohms, 1e-12);
        await rig.DriveAsync("1 A", "0.5");
        Assert.Equal(0.5 * 0.301, await rig.DropAsync(10, "1"), 0.5 * 0.301 * 2e-3);
    }

    [Fact]
    public async Task Reference_ReadsTheLoopCurrent_AsAmmeterOrAsVoltageAcrossItsShunt()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.DriveAsync("400 mA", "0.25");
        await rig.Ref!.SendAsync("CONF:CURR:DC 1;:CURR:DC:NPLC 10");
        var amperes = (await rig.Ref.NumbersAsync("READ?"))[0];
        await rig.Ref.SendAsync("CONF:VOLT:DC 0.1;:VOLT:DC:NPLC 10;:ZERO:AUTO ON");
        var volts = (await rig.Ref.NumbersAsync("READ?"))[0];
        Assert.Equal(0.25, amperes, 1e-5);
        Assert.Equal(0.25 * 0.010, volts, 1e-6); // Ohm's law across the 10 mΩ reference shunt
        Assert.Empty(await rig.Ref.DrainErrorsAsync());
    }

    private static double StandardDeviation(double[] values)
    {
        var mean = values.Average();
        return Math.Sqrt(values.Sum(v => (v - mean) * (v - mean)) / (values.Length - 1));
    }
}

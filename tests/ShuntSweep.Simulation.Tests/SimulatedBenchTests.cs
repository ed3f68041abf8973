using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class SimulatedBenchTests
{
    [Fact]
    public async Task Drop_EqualsCurrentTimesSeriesResistance_OhmsLaw()
    {
        var (bench, _) = Benches.Create(Benches.Handheld);
        await using var _b = bench;
        await using var supply = new ScpiClient(bench.Connect("supply"));
        await using var load = new ScpiClient(bench.Connect("load"));
        await using var dmm = new ScpiClient(bench.Connect("dmm"));
        await using var uut = new ScpiClient(bench.Connect("uut"));

        await uut.SendAsync("CONF:CURR 60 mA");
        await supply.SendAsync("VOLT 5;CURR 1;OUTP ON");
        await load.SendAsync("FUNC CURR;CURR 10 MA;INP ON");
        await dmm.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 10");
        var drop = (await dmm.NumbersAsync("READ?"))[0];

        // Ohm's law, V = I·R (the 10 mA through the 60 mA range heats the fuse by well under 0.1 %).
        var expected = 0.010 * bench.ExpectedSeriesResistance("60mA").Ohms;
        Assert.Equal(expected, drop, expected * 2e-3);
        Assert.Empty(await dmm.DrainErrorsAsync());
        Assert.Equal("0", await load.QueryAsync("STAT:QUES:COND?"));
    }

    [Fact]
    public async Task ShuntTap_ReadsTheShuntAlone_SoDropMinusTapIsTheFuseAndContacts()
    {
        var text = File.ReadAllText(Benches.Handheld).Replace("  reference: { resource: \"SIM::ref\" }", "  reference: { resource: \"SIM::ref\" }\n  shuntTap: { resource: \"SIM::tap\" }", StringComparison.Ordinal);
        var (bench, _) = Benches.FromText(text);
        await using var _b = bench;
        await using var supply = new ScpiClient(bench.Connect("supply"));
        await using var load = new ScpiClient(bench.Connect("load"));
        await using var dmm = new ScpiClient(bench.Connect("dmm"));
        await using var tap = new ScpiClient(bench.Connect("tap"));
        await using var uut = new ScpiClient(bench.Connect("uut"));

        await uut.SendAsync("CONF:CURR 60 mA");
        await supply.SendAsync("VOLT 5;CURR 1;OUTP ON");
        await load.SendAsync("FUNC CURR;CURR 10 MA;INP ON");
        await dmm.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 10");
        await tap.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 10");
        var drop = (await dmm.NumbersAsync("READ?"))[0];
        var shunt = (await tap.NumbersAsync("READ?"))[0];

        // Kirchhoff's voltage law along the jack: drop = I·(contacts + fuse) + shunt voltage; 10 mA heats the fuse by well under 0.1 %.
        var fuseAndContacts = 0.010 * (bench.FuseColdResistance("mA").Ohms + bench.ContactResistance("mA").Ohms);
        Assert.Equal(fuseAndContacts, drop - shunt, fuseAndContacts * 2e-3);
        Assert.Equal(0.010 * (bench.ExpectedSeriesResistance("60mA").Ohms - bench.FuseColdResistance("mA").Ohms - bench.ContactResistance("mA").Ohms), shunt, 1e-5);
    }
}

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
}

using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class ProfileTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    [Fact]
    public void DefaultProfile_UsesScpi99StandardCommands()
    {
        var p = InstrumentProfile.Default;

        // SCPI-99 Vol. 2: SOURce:VOLTage, OUTPut[:STATe], MEASure:VOLTage?, CONFigure:VOLTage:DC, INITiate, FETCh?, SYSTem:ERRor?.
        Assert.Equal(["SOUR:VOLT 2.5"], p.Commands("supply.setVoltage", 2.5));
        Assert.Equal(["OUTP OFF"], p.Commands("supply.setOutput", false));
        Assert.Equal("MEAS:VOLT?", p.Query("supply.measureVoltage"));
        Assert.Equal(["CONF:VOLT:DC AUTO"], p.CommandsOrAuto("voltmeter.configure", null));
        Assert.Equal(["INIT"], p.Commands("voltmeter.arm"));
        Assert.Equal("FETC?", p.Query("voltmeter.fetch"));
        Assert.Equal("SYST:ERR?", p.Query("common.nextError"));
        Assert.Equal("*IDN?", p.Query("common.identify"));
        Assert.False(p.Supports("uut.setNplc"));
    }

    [Fact]
    public async Task CustomProfileFile_OverridesSomeOperations_AndKeepsTheRest()
    {
        var fake = new FakeInstrument("Test Bench Co,PS-9,SN900,3.0", "VSET", "ISET", "OUTP");
        await using var server = ScpiResponder.Start(fake);
        var bench = TestBench.Load(
            $"""
              supply:
                resource: {server.Resource}
                profile: ps9.yaml
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
            """,
            "ps9.yaml",
            """
            profile: test-ps9
            description: an invented supply with short setting headers
            words:
              on: "1"
              off: "0"
            supply:
              setVoltage: "VSET {value}"
              queryVoltage: "VSET?"
              setCurrentLimit: "ISET {value}"
              queryCurrentLimit: "ISET?"
            """);
        var entry = bench.Instruments[Core.Bench.InstrumentRole.Supply];
        var settings = DriverSettings.Read(entry.Settings, Path.GetDirectoryName(bench.File));
        var profile = InstrumentProfile.Load(settings.Profile, settings.BaseDirectory);
        await using var session = await BenchConnector.OpenSessionAsync(Resources.ResourceAddress.Parse(entry.Resource), settings, profile, null, TimeProvider.System, null, null, Ct);
        var supply = new ScpiSupply(session, profile);

        await supply.ConfigureAsync(Voltage.FromVolts(7), Current.FromAmperes(0.3), Ct);
        await supply.SetOutputAsync(true, Ct);

        Assert.Equal("test-ps9", profile.Name);
        Assert.Equal("7", fake.State["VSET"]);
        Assert.Equal("0.3", fake.State["ISET"]);
        Assert.Equal("1", fake.State["OUTP"]);
        Assert.Equal("MEAS:VOLT?", profile.Query("supply.measureVoltage"));
    }

    [Theory]
    [InlineData("profile: x\nsupply:\n  setVoltag: \"V {value}\"\n", "unknown key 'setVoltag'")]
    [InlineData("profile: x\nsupply:\n  setVoltage: \"V {volts}\"\n", "placeholder other than {value}")]
    [InlineData("supply:\n  setVoltage: \"V {value}\"\n", "'profile' is required")]
    [InlineData("profile: x\nextra: 1\n", "unknown key 'extra'")]
    [InlineData("profile: x\nload:\n  regulationLostMask: \"bit one\"\n", "bit value as a whole number")]
    public void BadProfileFile_IsRejectedWithPosition(string text, string expected)
    {
        var ex = Assert.Throws<DocumentException>(() => InstrumentProfile.Parse(text, "bad.yaml", InstrumentProfile.Default));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.StartsWith("bad.yaml:", ex.Message, StringComparison.Ordinal);
    }
}

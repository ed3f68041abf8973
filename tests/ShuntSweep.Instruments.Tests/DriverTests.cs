using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Tests.Support;
using ShuntSweep.Instruments.Transports;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class DriverTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    internal static async Task<MessageSession> OpenAsync(ScpiResponder responder, SessionOptions? options = null)
    {
        var address = (Resources.TcpSocketAddress)Resources.ResourceAddress.Parse(responder.Resource);
        TransportOpener opener = ct => TcpTransport.ConnectAsync(address.Text, address.Host, address.Port, ct);
        return new MessageSession(await opener(default), options ?? new SessionOptions { Timeout = TimeSpan.FromSeconds(1), ClearCommands = ["*CLS"] }, opener);
    }

    [Fact]
    public async Task Supply_Configure_SendsScpi99Settings_AndReadsThemBack()
    {
        var fake = FakeInstrument.Supply();
        fake.Queries["MEAS:VOLT?"] = f => FakeInstrument.Nr3(double.Parse(f.State["SOUR:VOLT"], System.Globalization.CultureInfo.InvariantCulture) - 0.001);
        await using var server = ScpiResponder.Start(fake);
        await using var session = await OpenAsync(server);
        var supply = new ScpiSupply(session, InstrumentProfile.Default);

        await supply.ConfigureAsync(Voltage.FromVolts(12.5), Current.FromMilliamperes(250), Ct);
        await supply.SetOutputAsync(true, Ct);
        fake.State["OUTP"] = "1"; // SCPI-99 booleans answer 1 or 0

        Assert.Equal("12.5", fake.State["SOUR:VOLT"]);
        Assert.Equal("0.25", fake.State["SOUR:CURR"]);
        Assert.True(await supply.IsOutputOnAsync(Ct));
        Assert.Equal(12.499, (await supply.MeasureVoltageAsync(Ct)).Volts, 12);
    }

    [Fact]
    public async Task Load_RejectedLevel_ThrowsTypedErrorWithScpiCode()
    {
        var fake = FakeInstrument.Load();
        fake.Checks["SOUR:CURR"] = p => double.Parse(p, System.Globalization.CultureInfo.InvariantCulture) <= 1;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await OpenAsync(server);
        var load = new ScpiLoad(session, InstrumentProfile.Default);

        var ex = await Assert.ThrowsAsync<InstrumentErrorException>(() => load.SetConstantCurrentAsync(Current.FromAmperes(3), Ct));

        // SCPI-99 Vol. 2 §21.3: -222 is "Data out of range", an execution error.
        Assert.Equal(-222, ex.Code);
        Assert.Equal("Data out of range", ex.ErrorMessage);
        Assert.Contains("SOUR:CURR 3", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Load_QuestionableBit1_MeansNotRegulating()
    {
        var fake = FakeInstrument.Load();
        var condition = 0;
        fake.Queries["STAT:QUES:COND?"] = _ => condition.ToString(System.Globalization.CultureInfo.InvariantCulture);
        await using var server = ScpiResponder.Start(fake);
        await using var session = await OpenAsync(server);
        var load = new ScpiLoad(session, InstrumentProfile.Default);

        Assert.True(await load.IsRegulatingAsync(Ct));
        condition = 2 | 8;
        Assert.False(await load.IsRegulatingAsync(Ct));
        condition = 8;
        Assert.True(await load.IsRegulatingAsync(Ct));
    }

    [Fact]
    public async Task Voltmeter_ArmThenFetch_ReturnsSiValues_WithOverloadAndNaN()
    {
        var fake = FakeInstrument.Voltmeter();
        // SCPI-99 Vol. 1 §7.2.1.5: 9.9E37 stands for infinity (overload), 9.91E37 for not-a-number.
        fake.Queries["FETC?"] = _ => "+1.234567E-03,+9.90000000E+37,-9.9E37,9.91E37";
        await using var server = ScpiResponder.Start(fake);
        await using var session = await OpenAsync(server);
        var meter = new ScpiVoltmeter(session, InstrumentProfile.Default, new MeterTiming(LineFrequency: 60));

        await meter.ConfigureAsync(new VoltmeterSettings(null, 10, true, 4), Ct);
        await meter.ArmAsync(Ct);
        var readings = await meter.FetchAsync(Ct);

        Assert.Equal("AUTO", fake.State["CONF:VOLT:DC"]);
        Assert.Equal("10", fake.State["VOLT:DC:NPLC"]);
        Assert.Equal("ON", fake.State["ZERO:AUTO"]);
        Assert.Equal("4", fake.State["SAMP:COUN"]);
        Assert.Equal(1.234567e-3, readings[0], 15);
        Assert.Equal(double.PositiveInfinity, readings[1]);
        Assert.Equal(double.NegativeInfinity, readings[2]);
        Assert.True(double.IsNaN(readings[3]));
        // 4 samples × 10 NPLC / 60 Hz = 666.7 ms, plus the 10 ms default overhead.
        Assert.Equal(TimeSpan.FromSeconds((4 * 10 / 60.0) + 0.010), meter.MeasurementTime);
    }

    [Fact]
    public async Task UutMeter_SelectRange_SendsFullScale()
    {
        var fake = FakeInstrument.CurrentMeter("Nowhere Instruments,NM-10,T-0001,0.9");
        await using var server = ScpiResponder.Start(fake);
        await using var session = await OpenAsync(server);
        var uut = new ScpiUutMeter(session, InstrumentProfile.Default, MeterTiming.Default, 1);
        var range = new Core.Uut.RangeSpec("60mA", "mA", Current.FromMilliamperes(60), Current.FromMicroamperes(10), null, new Core.Uut.AccuracySpec(0.005, 2), null, 0.1);

        await uut.SelectRangeAsync(range, Ct);

        Assert.Equal("0.06", fake.State["CONF:CURR:DC"]);
        Assert.Equal("NM-10", (await uut.IdentifyAsync(Ct)).Model);
    }
}

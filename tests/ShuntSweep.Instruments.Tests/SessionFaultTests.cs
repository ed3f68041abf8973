using System.Globalization;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

/// <summary>Faults on a real loopback socket; each must surface as a typed error with a clear message and leave the session usable.</summary>
public sealed class SessionFaultTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    private static SessionOptions Fast(int timeoutMs = 250) => new() { Timeout = TimeSpan.FromMilliseconds(timeoutMs), ClearCommands = ["*CLS"] };

    [Fact]
    public async Task ServerClosesMidResponse_IsConnectionError_ThenNextQueryReconnects()
    {
        var fake = FakeInstrument.Supply();
        var first = true;
        fake.Fault = c => c == "MEAS:VOLT?" && first ? new Reply("+1.23"u8.ToArray(), Close: true) : null;
        fake.Queries["MEAS:VOLT?"] = _ => "+4.500000E+00";
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        var ex = await Assert.ThrowsAsync<InstrumentConnectionException>(async () => await session.QueryAsync("MEAS:VOLT?", null, Ct));
        Assert.Contains("in the middle of its answer", ex.Message, StringComparison.Ordinal);
        Assert.Contains("+1.23", ex.Message, StringComparison.Ordinal);

        first = false;
        Assert.Equal("+4.500000E+00", await session.QueryAsync("MEAS:VOLT?", null, Ct));
        Assert.Equal(2, server.Connections);
        Assert.Equal(1, session.Generation);
    }

    [Theory]
    [InlineData(750, 1)] // the late answer arrives within the next exchange's wait: discarded, same connection
    [InlineData(3000, 2)] // it does not: the connection is reopened, so it can never be read
    public async Task LateAnswerAfterTimeout_IsNeverTheNextAnswer(int delayMs, int expectedConnections)
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c == "MEAS:VOLT?" ? new Reply("+1.000000E+00\n"u8.ToArray(), TimeSpan.FromMilliseconds(delayMs)) : null;
        fake.Queries["MEAS:CURR?"] = _ => "+2.000000E-01";
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast(500));

        var timeout = await Assert.ThrowsAsync<InstrumentTimeoutException>(async () => await session.QueryAsync("MEAS:VOLT?", null, Ct));
        Assert.Contains("no complete answer to 'MEAS:VOLT?'", timeout.Message, StringComparison.Ordinal);

        var next = await session.QueryAsync("MEAS:CURR?", TimeSpan.FromSeconds(3), Ct);

        Assert.Equal("+2.000000E-01", next);
        Assert.Equal(expectedConnections, server.Connections);
    }

    [Fact]
    public async Task GarbageBytes_AreAProtocolError_AndDoNotLeakIntoTheNextAnswer()
    {
        var fake = FakeInstrument.Voltmeter();
        fake.Fault = c => c == "FETC?" ? Reply.Raw([0xFF, 0x00, 0x1B, (byte)'x', (byte)'\n']) : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());
        var meter = new ScpiVoltmeter(session, InstrumentProfile.Default, MeterTiming.Default);

        var ex = await Assert.ThrowsAsync<InstrumentProtocolException>(() => meter.FetchAsync(Ct));
        Assert.Contains("not an IEEE 488.2 decimal number", ex.Message, StringComparison.Ordinal);
        Assert.Contains("\\xFF", ex.Message, StringComparison.Ordinal);

        Assert.Equal("DV-3", ScpiResponse.ParseIdentity(await session.QueryAsync("*IDN?", null, Ct)).Model);
    }

    [Fact]
    public async Task MissingTerminator_TimesOut_NamingWhatArrived()
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c == "MEAS:VOLT?" ? Reply.Raw("+1.000000E+00") : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        var ex = await Assert.ThrowsAsync<InstrumentTimeoutException>(async () => await session.QueryAsync("MEAS:VOLT?", null, Ct));

        Assert.Contains("received '+1.000000E+00' but not the terminator LF", ex.Message, StringComparison.Ordinal);
        Assert.Contains("check the termination setting", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task WrongTerminator_CarriageReturnOnly_TimesOut_ShowingTheCR()
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c == "MEAS:VOLT?" ? Reply.Raw("+1.000000E+00\r") : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        var ex = await Assert.ThrowsAsync<InstrumentTimeoutException>(async () => await session.QueryAsync("MEAS:VOLT?", null, Ct));

        Assert.Contains("'+1.000000E+00\\x0D' but not the terminator LF", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task CrLfTermination_IsStrippedFromAnswers()
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c == "MEAS:VOLT?" ? Reply.Raw("+1.500000E+00\r\n") : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast() with { ReadTermination = "\r\n" });

        Assert.Equal("+1.500000E+00", await session.QueryAsync("MEAS:VOLT?", null, Ct));
    }

    [Fact]
    public async Task DefiniteAndIndefiniteBlocks_ReturnExactBytes_IncludingTerminatorBytesInside()
    {
        // IEEE 488.2 §8.7.9: #<digits><length><bytes>; the data may hold any byte, LF included. §8.7.10: #0<bytes> ends at NL^END.
        var fake = FakeInstrument.Voltmeter();
        fake.Fault = c => c switch
        {
            "DATA?" => Reply.Raw("#210ab\ncd\0efg\n\n"),
            "DATA:INDEF?" => Reply.Raw("#0xyz\n"),
            "DATA:EMPTY?" => Reply.Raw("#10\n"),
            _ => null,
        };
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        Assert.Equal("ab\ncd\0efg\n"u8.ToArray(), await session.QueryBlockAsync("DATA?", null, Ct));
        Assert.Equal("xyz"u8.ToArray(), await session.QueryBlockAsync("DATA:INDEF?", null, Ct));
        Assert.Empty(await session.QueryBlockAsync("DATA:EMPTY?", null, Ct));
        Assert.Equal("DV-3", ScpiResponse.ParseIdentity(await session.QueryAsync("*IDN?", null, Ct)).Model);
    }

    [Fact]
    public async Task TruncatedBlock_TimesOut_AndIsNotTakenForTheNextAnswer()
    {
        var fake = FakeInstrument.Voltmeter();
        fake.Fault = c => c == "DATA?" ? Reply.Raw("#15abc\n") : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        await Assert.ThrowsAsync<InstrumentTimeoutException>(async () => await session.QueryBlockAsync("DATA?", null, Ct));

        Assert.Equal("DV-3", ScpiResponse.ParseIdentity(await session.QueryAsync("*IDN?", TimeSpan.FromSeconds(3), Ct)).Model);
    }

    [Fact]
    public async Task TruncatedBlock_ThenClose_IsConnectionError()
    {
        var fake = FakeInstrument.Voltmeter();
        fake.Fault = c => c == "DATA?" ? new Reply("#15ab"u8.ToArray(), Close: true) : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        var ex = await Assert.ThrowsAsync<InstrumentConnectionException>(async () => await session.QueryBlockAsync("DATA?", null, Ct));
        Assert.Contains("closed the connection", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task BlockWithWrongHeader_IsProtocolError()
    {
        var fake = FakeInstrument.Voltmeter();
        fake.Fault = c => c == "DATA?" ? Reply.Raw("1,2,3\n") : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        var ex = await Assert.ThrowsAsync<InstrumentProtocolException>(async () => await session.QueryBlockAsync("DATA?", null, Ct));
        Assert.Contains("§8.7.9", ex.Message, StringComparison.Ordinal);
        Assert.Equal("DV-3", ScpiResponse.ParseIdentity(await session.QueryAsync("*IDN?", null, Ct)).Model);
    }

    [Fact]
    public async Task ErrorQueue_IsDrainedUntilCodeZero_OldestFirst()
    {
        var fake = FakeInstrument.Supply();
        // SCPI-99 Vol. 2 §21: -113 "Undefined header" (command error), -222 "Data out of range" (execution error).
        fake.PushError(-113, "Undefined header");
        fake.PushError(-222, "Data out of range");
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast());

        var errors = await session.DrainErrorsAsync(Ct);

        Assert.Equal([new InstrumentError(-113, "Undefined header"), new InstrumentError(-222, "Data out of range")], errors);
        Assert.Empty(await session.DrainErrorsAsync(Ct));
        var typed = await Assert.ThrowsAsync<InstrumentErrorException>(async () => await session.WriteCheckedAsync("NOSUCH:THING 1", Ct));
        Assert.Equal(-113, typed.Code);
    }

    [Fact]
    public async Task ServerRestartedBetweenCommands_DriverReconnects_AndRestoresSettings()
    {
        var port = BenchConnectorTests.FreePort();
        var before = FakeInstrument.Supply();
        var server = ScpiResponder.Start(before, port);
        await using var session = await DriverTests.OpenAsync(server, Fast(500));
        var resilience = InstrumentResilience.Create(session.Resource, new ResilienceSettings(Retries: 3, RetryDelay: TimeSpan.FromMilliseconds(50)), TimeProvider.System);
        var supply = new ScpiSupply(session, InstrumentProfile.Default, resilience);
        await supply.ConfigureAsync(Voltage.FromVolts(3.3), Current.FromMilliamperes(100), Ct);

        await server.DisposeAsync();
        var after = FakeInstrument.Supply();
        after.Queries["MEAS:VOLT?"] = f => FakeInstrument.Nr3(double.Parse(f.State["SOUR:VOLT"], CultureInfo.InvariantCulture));
        await using var restarted = ScpiResponder.Start(after, port);

        var volts = await supply.MeasureVoltageAsync(Ct);

        Assert.Equal(3.3, volts.Volts, 9);
        Assert.Equal("0.1", after.State["SOUR:CURR"]);
        Assert.True(session.Generation >= 1);
    }

    [Fact]
    public async Task InstrumentThatHangs_IsReconnectedOnce_ThenTakenAsHung_WithoutUsingItsOtherRetries()
    {
        var fake = FakeInstrument.Supply();
        var hung = false;
        fake.Fault = _ => hung ? Reply.None : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast(200));
        var supply = new ScpiSupply(session, InstrumentProfile.Default, InstrumentResilience.Create(session.Resource, new ResilienceSettings(Retries: 3, RetryDelay: TimeSpan.FromMilliseconds(20)), TimeProvider.System));
        await supply.ConfigureAsync(Voltage.FromVolts(5), Current.FromAmperes(1), Ct);

        hung = true;
        var ex = await Assert.ThrowsAsync<InstrumentUnresponsiveException>(() => supply.MeasureVoltageAsync(Ct));

        Assert.Contains("taken as hung", ex.Message, StringComparison.Ordinal);
        Assert.Equal(2, server.Connections); // the first, and one reconnect whose restore went unanswered; three retries would make four
    }

    [Fact]
    public async Task OutputOff_ThatTheInstrumentLost_IsSentAgain_UntilTheStateReadsOff()
    {
        var fake = FakeInstrument.Supply();
        var lost = 0;
        // The first two off commands are lost on the way (the instrument was busy, or line noise ate them): no state change, no answer.
        fake.Fault = c => c.StartsWith("OUTP OFF", StringComparison.Ordinal) && lost++ < 2 ? Reply.None : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast(500));
        var supply = new ScpiSupply(session, InstrumentProfile.Default, InstrumentResilience.Create(session.Resource, new ResilienceSettings(Retries: 0), TimeProvider.System));
        await supply.SetOutputAsync(true, Ct);

        await supply.SetOutputAsync(false, Ct);

        Assert.Equal("OFF", fake.State["OUTP"]);
        Assert.Equal(3, lost);
    }

    [Fact]
    public async Task BreakerOpens_AfterRepeatedFailures_ButOutputOffStillGetsThrough()
    {
        var fake = FakeInstrument.Supply();
        var dead = true;
        fake.Fault = c => dead && c.StartsWith("MEAS", StringComparison.Ordinal) ? Reply.None : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast(100));
        var settings = new ResilienceSettings(Retries: 0, BreakerFailureRatio: 0.5, BreakerMinimumThroughput: 2, BreakerWindow: TimeSpan.FromSeconds(30), BreakerPause: TimeSpan.FromSeconds(30));
        var supply = new ScpiSupply(session, InstrumentProfile.Default, InstrumentResilience.Create(session.Resource, settings, TimeProvider.System));

        await Assert.ThrowsAsync<InstrumentTimeoutException>(() => supply.MeasureVoltageAsync(Ct));
        await Assert.ThrowsAsync<InstrumentTimeoutException>(() => supply.MeasureVoltageAsync(Ct));
        var open = await Assert.ThrowsAsync<InstrumentConnectionException>(() => supply.MeasureCurrentAsync(Ct));
        Assert.Contains("circuit open", open.Message, StringComparison.Ordinal);

        dead = false;
        fake.State["OUTP"] = "1";
        await supply.SetOutputAsync(false, Ct);
        Assert.Equal("OFF", fake.State["OUTP"]);
    }

    [Fact]
    public async Task OutputOff_AfterReconnect_SkipsRestore_AndIgnoresOldQueueErrors_WhenTheStateReadsOff()
    {
        var port = BenchConnectorTests.FreePort();
        var server = ScpiResponder.Start(FakeInstrument.Supply(), port);
        await using var session = await DriverTests.OpenAsync(server, Fast(500));
        var supply = new ScpiSupply(session, InstrumentProfile.Default, InstrumentResilience.Create(session.Resource, new ResilienceSettings(Retries: 2, RetryDelay: TimeSpan.FromMilliseconds(20)), TimeProvider.System));
        await supply.ConfigureAsync(Voltage.FromVolts(5), Current.FromAmperes(1), Ct);
        await supply.SetOutputAsync(true, Ct);

        // The instrument restarts; now it refuses voltage settings and has an old error queued.
        await server.DisposeAsync();
        var after = FakeInstrument.Supply();
        after.Checks["SOUR:VOLT"] = _ => false;
        after.PushError(-350, "Queue overflow");
        await using var restarted = ScpiResponder.Start(after, port);

        await supply.SetOutputAsync(false, Ct);

        Assert.Equal("OFF", after.State["OUTP"]);
        Assert.False(after.State.ContainsKey("SOUR:VOLT"));
    }

    [Fact]
    public async Task ConcurrentCallersOnOneSession_NeverGetEachOthersAnswers()
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c.StartsWith("ECHO? ", StringComparison.Ordinal) ? Reply.Line(c[6..]) : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, Fast(2000));

        var answers = await Task.WhenAll(Enumerable.Range(0, 64).Select(async i => (i, answer: await session.QueryAsync($"ECHO? {i}", null, Ct))));

        Assert.All(answers, a => Assert.Equal(a.i.ToString(CultureInfo.InvariantCulture), a.answer));
    }
}

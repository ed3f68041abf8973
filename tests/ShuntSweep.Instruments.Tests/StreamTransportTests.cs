using System.Net.Sockets;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Tests.Support;
using ShuntSweep.Instruments.Transports;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

/// <summary>The in-process stream transport, with a stream that ignores cancellation as some in-memory streams do.</summary>
public sealed class StreamTransportTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    [Fact]
    public async Task StreamIgnoringCancellation_LateAnswerIsStillDiscarded_AndNothingIsLost()
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c == "MEAS:VOLT?" ? new Reply("+1.000000E+00\n"u8.ToArray(), TimeSpan.FromMilliseconds(650)) : null;
        fake.Queries["MEAS:CURR?"] = _ => "+3.000000E-01";
        await using var server = ScpiResponder.Start(fake);
        var client = new TcpClient("127.0.0.1", server.Port);
        var transport = new StreamTransport("SIM::supply", new DeafToCancellation(client.GetStream()));
        await using var session = new MessageSession(transport, new SessionOptions { Timeout = TimeSpan.FromMilliseconds(500) });

        await Assert.ThrowsAsync<InstrumentTimeoutException>(async () => await session.QueryAsync("MEAS:VOLT?", null, Ct));
        var next = await session.QueryAsync("MEAS:CURR?", TimeSpan.FromSeconds(3), Ct);

        Assert.Equal("+3.000000E-01", next);
        Assert.Equal("PS-1", ScpiResponse.ParseIdentity(await session.QueryAsync("*IDN?", null, Ct)).Model);
    }

    [Fact]
    public async Task StreamThatCannotReopen_AnswerNeverCame_FailsWithConnectionError()
    {
        var fake = FakeInstrument.Supply();
        fake.Fault = c => c == "MEAS:VOLT?" ? Reply.None : null;
        await using var server = ScpiResponder.Start(fake);
        var client = new TcpClient("127.0.0.1", server.Port);
        await using var session = new MessageSession(new StreamTransport("SIM::supply", client.GetStream()), new SessionOptions { Timeout = TimeSpan.FromMilliseconds(200) });

        await Assert.ThrowsAsync<InstrumentTimeoutException>(async () => await session.QueryAsync("MEAS:VOLT?", null, Ct));
        var ex = await Assert.ThrowsAsync<InstrumentConnectionException>(async () => await session.QueryAsync("*IDN?", null, Ct));

        Assert.Contains("late answer(s) did not arrive", ex.Message, StringComparison.Ordinal);
        Assert.Contains("cannot be reopened", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Fetch_WaitsForLongIntegration_BeyondTheBaseTimeout()
    {
        // 3 samples × 10 NPLC / 50 Hz = 600 ms of integration: longer than the 200 ms base timeout, within timeout + 2 × 610 ms.
        var fake = FakeInstrument.Voltmeter();
        fake.Fault = c => c == "FETC?" ? new Reply("+1.0E-03,+1.1E-03,+1.2E-03\n"u8.ToArray(), TimeSpan.FromMilliseconds(600)) : null;
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server, new SessionOptions { Timeout = TimeSpan.FromMilliseconds(200) });
        var meter = new ScpiVoltmeter(session, InstrumentProfile.Default, MeterTiming.Default);
        await meter.ConfigureAsync(new VoltmeterSettings(Voltage.FromVolts(0.1), 10, false, 3), Ct);

        await meter.ArmAsync(Ct);
        var readings = await meter.FetchAsync(Ct);

        Assert.Equal([1.0e-3, 1.1e-3, 1.2e-3], readings);
        Assert.Equal("0.1", fake.State["CONF:VOLT:DC"]);
        Assert.Equal("OFF", fake.State["ZERO:AUTO"]);
    }

    [Fact]
    public async Task Synchronize_AcceptsOnlyOne()
    {
        // IEEE 488.2 §10.19: *OPC? places the ASCII character "1" in the output queue when all pending operations are done.
        var fake = FakeInstrument.Supply();
        await using var server = ScpiResponder.Start(fake);
        await using var session = await DriverTests.OpenAsync(server);
        await session.SynchronizeAsync(null, Ct);

        fake.Fault = c => c == "*OPC?" ? Reply.Line("0") : null;
        await Assert.ThrowsAsync<InstrumentProtocolException>(async () => await session.SynchronizeAsync(null, Ct));
    }

    /// <summary>A stream whose reads ignore their cancellation token, as some in-memory pipes do.</summary>
    private sealed class DeafToCancellation(Stream inner) : Stream
    {
        public override bool CanRead => true;

        public override bool CanSeek => false;

        public override bool CanWrite => true;

        public override long Length => throw new NotSupportedException();

        public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }

        public override ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default) =>
            inner.ReadAsync(buffer, CancellationToken.None);

        public override ValueTask WriteAsync(ReadOnlyMemory<byte> buffer, CancellationToken cancellationToken = default) =>
            inner.WriteAsync(buffer, cancellationToken);

        public override void Flush() => inner.Flush();

        public override int Read(byte[] buffer, int offset, int count) => inner.Read(buffer, offset, count);

        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => inner.Write(buffer, offset, count);

        protected override void Dispose(bool disposing)
        {
            if (disposing)
            {
                inner.Dispose();
            }

            base.Dispose(disposing);
        }
    }
}

using System.Net;
using System.Net.Sockets;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

/// <summary>The other ways to read the UUT and the reference: a display stream decoded by a pattern, a typed reading, a voltmeter across a shunt.</summary>
public sealed class ReadingSourceTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    private static readonly IBenchClock Clock = new RealBenchClock(TimeProvider.System);

    [Fact]
    public async Task StreamedUut_ReturnsFirstReadingAfterArm_ScaledByItsUnit()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        var port = ((IPEndPoint)listener.LocalEndpoint).Port;
        var pushing = Task.Run(
            async () =>
            {
                using var client = await listener.AcceptSocketAsync(Ct);
                await client.SendAsync("DC 99.99 mA\r\n"u8.ToArray(), SocketFlags.None, Ct);
                await Task.Delay(300, Ct);
                await client.SendAsync("HOLD\r\nDC 12.34 mA\r\n  OL mA\r\n"u8.ToArray(), SocketFlags.None, Ct);
                await Task.Delay(2000, Ct);
            },
            Ct);
        await using var supply = ScpiResponder.Start(FakeInstrument.Supply());
        await using var load = ScpiResponder.Start(FakeInstrument.Load());
        await using var dmm = ScpiResponder.Start(FakeInstrument.Voltmeter());
        var bench = TestBench.Load($"""
              supply:
                resource: {supply.Resource}
              load:
                resource: {load.Resource}
              dropMeter:
                resource: {dmm.Resource}
              uutMeter:
                resource: TCPIP::127.0.0.1::{port}::SOCKET
                kind: stream
                pattern: 'DC +(?<value>[-+]?[0-9.]+) *(?<unit>[munµ]?A)'
                overload: '^ *OL\b'
                readingInterval: 250 ms
            """);
        await using var connected = await BenchConnector.ConnectAsync(bench, Clock, null, null, Ct);
        var uut = connected.UutMeter!;
        await Task.Delay(100, Ct);

        await uut.ArmAsync(Ct); // forgets "99.99 mA", which was displayed before the arm
        var first = await uut.FetchAsync(Ct);
        var second = await uut.FetchAsync(Ct);

        Assert.Equal(0.01234, first[0], 12);
        Assert.Equal(double.PositiveInfinity, second[0]);
        Assert.Equal("display stream", connected.Instruments.Single(i => i.Role == InstrumentRole.UutMeter).Profile);
    }

    [Fact]
    public void StreamedUut_PatternWithoutValueGroup_IsADocumentError()
    {
        var bench = TestBench.Load("""
              supply:
                resource: SIM::supply
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
              uutMeter:
                resource: ASRL/dev/ttyUSB9::INSTR
                kind: stream
                pattern: '[0-9.]+ mA'
            """);

        var ex = Assert.Throws<Core.Documents.DocumentException>(() => BenchConnector.ConnectAsync(bench, Clock, _ => Stream.Null, null, Ct).GetAwaiter().GetResult());
        Assert.Contains("group named 'value'", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task OperatorUut_AsksForTheReading_NamingTheRange()
    {
        var entry = new TypedReadings(0.0421);
        var meter = new OperatorUutMeter("operator", entry);
        var range = new Core.Uut.RangeSpec("60mA", "mA", Current.FromMilliamperes(60), Current.FromMicroamperes(10), null, new Core.Uut.AccuracySpec(0.005, 2), null, 0.1);

        await meter.SelectRangeAsync(range, Ct);
        await meter.ArmAsync(Ct);
        var reading = await meter.FetchAsync(Ct);

        Assert.Equal([0.0421], reading);
        Assert.Equal("UUT reading on the 60mA range", entry.LastPrompt);
    }

    [Fact]
    public async Task ShuntReference_DividesVoltageByShunt_AndSetsTheVoltmeterRange()
    {
        var fake = FakeInstrument.Voltmeter();
        fake.Queries["FETC?"] = _ => "+1.000200E-01";
        await using var supply = ScpiResponder.Start(FakeInstrument.Supply());
        await using var load = ScpiResponder.Start(FakeInstrument.Load());
        await using var dmm = ScpiResponder.Start(FakeInstrument.Voltmeter());
        await using var reference = ScpiResponder.Start(fake);
        var bench = TestBench.Load($"""
              supply:
                resource: {supply.Resource}
              load:
                resource: {load.Resource}
              dropMeter:
                resource: {dmm.Resource}
              reference:
                resource: {reference.Resource}
                kind: shunt
                shunt: 0.1 ohm
                shuntUncertainty: 10 uohm
            """);
        await using var connected = await BenchConnector.ConnectAsync(bench, Clock, null, null, Ct);
        var r = connected.Reference!;

        await r.ConfigureAsync(Current.FromAmperes(1), 10, Ct);
        await r.ArmAsync(Ct);
        var amps = await r.FetchAsync(Ct);

        Assert.Equal("0.1", fake.State["CONF:VOLT:DC"]); // 1 A × 0.1 Ω
        Assert.Equal(1.0002, amps[0], 12); // 100.02 mV / 0.1 Ω
        Assert.Equal(1e-5, r.Shunt!.StandardUncertainty.Ohms, 15);
    }

    private sealed class TypedReadings(double value) : IReadingEntry
    {
        public string? LastPrompt { get; private set; }

        public Task<double> AskReadingAsync(string prompt, CancellationToken cancellationToken)
        {
            LastPrompt = prompt;
            return Task.FromResult(value);
        }
    }
}

using System.Net.Sockets;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class BenchConnectorTests
{
    private static readonly IBenchClock Clock = new RealBenchClock(TimeProvider.System);

    [Fact]
    public async Task Connect_OverTcp_IdentifiesEveryInstrument_AndRecordsLeftoverErrors()
    {
        var supply = FakeInstrument.Supply();
        var load = FakeInstrument.Load();
        var dmm = FakeInstrument.Voltmeter();
        dmm.PushError(-410, "Query INTERRUPTED");
        await using var s = ScpiResponder.Start(supply);
        await using var l = ScpiResponder.Start(load);
        await using var d = ScpiResponder.Start(dmm);
        var bench = TestBench.Load($"""
              supply:
                resource: {s.Resource}
              load:
                resource: {l.Resource}
                timeout: 500 ms
              dropMeter:
                resource: {d.Resource}
                lineFrequency: 60 Hz
            """);

        await using var connected = await BenchConnector.ConnectAsync(bench, Clock, null, null, TestContext.Current.CancellationToken);

        Assert.Equal(3, connected.Instruments.Count);
        var byRole = connected.Instruments.ToDictionary(i => i.Role);
        Assert.Equal(new InstrumentIdentity("Test Bench Co", "PS-1", "SN100", "1.0"), byRole[InstrumentRole.Supply].Identity);
        Assert.Equal("EL-2", byRole[InstrumentRole.Load].Identity.Model);
        Assert.Equal("scpi-99", byRole[InstrumentRole.DropMeter].Profile);
        // SCPI-99 Vol. 2 §21.8.12: -410 "Query INTERRUPTED" is a standard query error; left over, it is recorded, not fatal.
        Assert.Equal(new InstrumentError(-410, "Query INTERRUPTED"), Assert.Single(byRole[InstrumentRole.DropMeter].StartupErrors));
        Assert.Null(connected.UutMeter);
    }

    [Fact]
    public async Task Connect_SimulatedResources_UseTheGivenStreams()
    {
        var supply = FakeInstrument.Supply();
        var load = FakeInstrument.Load();
        var dmm = FakeInstrument.Voltmeter();
        await using var s = ScpiResponder.Start(supply);
        await using var l = ScpiResponder.Start(load);
        await using var d = ScpiResponder.Start(dmm);
        var ports = new Dictionary<string, int> { ["supply"] = s.Port, ["load"] = l.Port, ["dmm"] = d.Port };
        var asked = new List<string>();
        Stream Open(string name)
        {
            asked.Add(name);
            var client = new TcpClient("127.0.0.1", ports[name]);
            return client.GetStream();
        }

        var bench = TestBench.Load("""
              supply:
                resource: SIM::supply
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
            """);

        await using var connected = await BenchConnector.ConnectAsync(bench, new VirtualBenchClock(new VirtualTimeProvider()), Open, null, TestContext.Current.CancellationToken);
        await connected.Supply.ConfigureAsync(Voltage.FromVolts(5), Current.FromAmperes(0.25), TestContext.Current.CancellationToken);

        Assert.Equal(["dmm", "load", "supply"], asked.Order());
        Assert.Equal("5", supply.State["SOUR:VOLT"]);
        Assert.Equal("0.25", supply.State["SOUR:CURR"]);
    }

    [Fact]
    public void Connect_UnknownSettingKey_IsADocumentErrorWithSuggestion()
    {
        var bench = TestBench.Load("""
              supply:
                resource: SIM::supply
                timout: 1 s
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
            """);

        var ex = Assert.Throws<DocumentException>(() => BenchConnector.ConnectAsync(bench, Clock, _ => Stream.Null, null, TestContext.Current.CancellationToken).GetAwaiter().GetResult());
        Assert.Contains("unknown key 'timout'", ex.Message, StringComparison.Ordinal);
        Assert.Contains("did you mean 'timeout'", ex.Message, StringComparison.Ordinal);
        Assert.True(ex.Line > 0);
    }

    [Fact]
    public async Task Connect_NothingListening_FailsWithConnectionError()
    {
        var port = FreePort();
        var bench = TestBench.Load($"""
              supply:
                resource: TCPIP::127.0.0.1::{port}::SOCKET
                timeout: 300 ms
              load:
                resource: TCPIP::127.0.0.1::{port}::SOCKET
                timeout: 300 ms
              dropMeter:
                resource: TCPIP::127.0.0.1::{port}::SOCKET
                timeout: 300 ms
            """);

        var ex = await Assert.ThrowsAnyAsync<Exception>(() => BenchConnector.ConnectAsync(bench, Clock, null, null, TestContext.Current.CancellationToken));
        Assert.Contains($"127.0.0.1::{port}", ex.Message, StringComparison.Ordinal);
    }

    internal static int FreePort()
    {
        var l = new TcpListener(System.Net.IPAddress.Loopback, 0);
        l.Start();
        var port = ((System.Net.IPEndPoint)l.LocalEndpoint).Port;
        l.Stop();
        return port;
    }
}

using System.Text.Json;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class TrafficLogTests
{
    [Fact]
    public async Task TrafficLog_WritesOneLinePerExchange_WithBothDirections_RoleAndTheRunsClock()
    {
        var path = Path.Combine(Directory.CreateTempSubdirectory("shuntsweep-traffic-").FullName, "traffic.jsonl");
        var start = new DateTimeOffset(2026, 5, 4, 8, 0, 0, TimeSpan.Zero);
        var clock = new VirtualTimeProvider(start);
        await using (var server = ScpiResponder.Start(FakeInstrument.Supply()))
        {
            using var log = TrafficLog.Create(path, clock, start);
            var address = (Resources.TcpSocketAddress)Resources.ResourceAddress.Parse(server.Resource);
            await using var session = await BenchConnector.OpenSessionAsync(address, DriverSettings.Default, Profiles.InstrumentProfile.Default, null, TimeProvider.System, log.For("supply", server.Resource), null, TestContext.Current.CancellationToken);
            await session.QueryAsync("*IDN?", null, TestContext.Current.CancellationToken);
            clock.Advance(TimeSpan.FromSeconds(1.5));
            await session.WriteAsync("SOUR:VOLT 1", TestContext.Current.CancellationToken);
        }

        var lines = File.ReadAllLines(path).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        Assert.Equal(2, lines.Count);
        Assert.Equal("*IDN?", lines[0].GetProperty("tx").GetString());
        Assert.Equal("Test Bench Co,PS-1,SN100,1.0", lines[0].GetProperty("rx").GetString());
        Assert.Equal("SOUR:VOLT 1", lines[1].GetProperty("tx").GetString());
        Assert.False(lines[1].TryGetProperty("rx", out _));
        Assert.All(lines, l => Assert.Equal("supply", l.GetProperty("role").GetString()));
        Assert.All(lines, l => Assert.StartsWith("TCPIP::127.0.0.1::", l.GetProperty("resource").GetString(), StringComparison.Ordinal));
        Assert.Equal("2026-05-04T08:00:00.0000000Z", lines[0].GetProperty("t").GetString());
        Assert.Equal(1.5, lines[1].GetProperty("elapsedS").GetDouble(), 9);
        Assert.True(lines[0].GetProperty("ms").GetDouble() >= 0);
    }

    [Fact]
    public void Flush_PutsEveryLineQueuedBeforeIt_InTheFile_InOrder_WhileTheLogStaysOpen()
    {
        // Exchanges only queue their lines (the writer thread formats them); a reader of the file after Flush sees them all, in order
        // (the log's own contract: common practice, no source).
        var path = Path.Combine(Directory.CreateTempSubdirectory("shuntsweep-traffic-").FullName, "traffic.jsonl");
        var clock = new VirtualTimeProvider();
        using var log = TrafficLog.Create(path, clock, clock.GetUtcNow());
        var tap = log.For("dropMeter", "SIM::dmm");
        for (var i = 0; i < 1000; i++)
        {
            tap.Exchange($"SENS:VOLT:NPLC {i}", null, 0.001);
            clock.Advance(TimeSpan.FromMilliseconds(1));
        }

        tap.Note("the last line");
        log.Flush();
        using var file = new StreamReader(new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite));
        var lines = file.ReadToEnd().Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        Assert.Equal(1001, lines.Count);
        Assert.Equal(Enumerable.Range(0, 1000).Select(i => $"SENS:VOLT:NPLC {i}"), lines.Take(1000).Select(l => l.GetProperty("tx").GetString()));
        Assert.Equal(0.999, lines[999].GetProperty("elapsedS").GetDouble(), 9);
        Assert.Equal("the last line", lines[1000].GetProperty("note").GetString());
    }
}

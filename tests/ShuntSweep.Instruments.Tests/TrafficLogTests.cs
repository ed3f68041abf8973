using System.Text.Json;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class TrafficLogTests
{
    [Fact]
    public async Task TrafficLog_WritesEveryCommandAndResponse_AsTimestampedJsonLines()
    {
        var path = Path.Combine(Directory.CreateTempSubdirectory("shuntsweep-traffic-").FullName, "traffic.jsonl");
        await using (var server = ScpiResponder.Start(FakeInstrument.Supply()))
        {
            using var log = TrafficLog.Create(path);
            var address = (Resources.TcpSocketAddress)Resources.ResourceAddress.Parse(server.Resource);
            await using var session = await BenchConnector.OpenSessionAsync(address, DriverSettings.Default, Profiles.InstrumentProfile.Default, null, TimeProvider.System, log, null, TestContext.Current.CancellationToken);
            await session.QueryAsync("*IDN?", null, TestContext.Current.CancellationToken);
            await session.WriteAsync("SOUR:VOLT 1", TestContext.Current.CancellationToken);
        }

        var lines = File.ReadAllLines(path).Select(l => JsonDocument.Parse(l).RootElement).ToList();

        Assert.Equal(["*IDN?", "Test Bench Co,PS-1,SN100,1.0", "SOUR:VOLT 1"], lines.Select(l => l.GetProperty("Text").GetString()));
        Assert.All(lines, l => Assert.True(DateTimeOffset.TryParse(l.GetProperty("@t").GetString(), System.Globalization.CultureInfo.InvariantCulture, out _)));
        Assert.All(lines, l => Assert.StartsWith("TCPIP::127.0.0.1::", l.GetProperty("Resource").GetString(), StringComparison.Ordinal));
        Assert.True(lines[1].GetProperty("ElapsedMs").GetDouble() >= 0);
    }
}

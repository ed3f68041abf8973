using System.Net;
using System.Net.Sockets;
using System.Text;
using ShuntSweep.Core.Bench;
using ShuntSweep.Simulation.Hosting;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

/// <summary>The TCP server of the simulated bench keeps itself bounded, and serves IPv6 clients.</summary>
public sealed class TcpHostingTests
{
    [Fact]
    public async Task ClientThatSendsQueriesAndNeverReads_IsDropped_WithALogLine()
    {
        var ct = TestContext.Current.CancellationToken;
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var bench = SimulatedBench.Create(BenchReader.Load(Benches.Handheld), clock, 1);
        var log = new List<string>();
        var dropped = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        await using var host = TcpBenchHost.Start(bench, IPAddress.Loopback, 0, allowRemote: false, line =>
        {
            lock (log)
            {
                log.Add(line);
            }

            dropped.TrySetResult();
        });
        using var socket = new Socket(AddressFamily.InterNetwork, SocketType.Stream, ProtocolType.Tcp) { ReceiveBufferSize = 4096 };
        await socket.ConnectAsync(IPAddress.Loopback, host.Endpoints.Single(e => e.Name == "supply").Port, ct);

        // Queries in 60 kB batches, never a read: each identity reply is some 40 bytes, so the server must stop this client
        // after about a megabyte of unread replies (ScpiSession.MaxPendingBytes), plus what the kernel buffers hold.
        var batch = Encoding.ASCII.GetBytes(string.Concat(Enumerable.Repeat("*IDN?\n", 10_000)));
        long sent = 0;
        const long giveUp = 64L * 1024 * 1024;
        try
        {
            while (!dropped.Task.IsCompleted && sent < giveUp)
            {
                using var slow = CancellationTokenSource.CreateLinkedTokenSource(ct);
                slow.CancelAfter(TimeSpan.FromSeconds(30));
                sent += await socket.SendAsync(batch, SocketFlags.None, slow.Token);
            }
        }
        catch (SocketException)
        {
            // The server closed the connection under the writer's feet: that is the drop.
        }

        await dropped.Task.WaitAsync(TimeSpan.FromSeconds(30), ct);
        var repliesOwed = sent / 6 * (await IdentityLengthAsync(host)) ;
        Assert.True(sent < giveUp, $"the client sent {sent} bytes of queries and was never dropped");
        Assert.True(repliesOwed > ScpiSession.MaxPendingBytes, "dropped before the bound was reached");
        Assert.Contains("supply: dropped the client at 127.0.0.1:", Assert.Single(log), StringComparison.Ordinal);
        Assert.Contains("does not read the answers", log[0], StringComparison.Ordinal);

        // The connection is closed by the server: what is left to read ends, no more replies than the bound allows.
        var received = 0L;
        var buffer = new byte[65536];
        try
        {
            int n;
            while ((n = await socket.ReceiveAsync(buffer, SocketFlags.None, ct)) > 0)
            {
                received += n;
            }
        }
        catch (SocketException)
        {
            // Reset by the server: the rest was discarded.
        }

        Assert.True(received <= ScpiSession.MaxPendingBytes + (4 * 1024 * 1024), $"{received} bytes of replies were still sent");

        // The instrument still serves well-behaved clients.
        using var again = new TcpClient();
        await again.ConnectAsync(IPAddress.Loopback, host.Endpoints.Single(e => e.Name == "supply").Port, ct);
        await using var client = new ScpiClient(again.GetStream());
        Assert.Equal("1", await client.QueryAsync("*OPC?"));
    }

    [Fact]
    public async Task Ipv6Loopback_IsServedWithBracketedResourceStrings_ThatAnswer()
    {
        var ct = TestContext.Current.CancellationToken;
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var bench = SimulatedBench.Create(BenchReader.Load(Benches.Handheld), clock, 1);
        await using var host = TcpBenchHost.Start(bench, IPAddress.IPv6Loopback, 0, allowRemote: false);
        Assert.All(host.Endpoints, e => Assert.Matches(@"^TCPIP::\[::1\]::\d+::SOCKET$", e.Resource));
        using var socket = new TcpClient(AddressFamily.InterNetworkV6);
        await socket.ConnectAsync(IPAddress.IPv6Loopback, host.Endpoints.Single(e => e.Name == "dmm").Port, ct);
        await using var dmm = new ScpiClient(socket.GetStream());
        Assert.Equal("ShuntSweep Simulator,SIM-DMM-65,DMM-00031,1.0", await dmm.QueryAsync("*IDN?"));
    }

    [Theory]
    [InlineData("0.0.0.0")]
    [InlineData("::")]
    public void WildcardAddress_IsReachedAtTheInterfacesAddresses_NeverAtTheWildcard(string wildcard)
    {
        var bound = IPAddress.Parse(wildcard);
        var addresses = TcpBenchHost.Reachable(bound);
        Assert.NotEmpty(addresses);
        Assert.All(addresses, a =>
        {
            Assert.NotEqual(bound, a);
            Assert.Equal(bound.AddressFamily, a.AddressFamily);
        });

        // Addresses other machines can reach come before loopback, which serves only this one.
        Assert.Equal(addresses.OrderBy(IPAddress.IsLoopback), addresses);
    }

    [Fact]
    public void ResourceFor_BracketsIpv6Only() =>
        Assert.Equal(
            ["TCPIP::192.0.2.7::5025::SOCKET", "TCPIP::[2001:db8::7]::5025::SOCKET"],
            new[] { "192.0.2.7", "2001:db8::7" }.Select(a => TcpBenchHost.ResourceFor(IPAddress.Parse(a), 5025)));

    private static async Task<int> IdentityLengthAsync(TcpBenchHost host)
    {
        using var socket = new TcpClient();
        await socket.ConnectAsync(IPAddress.Loopback, host.Endpoints.Single(e => e.Name == "supply").Port, TestContext.Current.CancellationToken);
        await using var client = new ScpiClient(socket.GetStream());
        return (await client.QueryAsync("*IDN?")).Length + 1;
    }
}

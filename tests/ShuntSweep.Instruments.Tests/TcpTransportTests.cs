using System.Net;
using System.Net.Sockets;
using System.Text;
using ShuntSweep.Instruments.Resources;
using ShuntSweep.Instruments.Transports;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class TcpTransportTests
{
    [Fact]
    public async Task BracketedIpv6Resource_ConnectsOnIpv6Loopback()
    {
        var ct = TestContext.Current.CancellationToken;
        using var listener = new TcpListener(IPAddress.IPv6Loopback, 0);
        listener.Start();
        var port = ((IPEndPoint)listener.LocalEndpoint).Port;
        var address = (TcpSocketAddress)ResourceAddress.Parse($"TCPIP::[::1]::{port}::SOCKET");
        var accepted = listener.AcceptSocketAsync(ct);

        await using var transport = await TcpTransport.ConnectAsync(address.Text, address.Host, address.Port, ct);
        using var server = await accepted;
        Assert.Equal(AddressFamily.InterNetworkV6, server.RemoteEndPoint!.AddressFamily);
        await transport.WriteAsync(Encoding.ASCII.GetBytes("*IDN?\n"), ct);
        var buffer = new byte[16];
        var n = await server.ReceiveAsync(buffer, SocketFlags.None, ct);
        Assert.Equal("*IDN?\n", Encoding.ASCII.GetString(buffer, 0, n));
        await server.SendAsync(Encoding.ASCII.GetBytes("X,Y,Z,1\n"), SocketFlags.None, ct);
        n = await transport.ReadAsync(buffer, ct);
        Assert.Equal("X,Y,Z,1\n", Encoding.ASCII.GetString(buffer, 0, n));
    }
}

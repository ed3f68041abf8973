using System.Net.Sockets;

namespace ShuntSweep.Instruments.Transports;

/// <summary>A raw TCP socket to an instrument's SCPI port (VISA <c>TCPIP::host::port::SOCKET</c>).</summary>
/// <remarks>Nagle's algorithm is off (no-delay) so that each command leaves at once; the session hands each command with its terminator as one write.</remarks>
internal sealed class TcpTransport : ITransport
{
    private readonly Socket _socket;

    private TcpTransport(string resource, Socket socket)
    {
        Resource = resource;
        _socket = socket;
    }

    public string Resource { get; }

    /// <summary>Connects to <paramref name="host"/>:<paramref name="port"/>, giving up at cancellation.</summary>
    public static async ValueTask<ITransport> ConnectAsync(string resource, string host, int port, CancellationToken cancellationToken)
    {
        var socket = new Socket(SocketType.Stream, ProtocolType.Tcp) { NoDelay = true };
        try
        {
            await socket.ConnectAsync(host, port, cancellationToken);
            socket.SetSocketOption(SocketOptionLevel.Socket, SocketOptionName.KeepAlive, true);
            return new TcpTransport(resource, socket);
        }
        catch
        {
            socket.Dispose();
            throw;
        }
    }

    public async ValueTask WriteAsync(ReadOnlyMemory<byte> data, CancellationToken cancellationToken)
    {
        while (!data.IsEmpty)
        {
            var sent = await _socket.SendAsync(data, SocketFlags.None, cancellationToken);
            data = data[sent..];
        }
    }

    public ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken) =>
        _socket.ReceiveAsync(buffer, SocketFlags.None, cancellationToken);

    public ValueTask DisposeAsync()
    {
        _socket.Dispose();
        return ValueTask.CompletedTask;
    }
}

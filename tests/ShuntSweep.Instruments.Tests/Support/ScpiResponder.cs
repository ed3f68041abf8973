using System.Net;
using System.Net.Sockets;
using System.Text;

namespace ShuntSweep.Instruments.Tests.Support;

/// <summary>What the responder does with one received command: bytes to send back (maybe late, maybe split), or close the connection.</summary>
internal sealed record Reply(byte[]? Bytes, TimeSpan Delay = default, bool Close = false)
{
    /// <summary>Awaited before the reply is sent (after <see cref="Delay"/>), without holding a thread.</summary>
    public Func<Task>? Before { get; init; }

    public static Reply None { get; } = new((byte[]?)null);

    public static Reply Line(string text) => new(Encoding.ASCII.GetBytes(text + "\n"));

    public static Reply Raw(byte[] bytes) => new(bytes);

    public static Reply Raw(string text) => new(Encoding.Latin1.GetBytes(text));
}

/// <summary>A small SCPI server on 127.0.0.1 with a real socket: reads LF-terminated commands and answers as its handler says.</summary>
/// <remarks>Each accepted connection is served in order; the handler sees every command of every connection.</remarks>
internal sealed class ScpiResponder : IAsyncDisposable
{
    private readonly TcpListener _listener;
    private readonly Func<string, Reply> _handler;
    private readonly CancellationTokenSource _stop = new();
    private readonly List<Socket> _clients = [];
    private readonly Task _loop;

    private ScpiResponder(Func<string, Reply> handler, int port)
    {
        _handler = handler;
        _listener = new TcpListener(IPAddress.Loopback, port);
        _listener.Start();
        _loop = Task.Run(AcceptLoopAsync);
    }

    public int Port => ((IPEndPoint)_listener.LocalEndpoint).Port;

    public string Resource => $"TCPIP::127.0.0.1::{Port}::SOCKET";

    public int Connections { get; private set; }

    public List<string> Received { get; } = [];

    public static ScpiResponder Start(Func<string, Reply> handler, int port = 0) => new(handler, port);

    public static ScpiResponder Start(FakeInstrument instrument, int port = 0) => new(instrument.Handle, port);

    /// <summary>Drops every open connection (as an instrument does when it reboots).</summary>
    public void DropConnections()
    {
        lock (_clients)
        {
            foreach (var c in _clients)
            {
                c.Dispose();
            }

            _clients.Clear();
        }
    }

    public async ValueTask DisposeAsync()
    {
        await _stop.CancelAsync();
        _listener.Stop();
        DropConnections();
        try
        {
            await _loop;
        }
        catch (OperationCanceledException)
        {
        }

        _stop.Dispose();
    }

    private async Task AcceptLoopAsync()
    {
        while (!_stop.IsCancellationRequested)
        {
            Socket client;
            try
            {
                client = await _listener.AcceptSocketAsync(_stop.Token);
            }
            catch (Exception e) when (e is OperationCanceledException or SocketException or ObjectDisposedException)
            {
                return;
            }

            client.NoDelay = true;
            lock (_clients)
            {
                _clients.Add(client);
                Connections++;
            }

            _ = Task.Run(() => ServeAsync(client));
        }
    }

    private async Task ServeAsync(Socket client)
    {
        var buffer = new byte[4096];
        var line = new StringBuilder();
        try
        {
            while (true)
            {
                var n = await client.ReceiveAsync(buffer, SocketFlags.None, _stop.Token);
                if (n == 0)
                {
                    return;
                }

                for (var i = 0; i < n; i++)
                {
                    if (buffer[i] != '\n')
                    {
                        line.Append((char)buffer[i]);
                        continue;
                    }

                    var command = line.ToString().TrimEnd('\r');
                    line.Clear();
                    lock (Received)
                    {
                        Received.Add(command);
                    }

                    var reply = _handler(command);
                    if (reply.Delay > TimeSpan.Zero)
                    {
                        await Task.Delay(reply.Delay, _stop.Token);
                    }

                    if (reply.Before is { } before)
                    {
                        await before();
                    }

                    if (reply.Bytes is { } bytes)
                    {
                        await client.SendAsync(bytes, SocketFlags.None, _stop.Token);
                    }

                    if (reply.Close)
                    {
                        client.Shutdown(SocketShutdown.Both);
                        client.Dispose();
                        return;
                    }
                }
            }
        }
        catch (Exception e) when (e is OperationCanceledException or SocketException or ObjectDisposedException)
        {
        }
        finally
        {
            client.Dispose();
        }
    }
}

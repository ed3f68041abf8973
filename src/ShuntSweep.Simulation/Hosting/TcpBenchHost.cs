using System.Net;
using System.Net.Sockets;

namespace ShuntSweep.Simulation.Hosting;

/// <summary>Serves every instrument of a <see cref="SimulatedBench"/> on its own TCP port (raw SCPI socket, LF-terminated).</summary>
/// <remarks>Binds to loopback unless the caller passes another address and <c>allowRemote</c>; the simulator has no authentication.</remarks>
public sealed class TcpBenchHost : IAsyncDisposable
{
    private readonly List<TcpListener> _listeners = [];
    private readonly List<Task> _loops = [];
    private readonly CancellationTokenSource _stop = new();
    private readonly SimulatedBench _bench;

    private TcpBenchHost(SimulatedBench bench) => _bench = bench;

    /// <summary>The served instruments: name, port and VISA resource string (<c>TCPIP::127.0.0.1::5025::SOCKET</c>).</summary>
    public IReadOnlyList<(string Name, int Port, string Resource)> Endpoints { get; private set; } = [];

    /// <summary>Starts listening: instrument k of <see cref="SimulatedBench.Instruments"/> on <paramref name="basePort"/> + k (or any free port when it is 0).</summary>
    /// <exception cref="ArgumentException"><paramref name="address"/> is not loopback and <paramref name="allowRemote"/> is false.</exception>
    public static TcpBenchHost Start(SimulatedBench bench, IPAddress address, int basePort, bool allowRemote)
    {
        ArgumentNullException.ThrowIfNull(bench);
        ArgumentNullException.ThrowIfNull(address);
        if (!IPAddress.IsLoopback(address) && !allowRemote)
        {
            throw new ArgumentException($"Refusing to serve the simulated bench on {address}: it is not a loopback address. Pass --allow-remote to expose it to the network.", nameof(address));
        }

        var host = new TcpBenchHost(bench);
        var endpoints = new List<(string, int, string)>();
        try
        {
            var k = 0;
            foreach (var name in bench.Instruments)
            {
                var listener = new TcpListener(address, basePort == 0 ? 0 : basePort + k);
                listener.Start();
                host._listeners.Add(listener);
                var port = ((IPEndPoint)listener.LocalEndpoint).Port;
                endpoints.Add((name, port, $"TCPIP::{address}::{port}::SOCKET"));
                host._loops.Add(host.AcceptAsync(listener, name));
                k++;
            }
        }
        catch
        {
            foreach (var l in host._listeners)
            {
                l.Stop();
            }

            throw;
        }

        host.Endpoints = endpoints;
        return host;
    }

    /// <inheritdoc />
    public async ValueTask DisposeAsync()
    {
        await _stop.CancelAsync();
        foreach (var l in _listeners)
        {
            l.Stop();
        }

        await Task.WhenAll(_loops);
        _stop.Dispose();
    }

    private async Task AcceptAsync(TcpListener listener, string name)
    {
        var sessions = new List<Task>();
        try
        {
            while (!_stop.IsCancellationRequested)
            {
                var client = await listener.AcceptTcpClientAsync(_stop.Token);
                client.NoDelay = true;
                sessions.Add(ServeAsync(client, name));
                sessions.RemoveAll(t => t.IsCompleted);
            }
        }
        catch (OperationCanceledException)
        {
        }
        catch (SocketException) when (_stop.IsCancellationRequested)
        {
        }

        await Task.WhenAll(sessions);
    }

    private async Task ServeAsync(TcpClient client, string name)
    {
        using (client)
        {
            await _bench.ServeAsync(name, client.GetStream(), _stop.Token);
        }
    }
}

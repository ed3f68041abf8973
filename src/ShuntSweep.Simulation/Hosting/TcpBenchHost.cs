using System.Net;
using System.Net.NetworkInformation;
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
    private readonly Action<string>? _log;

    private TcpBenchHost(SimulatedBench bench, Action<string>? log)
    {
        _bench = bench;
        _log = log;
    }

    /// <summary>The served instruments: name, port and VISA resource string (<c>TCPIP::127.0.0.1::5025::SOCKET</c>) at the first of <see cref="Addresses"/>.</summary>
    public IReadOnlyList<(string Name, int Port, string Resource)> Endpoints { get; private set; } = [];

    /// <summary>The addresses clients reach the served bench at: the one it listens on, or for a wildcard (0.0.0.0, ::) the addresses of the
    /// machine's network interfaces that are up, the ones other machines can reach first.</summary>
    public IReadOnlyList<IPAddress> Addresses { get; private set; } = [];

    /// <summary>The VISA resource string of <paramref name="port"/> at <paramref name="address"/>; an IPv6 address is bracketed (<c>TCPIP::[::1]::5025::SOCKET</c>).</summary>
    public static string ResourceFor(IPAddress address, int port)
    {
        ArgumentNullException.ThrowIfNull(address);
        var host = address.AddressFamily == AddressFamily.InterNetworkV6 ? $"[{address}]" : address.ToString();
        return $"TCPIP::{host}::{port}::SOCKET";
    }

    /// <summary>Starts listening: instrument k of <see cref="SimulatedBench.Instruments"/> on <paramref name="basePort"/> + k (or any free port when it is 0).</summary>
    /// <exception cref="ArgumentException"><paramref name="address"/> is not loopback and <paramref name="allowRemote"/> is false.</exception>
    /// <param name="bench">The simulated bench to serve.</param>
    /// <param name="address">The address to listen on.</param>
    /// <param name="basePort">The first port, or 0 for free ports.</param>
    /// <param name="allowRemote">Whether an address other than loopback may be used.</param>
    /// <param name="log">Told, in one line each, about clients the server drops (one that does not read its replies, say).</param>
    public static TcpBenchHost Start(SimulatedBench bench, IPAddress address, int basePort, bool allowRemote, Action<string>? log = null)
    {
        ArgumentNullException.ThrowIfNull(bench);
        ArgumentNullException.ThrowIfNull(address);
        if (!IPAddress.IsLoopback(address) && !allowRemote)
        {
            throw new ArgumentException($"Refusing to serve the simulated bench on {address}: it is not a loopback address. Pass --allow-remote to expose it to the network.", nameof(address));
        }

        var host = new TcpBenchHost(bench, log);
        host.Addresses = Reachable(address);
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
                endpoints.Add((name, port, ResourceFor(host.Addresses[0], port)));
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
            var peer = client.Client.RemoteEndPoint;
            await _bench.ServeAsync(name, client.GetStream(), _stop.Token, reason => _log?.Invoke($"{name}: dropped the client at {peer}: {reason}"));
        }
    }

    /// <summary>The addresses a listener bound to <paramref name="bound"/> is reached at; for a wildcard, the machine's interface addresses of its family.</summary>
    internal static List<IPAddress> Reachable(IPAddress bound)
    {
        if (!bound.Equals(IPAddress.Any) && !bound.Equals(IPAddress.IPv6Any))
        {
            return [bound];
        }

        var family = bound.AddressFamily;
        var found = new List<IPAddress>();
        try
        {
            found.AddRange(NetworkInterface.GetAllNetworkInterfaces()
                .Where(n => n.OperationalStatus == OperationalStatus.Up)
                .SelectMany(n => n.GetIPProperties().UnicastAddresses)
                .Select(u => u.Address)
                .Where(a => a.AddressFamily == family && !a.IsIPv6LinkLocal)
                .OrderBy(a => IPAddress.IsLoopback(a))
                .Distinct());
        }
        catch (NetworkInformationException)
        {
            // No interface list on this system: the loopback address below still serves local clients.
        }

        return found.Count > 0 ? found : [family == AddressFamily.InterNetworkV6 ? IPAddress.IPv6Loopback : IPAddress.Loopback];
    }
}

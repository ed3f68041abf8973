using System.Net;
using System.Net.Sockets;
using BenchmarkDotNet.Attributes;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Transports;

namespace ShuntSweep.Benchmarks;

/// <summary>One SCPI query round trip over loopback TCP through the message session, beside the same exchange on a bare socket.</summary>
/// <remarks>
/// Both clients talk to the same in-benchmark responder, which answers every line ending in '?' with a fixed NR3 reading.
/// The goal is a session round trip of at most 1.3 × the raw one, with no allocation beyond the response string.
/// </remarks>
[MemoryDiagnoser]
public class InstrumentsRoundTripBenchmarks : IDisposable
{
    private static readonly byte[] Query = "MEAS:VOLT?\n"u8.ToArray();
    private readonly byte[] _rawBuffer = new byte[256];
    private LineResponder? _responder;
    private Socket? _raw;
    private MessageSession? _session;

    [GlobalSetup]
    public async Task SetupAsync()
    {
        _responder = new LineResponder("+1.234567E-03\n"u8.ToArray());
        _raw = new Socket(SocketType.Stream, ProtocolType.Tcp) { NoDelay = true };
        await _raw.ConnectAsync(IPAddress.Loopback, _responder.Port);
        var resource = $"TCPIP::127.0.0.1::{_responder.Port}::SOCKET";
        TransportOpener opener = ct => TcpTransport.ConnectAsync(resource, "127.0.0.1", _responder.Port, ct);
        _session = new MessageSession(await opener(default), new SessionOptions(), opener);
    }

    [GlobalCleanup]
    public void Dispose()
    {
        _session?.DisposeAsync().AsTask().GetAwaiter().GetResult();
        _raw?.Dispose();
        _responder?.Dispose();
        GC.SuppressFinalize(this);
    }

    /// <summary>The floor: write the query, read until LF, on a bare socket (no string made).</summary>
    [Benchmark(Baseline = true)]
    public async Task<int> RawSocketRoundTrip()
    {
        await _raw!.SendAsync(Query, SocketFlags.None);
        var total = 0;
        while (true)
        {
            var n = await _raw.ReceiveAsync(_rawBuffer.AsMemory(total), SocketFlags.None);
            total += n;
            if (n == 0 || _rawBuffer[total - 1] == '\n')
            {
                return total;
            }
        }
    }

    /// <summary>The same exchange through <see cref="MessageSession.QueryAsync"/>: lock, timeout, terminator framing, response string.</summary>
    [Benchmark]
    public ValueTask<string> SessionQuery() => _session!.QueryAsync("MEAS:VOLT?");

    /// <summary>The session query followed by NR3 parsing, as a driver's measure call does.</summary>
    [Benchmark]
    public async Task<double> SessionQueryAndParse() => ScpiResponse.ParseNumber(await _session!.QueryAsync("MEAS:VOLT?"));

    /// <summary>A loopback server on its own thread that answers each line ending in '?' with a fixed reply.</summary>
    private sealed class LineResponder : IDisposable
    {
        private readonly TcpListener _listener = new(IPAddress.Loopback, 0);
        private readonly byte[] _reply;
        private readonly List<Socket> _clients = [];

        public LineResponder(byte[] reply)
        {
            _reply = reply;
            _listener.Start();
            new Thread(Accept) { IsBackground = true, Name = "scpi-responder" }.Start();
        }

        public int Port => ((IPEndPoint)_listener.LocalEndpoint).Port;

        public void Dispose()
        {
            _listener.Stop();
            lock (_clients)
            {
                foreach (var c in _clients)
                {
                    c.Dispose();
                }
            }
        }

        private void Accept()
        {
            try
            {
                while (true)
                {
                    var client = _listener.AcceptSocket();
                    client.NoDelay = true;
                    lock (_clients)
                    {
                        _clients.Add(client);
                    }

                    new Thread(() => Serve(client)) { IsBackground = true, Name = "scpi-responder-client" }.Start();
                }
            }
            catch (SocketException)
            {
                // The listener was stopped.
            }
        }

        private void Serve(Socket client)
        {
            var buffer = new byte[4096];
            var previous = (byte)0;
            try
            {
                while (true)
                {
                    var n = client.Receive(buffer);
                    if (n == 0)
                    {
                        return;
                    }

                    for (var i = 0; i < n; i++)
                    {
                        if (buffer[i] == '\n' && previous == '?')
                        {
                            client.Send(_reply);
                        }

                        previous = buffer[i];
                    }
                }
            }
            catch (Exception e) when (e is SocketException or ObjectDisposedException)
            {
                // The benchmark ended.
            }
        }
    }
}

using System.Text;
using System.Threading.Channels;
using ShuntSweep.Simulation.Faults;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Hosting;

/// <summary>One connection to one simulated instrument: assembles LF-terminated program messages, executes each as soon as it is complete,
/// and sends the responses, in order, through the declared reply faults.</summary>
/// <remarks>Execution happens on the caller of <see cref="AcceptAsync"/>, so an in-process client's write returns only once its command has
/// taken effect (deterministic in virtual time); replies go out on their own task, so a delayed reply never blocks the next command.</remarks>
internal sealed class ScpiSession : IAsyncDisposable
{
    /// <summary>The longest program message accepted; a longer one is discarded with -363 "Input buffer overrun".</summary>
    public const int MaxLine = 65536;

    /// <summary>The most reply bytes a client may leave unread (1 MiB, some twenty thousand answers); a client past it is dropped, so one that
    /// sends queries and never reads cannot make the server grow without bound.</summary>
    public const int MaxPendingBytes = 1024 * 1024;

    private readonly SimulatedInstrument _instrument;
    private readonly Stream _output;
    private readonly CancellationTokenSource _stop;
    private readonly Channel<(FaultContext Context, byte[] Reply)> _replies = Channel.CreateUnbounded<(FaultContext, byte[])>(new UnboundedChannelOptions { SingleReader = true });
    private readonly ReplyBuffer? _inline;
    private readonly Task _pump;
    private byte[] _line = new byte[256];
    private int _lineLength;
    private readonly Action<string>? _dropped;
    private long _pending;
    private bool _overrun;
    private bool _closed;

    /// <summary>Starts a session that writes its responses to <paramref name="output"/>; <paramref name="dropped"/> is told why, should the session drop its client.</summary>
    public ScpiSession(SimulatedInstrument instrument, Stream output, CancellationToken cancellationToken, Action<string>? dropped = null)
    {
        _instrument = instrument;
        _output = output;
        _dropped = dropped;
        _stop = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
        _pump = PumpAsync();
    }

    /// <summary>Starts an in-process session that appends its responses to <paramref name="replies"/>, the client's read side.</summary>
    /// <remarks>Without faults on the instrument each response is appended before <see cref="AcceptAsync"/> returns, on the caller's thread:
    /// no task, channel or thread switch per exchange. With faults, responses go through them on the reply task as on a socket.</remarks>
    public ScpiSession(SimulatedInstrument instrument, ReplyBuffer replies, CancellationToken cancellationToken)
    {
        _instrument = instrument;
        _output = replies;
        _stop = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
        if (instrument.Faults.Count == 0)
        {
            _inline = replies;
            _replies.Writer.TryComplete();
            _pump = Task.CompletedTask;
        }
        else
        {
            _pump = PumpAsync();
        }
    }

    /// <summary>True once the instrument has dropped the connection (a fault) or the session was closed.</summary>
    public bool IsClosed => _closed;

    /// <summary>Takes bytes from the client and executes every message they complete; false once the connection is dropped.</summary>
    public ValueTask<bool> AcceptAsync(ReadOnlyMemory<byte> data, CancellationToken cancellationToken)
    {
        var now = TimeProvider.System.GetTimestamp();
        return AcceptAtAsync(data, now, now, cancellationToken);
    }

    /// <summary>Takes bytes that arrived between the wall-clock timestamps <paramref name="earliest"/> (the earliest they can have arrived) and <paramref name="latest"/>.</summary>
    private async ValueTask<bool> AcceptAtAsync(ReadOnlyMemory<byte> data, long earliest, long latest, CancellationToken cancellationToken)
    {
        var at = 0;
        while (at < data.Length && !_closed)
        {
            var rest = data.Span[at..];
            var end = rest.IndexOf(_instrument.LineEnd);
            var chunk = end < 0 ? rest : rest[..end];
            if (_lineLength + chunk.Length <= MaxLine && !_overrun)
            {
                if (_lineLength + chunk.Length > _line.Length)
                {
                    Array.Resize(ref _line, Math.Min(MaxLine, Math.Max(_line.Length * 2, _lineLength + chunk.Length)));
                }

                chunk.CopyTo(_line.AsSpan(_lineLength));
                _lineLength += chunk.Length;
            }
            else
            {
                // The bytes that fit are kept as before; the line is lost either way.
                _overrun = true;
            }

            if (end < 0)
            {
                break;
            }

            at += end + 1;
            if (_overrun)
            {
                _instrument.Front.Push(ScpiErrors.InputBufferOverrun);
                _overrun = false;
                _lineLength = 0;
                continue;
            }

            var text = Encoding.Latin1.GetString(_line.AsSpan(0, _lineLength).TrimEnd("\r\n"u8));
            _lineLength = 0;
            await HandleAsync(text, earliest, latest, cancellationToken);
        }

        return !_closed;
    }

    /// <summary>Reads from <paramref name="input"/> (a socket) until the peer closes it, the instrument drops it, or the session is stopped.</summary>
    public async Task RunAsync(Stream input)
    {
        var buffer = new byte[4096];
        try
        {
            // Bytes a read returns may have arrived at any time since the previous read returned (the socket buffers them while
            // earlier commands execute), so that instant, not the start of this read, is their earliest possible arrival.
            var previous = TimeProvider.System.GetTimestamp();
            while (!_closed)
            {
                var n = await input.ReadAsync(buffer, _stop.Token);
                var returned = TimeProvider.System.GetTimestamp();
                if (n == 0 || !await AcceptAtAsync(buffer.AsMemory(0, n), previous, returned, _stop.Token))
                {
                    return;
                }

                previous = returned;
            }
        }
        catch (OperationCanceledException) when (_stop.IsCancellationRequested)
        {
        }
        catch (IOException)
        {
            // The peer went away; nothing to tell anyone.
        }
    }

    /// <summary>Sends the replies still queued, then closes the output.</summary>
    public async ValueTask DisposeAsync()
    {
        _closed = true;
        _replies.Writer.TryComplete();
        await _pump;
        await _output.DisposeAsync();
        _stop.Dispose();
    }

    private async Task HandleAsync(string text, long earliest, long latest, CancellationToken cancellationToken)
    {
        if (_instrument.IsHung)
        {
            return;
        }

        var context = _instrument.NextCommand();
        foreach (var fault in _instrument.Faults)
        {
            fault.OnCommand(context);
        }

        if (context.Hang)
        {
            _instrument.IsHung = true;
            return;
        }

        if (context.Unplug)
        {
            _instrument.IsUnplugged = true;
        }

        if (context.DropConnection || _instrument.IsUnplugged)
        {
            _closed = true;
            _replies.Writer.TryComplete();
            await _stop.CancelAsync();
            return;
        }

        var response = await _instrument.Front.ExecuteAsync(text, earliest, latest, cancellationToken);
        if (response is not null && _inline is { } inline)
        {
            if (inline.Unread + response.Length + _instrument.ReplyEnd.Length > MaxPendingBytes)
            {
                _closed = true;
                await _stop.CancelAsync();
                return;
            }

            inline.Append(response, _instrument.ReplyEnd);
        }
        else if (response is not null)
        {
            var reply = Encoding.ASCII.GetBytes(response + _instrument.ReplyEnd);
            if (Interlocked.Add(ref _pending, reply.Length) > MaxPendingBytes)
            {
                _closed = true;
                _replies.Writer.TryComplete();
                await _stop.CancelAsync();
                _dropped?.Invoke($"more than {MaxPendingBytes / 1024} KiB of replies left unread (it sends queries and does not read the answers).");
                return;
            }

            await _replies.Writer.WriteAsync((context, reply), cancellationToken);
        }
    }

    private async Task PumpAsync()
    {
        try
        {
            await foreach (var (context, reply) in _replies.Reader.ReadAllAsync(_stop.Token))
            {
                var wire = reply;
                foreach (var fault in _instrument.Faults)
                {
                    wire = await fault.OnReplyAsync(context, wire, _stop.Token);
                }

                await _output.WriteAsync(wire, _stop.Token);
                await _output.FlushAsync(_stop.Token);
                Interlocked.Add(ref _pending, -reply.Length);
            }
        }
        catch (OperationCanceledException) when (_stop.IsCancellationRequested)
        {
        }
        catch (IOException)
        {
        }
        catch (ObjectDisposedException)
        {
        }
    }
}

/// <summary>A served instrument: its SCPI front, the front connections talk to (SCPI, or a profile's dialect), its terminators, the faults that
/// watch it, and its command counter.</summary>
internal sealed class SimulatedInstrument(
    string name,
    ScpiInstrument scpi,
    IReadOnlyList<IFault> faults,
    Func<int, FaultContext> context,
    IInstrumentFront? front = null,
    string lineEnd = "\n",
    string replyEnd = "\n")
{
    private int _commands;

    /// <summary>The instrument's name (<c>supply</c>, <c>load</c>, <c>dmm</c>, <c>uut</c>, <c>ref</c>).</summary>
    public string Name { get; } = name;

    /// <summary>The SCPI front.</summary>
    public ScpiInstrument Scpi { get; } = scpi;

    /// <summary>What connections talk to: the SCPI front, or a dialect front over it.</summary>
    public IInstrumentFront Front { get; } = front ?? scpi;

    /// <summary>The byte that ends a program message (the last byte of the instrument's input terminator).</summary>
    public byte LineEnd { get; } = (byte)lineEnd[^1];

    /// <summary>What ends each response.</summary>
    public string ReplyEnd { get; } = replyEnd;

    /// <summary>The faults that watch this instrument.</summary>
    public IReadOnlyList<IFault> Faults { get; } = faults;

    /// <summary>True once a fault hung the instrument: it executes and answers nothing more, on any connection.</summary>
    public bool IsHung { get; set; }

    /// <summary>True once a fault took the instrument off the network: every connection to it is closed.</summary>
    public bool IsUnplugged { get; set; }

    /// <summary>Counts a command line and gives the faults their context for it.</summary>
    public FaultContext NextCommand() => context(Interlocked.Increment(ref _commands));
}

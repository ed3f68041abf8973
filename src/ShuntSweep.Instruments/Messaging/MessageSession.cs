using System.Net.Sockets;
using System.Runtime.CompilerServices;
using System.Text;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Transports;

namespace ShuntSweep.Instruments.Messaging;

/// <summary>An IEEE 488.2 message exchange with one instrument: commands, queries, arbitrary blocks, the error queue; safe for concurrent callers.</summary>
/// <remarks>
/// <para>One lock is held across each write and its read, so two callers never interleave on one instrument.</para>
/// <para>
/// A query that times out after its command was sent still owes an answer. Before the session is used again it waits for and discards
/// that late answer (up to one timeout); if it does not come, the session reopens the connection when it can, so a late answer is never
/// returned as the answer to a later query. Bytes that arrive unasked are discarded before every exchange.
/// </para>
/// <para>Timeouts run on the I/O time provider, which is the wall clock by default even when the bench itself runs on virtual time.</para>
/// </remarks>
public sealed class MessageSession : IAsyncDisposable
{
    private const int MaxErrorsDrained = 64;

    private readonly SemaphoreSlim _gate = new(1, 1);
    private readonly TransportOpener? _opener;
    private readonly TimeProvider _ioTime;
    private readonly TrafficTap? _traffic;
    private readonly byte[] _readTerminator;
    private readonly byte[] _writeTerminator;
    private readonly Queue<AnswerKind> _owed = new();
    private ITransport? _transport;
    private byte[] _in = new byte[4096];
    private int _start;
    private int _end;
    private int _scan;
    private byte[] _out = new byte[256];
    private CancellationTokenSource _timer;
    private CancellationTokenRegistration _link;
    private bool _broken;
    private bool _disposed;
    private long _readyAt;

    /// <summary>Creates a session over an open transport; <paramref name="reopen"/>, when given, is used to reconnect after a lost connection or an unrecoverable stale answer.</summary>
    public MessageSession(ITransport transport, SessionOptions? options = null, TransportOpener? reopen = null, TimeProvider? ioTime = null, TrafficTap? traffic = null)
    {
        ArgumentNullException.ThrowIfNull(transport);
        Options = options ?? new SessionOptions();
        Options.Validate();
        Resource = transport.Resource;
        _transport = transport;
        _opener = reopen;
        _ioTime = ioTime ?? TimeProvider.System;
        _traffic = traffic;
        _readTerminator = Encoding.ASCII.GetBytes(Options.ReadTermination);
        _writeTerminator = Encoding.ASCII.GetBytes(Options.WriteTermination);
        _timer = new CancellationTokenSource(Timeout.InfiniteTimeSpan, _ioTime);
    }

    private enum AnswerKind : byte
    {
        Message,
        Block,
    }

    /// <summary>The resource string of the instrument.</summary>
    public string Resource { get; }

    /// <summary>The options the session was made with.</summary>
    public SessionOptions Options { get; }

    /// <summary>How many times the connection was reopened; a driver that sees it change re-sends its configuration.</summary>
    public int Generation { get; private set; }

    /// <summary>Makes sure the session is usable: reconnects when the connection was lost and discards late answers, so that <see cref="Generation"/> is current.</summary>
    public async ValueTask EnsureReadyAsync(CancellationToken cancellationToken = default)
    {
        await _gate.WaitAsync(cancellationToken);
        try
        {
            await PrepareAsync(cancellationToken);
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>Sends a command that has no answer.</summary>
    public ValueTask WriteAsync(string command, CancellationToken cancellationToken = default) => SendCommandAsync(command, urgent: false, cancellationToken);

    /// <summary>Sends a command at once, without first waiting for answers the instrument still owes: switching an output off must not queue behind a hung exchange.</summary>
    /// <remarks>Late answers stay owed and are discarded before the next ordinary exchange; a lost connection is still reopened first.</remarks>
    public ValueTask WriteUrgentAsync(string command, CancellationToken cancellationToken = default) => SendCommandAsync(command, urgent: true, cancellationToken);

    [AsyncMethodBuilder(typeof(PoolingAsyncValueTaskMethodBuilder))]
    private async ValueTask SendCommandAsync(string command, bool urgent, CancellationToken cancellationToken)
    {
        await _gate.WaitAsync(cancellationToken);
        try
        {
            if (urgent)
            {
                ObjectDisposedException.ThrowIf(_disposed, this);
                if (_transport is null || _broken)
                {
                    await ReopenAsync("the connection was lost", cancellationToken);
                }
            }
            else
            {
                await PrepareAsync(cancellationToken);
            }

            var token = Arm(Options.Timeout, cancellationToken);
            try
            {
                var sentAt = _ioTime.GetTimestamp();
                await SendAsync(command, token);
                _traffic?.Exchange(command, null, _ioTime.GetElapsedTime(sentAt).TotalMilliseconds);
            }
            catch (OperationCanceledException) when (!cancellationToken.IsCancellationRequested)
            {
                _broken = true;
                throw new InstrumentTimeoutException(Resource, $"the command '{command}' could not be sent within {Seconds(Options.Timeout)}.", Options.Timeout);
            }
            finally
            {
                Disarm();
            }
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>Sends a query and returns its answer without the terminator.</summary>
    /// <param name="query">The query, for example <c>MEAS:VOLT?</c>.</param>
    /// <param name="timeout">How long to wait for the whole answer; the session's default when null.</param>
    /// <param name="cancellationToken">Cancels the wait; the answer, when it comes late, is discarded.</param>
    [AsyncMethodBuilder(typeof(PoolingAsyncValueTaskMethodBuilder<>))]
    public async ValueTask<string> QueryAsync(string query, TimeSpan? timeout = null, CancellationToken cancellationToken = default)
    {
        await _gate.WaitAsync(cancellationToken);
        try
        {
            await PrepareAsync(cancellationToken);
            var limit = timeout ?? Options.Timeout;
            var token = Arm(limit, cancellationToken);
            var sent = false;
            var started = _ioTime.GetTimestamp();
            try
            {
                await SendAsync(query, token);
                sent = true;
                var length = await ReceiveMessageAsync(query, token);
                var text = Encoding.Latin1.GetString(_in, _start, length);
                Consume(length + _readTerminator.Length);
                _traffic?.Exchange(query, text, _ioTime.GetElapsedTime(started).TotalMilliseconds);
                return text;
            }
            catch (OperationCanceledException) when (sent)
            {
                _owed.Enqueue(AnswerKind.Message);
                if (cancellationToken.IsCancellationRequested)
                {
                    throw;
                }

                _traffic?.Note($"no complete answer to '{query}' within {Seconds(limit)}{Pending()}");
                throw new InstrumentTimeoutException(Resource, $"no complete answer to '{query}' within {Seconds(limit)}{Pending()}.", limit);
            }
            catch (OperationCanceledException) when (!cancellationToken.IsCancellationRequested)
            {
                _broken = true;
                throw new InstrumentTimeoutException(Resource, $"the query '{query}' could not be sent within {Seconds(limit)}.", limit);
            }
            finally
            {
                Disarm();
            }
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>Sends a query whose answer is one arbitrary block (IEEE 488.2 §8.7.9 definite length <c>#&lt;n&gt;&lt;length&gt;&lt;bytes&gt;</c>, or §8.7.10 indefinite <c>#0&lt;bytes&gt;</c> ending at the terminator) and returns its bytes.</summary>
    public async ValueTask<byte[]> QueryBlockAsync(string query, TimeSpan? timeout = null, CancellationToken cancellationToken = default)
    {
        await _gate.WaitAsync(cancellationToken);
        try
        {
            await PrepareAsync(cancellationToken);
            var limit = timeout ?? Options.Timeout;
            var token = Arm(limit, cancellationToken);
            var sent = false;
            var started = _ioTime.GetTimestamp();
            try
            {
                await SendAsync(query, token);
                sent = true;
                var (offset, length, total) = await ReceiveBlockAsync(query, token);
                var data = _in.AsSpan(offset, length).ToArray();
                Consume(total);
                _traffic?.Exchange(query, $"<block of {length} bytes>", _ioTime.GetElapsedTime(started).TotalMilliseconds);
                return data;
            }
            catch (OperationCanceledException) when (sent)
            {
                _owed.Enqueue(AnswerKind.Block);
                if (cancellationToken.IsCancellationRequested)
                {
                    throw;
                }

                throw new InstrumentTimeoutException(Resource, $"no complete block answer to '{query}' within {Seconds(limit)}{Pending()}.", limit);
            }
            catch (OperationCanceledException) when (!cancellationToken.IsCancellationRequested)
            {
                _broken = true;
                throw new InstrumentTimeoutException(Resource, $"the query '{query}' could not be sent within {Seconds(limit)}.", limit);
            }
            finally
            {
                Disarm();
            }
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>Reads what the instrument reports as errors, oldest first: the SCPI queue until code 0 (SCPI-99 Vol. 2 §21.8: <c>0,"No error"</c> when
    /// empty), a queue of bare codes until 0, the error bits of a status word read once, or nothing when the instrument cannot be asked.</summary>
    public async ValueTask<IReadOnlyList<InstrumentError>> DrainErrorsAsync(CancellationToken cancellationToken = default)
    {
        var reporting = Options.Errors;
        if (!reporting.CanAsk)
        {
            return [];
        }

        var errors = new List<InstrumentError>();
        for (var i = 0; i < MaxErrorsDrained; i++)
        {
            var answer = await QueryAsync(reporting.Query, null, cancellationToken);
            InstrumentError entry;
            try
            {
                entry = reporting.Mode switch
                {
                    ErrorMode.Code => new InstrumentError(ScpiResponse.ParseInteger(answer), string.Empty),
                    ErrorMode.Status => StatusError(ScpiResponse.ParseInteger(answer), reporting.Mask),
                    _ => ScpiResponse.ParseError(answer),
                };
            }
            catch (FormatException ex)
            {
                throw new InstrumentProtocolException(Resource, $"'{reporting.Query}' answered {ex.Message}", ex);
            }

            if (entry.Code != 0)
            {
                errors.Add(entry);
                if (reporting.Clear.Length > 0)
                {
                    await WriteAsync(reporting.Clear, cancellationToken);
                }
            }

            if (entry.Code == 0 || reporting.Mode == ErrorMode.Status)
            {
                return errors;
            }
        }

        throw new InstrumentProtocolException(Resource, $"the error queue did not empty after {MaxErrorsDrained} reads of '{reporting.Query}' (first: {errors[0]}).");
    }

    private static InstrumentError StatusError(int status, int mask) =>
        (status & mask) == 0
            ? new InstrumentError(0, string.Empty)
            : new InstrumentError(status & mask, string.Create(System.Globalization.CultureInfo.InvariantCulture, $"status word {status} has error bits {status & mask}"));

    /// <summary>Sends a command, then drains the error queue and throws <see cref="InstrumentErrorException"/> when the instrument reported any error.</summary>
    public async ValueTask WriteCheckedAsync(string command, CancellationToken cancellationToken = default)
    {
        await WriteAsync(command, cancellationToken);
        var errors = await DrainErrorsAsync(cancellationToken);
        if (errors.Count > 0)
        {
            throw new InstrumentErrorException(Resource, $"after '{command}'", errors);
        }
    }

    /// <summary>Waits until the instrument has finished every pending operation (IEEE 488.2 §10.19 <c>*OPC?</c> answers 1).</summary>
    public async ValueTask SynchronizeAsync(TimeSpan? timeout = null, CancellationToken cancellationToken = default)
    {
        var answer = await QueryAsync("*OPC?", timeout, cancellationToken);
        if (answer.Trim() != "1")
        {
            throw new InstrumentProtocolException(Resource, $"'*OPC?' answered '{ScpiResponse.Shorten(answer)}'; IEEE 488.2 §10.19 requires 1.");
        }
    }

    /// <inheritdoc />
    public async ValueTask DisposeAsync()
    {
        await _gate.WaitAsync();
        try
        {
            if (_disposed)
            {
                return;
            }

            _disposed = true;
            if (_transport is { } t)
            {
                await t.DisposeAsync();
            }

            _transport = null;
            _link.Dispose();
            _timer.Dispose();
        }
        finally
        {
            _gate.Release();
        }
    }

    /// <summary>Makes the session ready: reconnects when the link was lost, discards late and unasked input.</summary>
    [AsyncMethodBuilder(typeof(PoolingAsyncValueTaskMethodBuilder))]
    private async ValueTask PrepareAsync(CancellationToken cancellationToken)
    {
        ObjectDisposedException.ThrowIf(_disposed, this);
        if (_transport is null || _broken)
        {
            await ReopenAsync("the connection was lost", cancellationToken);
        }

        if (_owed.Count > 0)
        {
            await DiscardLateAnswersAsync(cancellationToken);
        }

        if (_start < _end)
        {
            _traffic?.Note($"discarded {_end - _start} unasked bytes {ScpiResponse.Shorten(Encoding.Latin1.GetString(_in, _start, _end - _start))}");
            ResetBuffer();
        }
    }

    private async ValueTask DiscardLateAnswersAsync(CancellationToken cancellationToken)
    {
        var token = Arm(Options.Timeout, cancellationToken);
        try
        {
            while (_owed.Count > 0)
            {
                if (_owed.Peek() == AnswerKind.Message)
                {
                    var length = await ReceiveMessageAsync("(late answer)", token);
                    _traffic?.Note($"discarded late answer {Encoding.Latin1.GetString(_in, _start, length)}");
                    Consume(length + _readTerminator.Length);
                }
                else
                {
                    var (_, length, total) = await ReceiveBlockAsync("(late answer)", token);
                    _traffic?.Note($"discarded late block answer of {length} bytes");
                    Consume(total);
                }

                _owed.Dequeue();
            }
        }
        catch (OperationCanceledException) when (!cancellationToken.IsCancellationRequested)
        {
            Disarm();
            await ReopenAsync($"{_owed.Count} late answer(s) did not arrive within {Seconds(Options.Timeout)}", cancellationToken);
            return;
        }
        catch (InstrumentProtocolException ex)
        {
            Disarm();
            await ReopenAsync($"a late answer was malformed ({ex.Message})", cancellationToken);
            return;
        }
        finally
        {
            Disarm();
        }

        foreach (var command in Options.ClearCommands)
        {
            await SendWithTimeoutAsync(command, cancellationToken);
        }
    }

    private async ValueTask ReopenAsync(string why, CancellationToken cancellationToken)
    {
        if (_opener is null)
        {
            _broken = true;
            throw new InstrumentConnectionException(Resource, $"{why}, and this connection cannot be reopened.");
        }

        if (_transport is { } old)
        {
            _transport = null;
            try
            {
                await old.DisposeAsync();
            }
            catch (Exception ex) when (ex is IOException or SocketException or ObjectDisposedException)
            {
                _traffic?.Note($"closing the old connection failed: {ex.Message}");
            }
        }

        ResetBuffer();
        _owed.Clear();
        _traffic?.Note($"reconnecting: {why}");
        var token = Arm(Options.Timeout, cancellationToken);
        try
        {
            _transport = await _opener(token);
        }
        catch (OperationCanceledException) when (!cancellationToken.IsCancellationRequested)
        {
            _broken = true;
            throw new InstrumentConnectionException(Resource, $"{why}; reconnecting did not succeed within {Seconds(Options.Timeout)}.");
        }
        catch (Exception ex) when (ex is IOException or SocketException or UnauthorizedAccessException or InstrumentException)
        {
            _broken = true;
            throw new InstrumentConnectionException(Resource, $"{why}; reconnecting failed: {ex.Message}", ex);
        }
        finally
        {
            Disarm();
        }

        _broken = false;
        Generation++;
        foreach (var command in Options.ClearCommands)
        {
            await SendWithTimeoutAsync(command, cancellationToken);
        }
    }

    private async ValueTask SendWithTimeoutAsync(string command, CancellationToken cancellationToken)
    {
        var token = Arm(Options.Timeout, cancellationToken);
        try
        {
            var sentAt = _ioTime.GetTimestamp();
            await SendAsync(command, token);
            _traffic?.Exchange(command, null, _ioTime.GetElapsedTime(sentAt).TotalMilliseconds);
        }
        catch (OperationCanceledException) when (!cancellationToken.IsCancellationRequested)
        {
            _broken = true;
            throw new InstrumentTimeoutException(Resource, $"the command '{command}' could not be sent within {Seconds(Options.Timeout)}.", Options.Timeout);
        }
        finally
        {
            Disarm();
        }
    }

    [AsyncMethodBuilder(typeof(PoolingAsyncValueTaskMethodBuilder))]
    private async ValueTask SendAsync(string command, CancellationToken token)
    {
        ArgumentNullException.ThrowIfNull(command);
        if (!System.Text.Ascii.IsValid(command) || command.AsSpan().IndexOfAny('\n', '\r') >= 0)
        {
            throw new ArgumentException($"'{ScpiResponse.Shorten(command)}' is not a single SCPI message: it must be ASCII without line breaks.", nameof(command));
        }

        var size = command.Length + _writeTerminator.Length;
        if (_out.Length < size)
        {
            _out = new byte[Math.Max(size, _out.Length * 2)];
        }

        Encoding.ASCII.GetBytes(command, _out);
        _writeTerminator.CopyTo(_out, command.Length);
        if (!Options.Pacing.IsNone)
        {
            // The instrument hears nothing while it is still busy with the previous command (its processing time, or the profile's gap).
            // A timer may fire a few milliseconds early (whole milliseconds on a coarse tick), so the wait is checked against the clock
            // and continued until the instrument is ready.
            for (var wait = _readyAt - _ioTime.GetTimestamp(); wait > 0; wait = _readyAt - _ioTime.GetTimestamp())
            {
                var rest = TimeSpan.FromSeconds((double)wait / _ioTime.TimestampFrequency);
                await Task.Delay(rest < TimeSpan.FromMilliseconds(1) ? TimeSpan.FromMilliseconds(1) : rest, _ioTime, token);
            }
        }

        try
        {
            await _transport!.WriteAsync(_out.AsMemory(0, size), token);
            if (!Options.Pacing.IsNone)
            {
                _readyAt = _ioTime.GetTimestamp() + (long)(Options.Pacing.After(command).TotalSeconds * _ioTime.TimestampFrequency);
            }
        }
        catch (Exception ex) when (ex is IOException or SocketException or ObjectDisposedException)
        {
            _broken = true;
            throw new InstrumentConnectionException(Resource, $"sending '{command}' failed: {ex.Message}", ex);
        }
    }

    /// <summary>Waits until a whole terminated message is buffered at <see cref="_start"/>; returns its length without the terminator.</summary>
    [AsyncMethodBuilder(typeof(PoolingAsyncValueTaskMethodBuilder<>))]
    private async ValueTask<int> ReceiveMessageAsync(string query, CancellationToken token)
    {
        while (true)
        {
            var found = _in.AsSpan(_scan, _end - _scan).IndexOf(_readTerminator);
            if (found >= 0)
            {
                return _scan + found - _start;
            }

            _scan = Math.Max(_start, _end - (_readTerminator.Length - 1));
            await FillAsync(query, token);
        }
    }

    /// <summary>Waits until a whole arbitrary block and its terminator are buffered; returns where its data is and how many bytes the message takes.</summary>
    private async ValueTask<(int Offset, int Length, int Total)> ReceiveBlockAsync(string query, CancellationToken token)
    {
        await FillToAsync(2, query, token);
        if (_in[_start] != (byte)'#' || !char.IsAsciiDigit((char)_in[_start + 1]))
        {
            throw Malformed(query, "does not start with an arbitrary block header '#<digit>' (IEEE 488.2 §8.7.9)");
        }

        var digits = _in[_start + 1] - '0';
        if (digits == 0)
        {
            var length = await ReceiveMessageAsync(query, token);
            return (_start + 2, length - 2, length + _readTerminator.Length);
        }

        await FillToAsync(2 + digits, query, token);
        var dataLength = 0L;
        for (var i = 0; i < digits; i++)
        {
            var c = _in[_start + 2 + i];
            if (!char.IsAsciiDigit((char)c))
            {
                throw Malformed(query, $"has a block header with a non-digit in its {digits}-digit length field (IEEE 488.2 §8.7.9)");
            }

            dataLength = (dataLength * 10) + (c - '0');
        }

        if (dataLength > Options.MaxResponseBytes)
        {
            throw Malformed(query, $"announces a block of {dataLength} bytes, more than the {Options.MaxResponseBytes} allowed");
        }

        var headerLength = 2 + digits;
        var total = headerLength + (int)dataLength + _readTerminator.Length;
        try
        {
            await FillToAsync(total, query, token);
        }
        catch (OperationCanceledException) when (token.IsCancellationRequested)
        {
            _traffic?.Note($"truncated block: {dataLength} bytes announced, {Math.Max(0, _end - _start - headerLength)} received");
            throw;
        }

        if (!_in.AsSpan(_start + headerLength + (int)dataLength, _readTerminator.Length).SequenceEqual(_readTerminator))
        {
            throw Malformed(query, $"has a block of {dataLength} bytes that is not followed by the terminator (IEEE 488.2 §8.7.9: the length must be exact)");
        }

        return (_start + headerLength, (int)dataLength, total);
    }

    private InstrumentProtocolException Malformed(string query, string problem)
    {
        var shown = ScpiResponse.Shorten(Encoding.Latin1.GetString(_in, _start, Math.Min(_end - _start, 80)));
        var end = _in.AsSpan(_start, _end - _start).IndexOf(_readTerminator);
        if (end >= 0)
        {
            Consume(end + _readTerminator.Length);
        }
        else
        {
            // The rest of the malformed answer is still on its way: discard it before the next exchange.
            ResetBuffer();
            _owed.Enqueue(AnswerKind.Message);
        }

        return new InstrumentProtocolException(Resource, $"the answer to '{query}' ('{shown}') {problem}.");
    }

    private async ValueTask FillToAsync(int count, string query, CancellationToken token)
    {
        while (_end - _start < count)
        {
            await FillAsync(query, token);
        }
    }

    [AsyncMethodBuilder(typeof(PoolingAsyncValueTaskMethodBuilder))]
    private async ValueTask FillAsync(string query, CancellationToken token)
    {
        if (_end == _in.Length)
        {
            if (_start > 0)
            {
                Buffer.BlockCopy(_in, _start, _in, 0, _end - _start);
                _scan -= _start;
                _end -= _start;
                _start = 0;
            }
            else if (_in.Length >= Options.MaxResponseBytes + _readTerminator.Length + 16)
            {
                ResetBuffer();
                _broken = true;
                throw new InstrumentProtocolException(Resource, $"the answer to '{query}' is longer than {Options.MaxResponseBytes} bytes without a terminator.");
            }
            else
            {
                Array.Resize(ref _in, Math.Min(_in.Length * 2, Options.MaxResponseBytes + _readTerminator.Length + 16));
            }
        }

        int n;
        try
        {
            n = await _transport!.ReadAsync(_in.AsMemory(_end), token);
        }
        catch (Exception ex) when (ex is IOException or SocketException or ObjectDisposedException)
        {
            _broken = true;
            throw new InstrumentConnectionException(Resource, $"reading the answer to '{query}' failed after {_end - _start} bytes: {ex.Message}", ex);
        }

        if (n == 0)
        {
            _broken = true;
            var received = _end - _start;
            throw new InstrumentConnectionException(
                Resource,
                received == 0
                    ? $"the instrument closed the connection before answering '{query}'."
                    : $"the instrument closed the connection in the middle of its answer to '{query}' after {received} bytes ('{ScpiResponse.Shorten(Encoding.Latin1.GetString(_in, _start, Math.Min(received, 80)))}').");
        }

        _end += n;
    }

    private string Pending()
    {
        if (_start == _end)
        {
            return string.Empty;
        }

        var shown = ScpiResponse.Shorten(Encoding.Latin1.GetString(_in, _start, Math.Min(_end - _start, 80)));
        return $"; received '{shown}' but not the terminator {Describe(Options.ReadTermination)} (check the termination setting)";
    }

    private static string Describe(string terminator) => terminator switch
    {
        "\n" => "LF",
        "\r\n" => "CR LF",
        "\r" => "CR",
        _ => ScpiResponse.Shorten(terminator),
    };

    private static string Seconds(TimeSpan t) => QuantityFormatter.Format(t.TotalSeconds, SiUnit.Second);

    private void Consume(int count)
    {
        _start += count;
        if (_start >= _end)
        {
            ResetBuffer();
        }
        else
        {
            _scan = _start;
        }
    }

    private void ResetBuffer()
    {
        _start = 0;
        _end = 0;
        _scan = 0;
    }

    private CancellationToken Arm(TimeSpan limit, CancellationToken cancellationToken)
    {
        if (!_timer.TryReset())
        {
            _timer.Dispose();
            _timer = new CancellationTokenSource(Timeout.InfiniteTimeSpan, _ioTime);
        }

        _timer.CancelAfter(limit);
        if (cancellationToken.CanBeCanceled)
        {
            _link = cancellationToken.UnsafeRegister(static s => ((CancellationTokenSource)s!).Cancel(), _timer);
        }

        return _timer.Token;
    }

    private void Disarm()
    {
        _link.Dispose();
        _link = default;
        _timer.CancelAfter(Timeout.InfiniteTimeSpan);
    }
}

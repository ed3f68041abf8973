using System.Text;

namespace ShuntSweep.Simulation.Hosting;

/// <summary>The replies of an in-process connection on their way to its client: bytes appended by the instrument's session, read by the client
/// as from a socket.</summary>
/// <remarks>
/// A read of bytes already there completes at once on the caller's thread; only a read that finds the buffer empty (a reply a fault delays)
/// waits, and it is woken by the next append or by <see cref="Complete"/>, after which the rest is read and then 0 (end of stream).
/// Thread-safe: the session may append from its reply task while the client reads.
/// </remarks>
internal sealed class ReplyBuffer : Stream
{
    private readonly Lock _gate = new();
    private byte[] _data = new byte[512];
    private int _start;
    private int _end;
    private bool _completed;
    private TaskCompletionSource? _arrived;

    /// <summary>How many bytes wait to be read.</summary>
    public int Unread
    {
        get
        {
            lock (_gate)
            {
                return _end - _start;
            }
        }
    }

    /// <inheritdoc />
    public override bool CanRead => true;

    /// <inheritdoc />
    public override bool CanSeek => false;

    /// <inheritdoc />
    public override bool CanWrite => true;

    /// <inheritdoc />
    public override long Length => throw new NotSupportedException();

    /// <inheritdoc />
    public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }

    /// <summary>Appends <paramref name="message"/> and <paramref name="end"/> as ASCII (what <see cref="Encoding.ASCII"/> makes of them).</summary>
    public void Append(string message, string end)
    {
        TaskCompletionSource? wake;
        lock (_gate)
        {
            var at = Reserve(message.Length + end.Length);
            at += Encoding.ASCII.GetBytes(message, _data.AsSpan(at));
            Encoding.ASCII.GetBytes(end, _data.AsSpan(at));
            wake = Take();
        }

        wake?.TrySetResult();
    }

    /// <summary>Ends the stream: the client reads what is left, then 0.</summary>
    public void Complete()
    {
        TaskCompletionSource? wake;
        lock (_gate)
        {
            _completed = true;
            wake = Take();
        }

        wake?.TrySetResult();
    }

    /// <inheritdoc />
    public override void Write(ReadOnlySpan<byte> buffer)
    {
        TaskCompletionSource? wake;
        lock (_gate)
        {
            ObjectDisposedException.ThrowIf(_completed, this);
            buffer.CopyTo(_data.AsSpan(Reserve(buffer.Length)));
            wake = Take();
        }

        wake?.TrySetResult();
    }

    /// <inheritdoc />
    public override void Write(byte[] buffer, int offset, int count) => Write(buffer.AsSpan(offset, count));

    /// <inheritdoc />
    public override ValueTask WriteAsync(ReadOnlyMemory<byte> buffer, CancellationToken cancellationToken = default)
    {
        cancellationToken.ThrowIfCancellationRequested();
        Write(buffer.Span);
        return ValueTask.CompletedTask;
    }

    /// <inheritdoc />
    public override Task WriteAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
        WriteAsync(buffer.AsMemory(offset, count), cancellationToken).AsTask();

    /// <inheritdoc />
    public override void Flush()
    {
    }

    /// <inheritdoc />
    public override Task FlushAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    /// <inheritdoc />
    public override ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default)
    {
        Task waiting;
        lock (_gate)
        {
            if (TryRead(buffer.Span, out var n))
            {
                return ValueTask.FromResult(n);
            }

            _arrived ??= new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
            waiting = _arrived.Task;
        }

        return WaitThenReadAsync(waiting, buffer, cancellationToken);
    }

    /// <inheritdoc />
    public override Task<int> ReadAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
        ReadAsync(buffer.AsMemory(offset, count), cancellationToken).AsTask();

    /// <inheritdoc />
    public override int Read(byte[] buffer, int offset, int count) => ReadAsync(buffer.AsMemory(offset, count)).AsTask().GetAwaiter().GetResult();

    /// <inheritdoc />
    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    /// <inheritdoc />
    public override void SetLength(long value) => throw new NotSupportedException();

    /// <inheritdoc />
    protected override void Dispose(bool disposing)
    {
        if (disposing)
        {
            Complete();
        }

        base.Dispose(disposing);
    }

    private async ValueTask<int> WaitThenReadAsync(Task waiting, Memory<byte> buffer, CancellationToken cancellationToken)
    {
        while (true)
        {
            await waiting.WaitAsync(cancellationToken);
            lock (_gate)
            {
                if (TryRead(buffer.Span, out var n))
                {
                    return n;
                }

                _arrived ??= new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
                waiting = _arrived.Task;
            }
        }
    }

    /// <summary>Copies what is there (or reports the end); false when the reader must wait. Called under the lock.</summary>
    private bool TryRead(Span<byte> buffer, out int n)
    {
        n = Math.Min(buffer.Length, _end - _start);
        if (n > 0 || buffer.Length == 0)
        {
            _data.AsSpan(_start, n).CopyTo(buffer);
            _start += n;
            if (_start == _end)
            {
                _start = 0;
                _end = 0;
            }

            return true;
        }

        return _completed;
    }

    /// <summary>Makes room for <paramref name="count"/> more bytes and returns where they go. Called under the lock.</summary>
    private int Reserve(int count)
    {
        if (_end + count > _data.Length)
        {
            var unread = _end - _start;
            if (unread + count > _data.Length)
            {
                var grown = new byte[Math.Max(_data.Length * 2, unread + count)];
                _data.AsSpan(_start, unread).CopyTo(grown);
                _data = grown;
            }
            else
            {
                _data.AsSpan(_start, unread).CopyTo(_data);
            }

            _start = 0;
            _end = unread;
        }

        var at = _end;
        _end += count;
        return at;
    }

    /// <summary>The waiting reader to wake, if any. Called under the lock.</summary>
    private TaskCompletionSource? Take()
    {
        var wake = _arrived;
        _arrived = null;
        return wake;
    }
}

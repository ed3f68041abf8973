namespace ShuntSweep.Simulation.Hosting;

/// <summary>The client end of an in-process connection: a write executes its complete commands before it returns; responses are read back
/// from an in-memory buffer, as from a socket (at once when they are there, which they are when no fault delays them).</summary>
internal sealed class InProcessConnection : Stream
{
    private readonly ScpiSession _session;
    private readonly ReplyBuffer _responses = new();
    private readonly CancellationToken _stop;
    private int _disposed;

    /// <summary>Opens a connection to <paramref name="instrument"/>; <paramref name="stop"/> ends it when the bench is disposed.</summary>
    public InProcessConnection(SimulatedInstrument instrument, CancellationToken stop)
    {
        _session = new ScpiSession(instrument, _responses, stop);
        _stop = stop;
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

    /// <inheritdoc />
    public override void Flush()
    {
    }

    /// <inheritdoc />
    public override Task FlushAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    /// <inheritdoc />
    public override int Read(byte[] buffer, int offset, int count) => _responses.Read(buffer, offset, count);

    /// <inheritdoc />
    public override ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default) => _responses.ReadAsync(buffer, cancellationToken);

    /// <inheritdoc />
    public override Task<int> ReadAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
        _responses.ReadAsync(buffer, offset, count, cancellationToken);

    /// <inheritdoc />
    public override void Write(byte[] buffer, int offset, int count) => WriteAsync(buffer.AsMemory(offset, count)).AsTask().GetAwaiter().GetResult();

    /// <inheritdoc />
    public override Task WriteAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
        WriteAsync(buffer.AsMemory(offset, count), cancellationToken).AsTask();

    /// <inheritdoc />
    public override async ValueTask WriteAsync(ReadOnlyMemory<byte> buffer, CancellationToken cancellationToken = default)
    {
        if (_session.IsClosed || _stop.IsCancellationRequested)
        {
            throw new IOException("The simulated instrument has closed the connection.");
        }

        if (!await _session.AcceptAsync(buffer, cancellationToken))
        {
            await _session.DisposeAsync();
        }
    }

    /// <inheritdoc />
    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    /// <inheritdoc />
    public override void SetLength(long value) => throw new NotSupportedException();

    /// <inheritdoc />
    public override async ValueTask DisposeAsync()
    {
        if (Interlocked.Exchange(ref _disposed, 1) == 0)
        {
            await _session.DisposeAsync();
            await _responses.DisposeAsync();
        }

        await base.DisposeAsync();
    }

    /// <inheritdoc />
    protected override void Dispose(bool disposing)
    {
        if (disposing && Interlocked.Exchange(ref _disposed, 1) == 0)
        {
            _session.DisposeAsync().AsTask().GetAwaiter().GetResult();
            _responses.Dispose();
        }

        base.Dispose(disposing);
    }
}

namespace ShuntSweep.Instruments.Transports;

/// <summary>A transport over any duplex <see cref="Stream"/>: the in-process simulated instruments, a usbtmc device file, a serial port's stream.</summary>
/// <remarks>
/// Streams do not all honour cancellation of a read, so a read is started once and kept: when the caller gives up (timeout), the
/// read stays pending and its bytes are handed to the next <see cref="ReadAsync"/>; nothing is lost and nothing is read twice.
/// </remarks>
internal sealed class StreamTransport(string resource, Stream stream, IDisposable? owner = null) : ITransport
{
    private readonly byte[] _chunk = new byte[4096];
    private Task<int>? _pending;
    private int _at;
    private int _have;

    public string Resource { get; } = resource;

    public async ValueTask WriteAsync(ReadOnlyMemory<byte> data, CancellationToken cancellationToken)
    {
        await stream.WriteAsync(data, cancellationToken);
        await stream.FlushAsync(cancellationToken);
    }

    public async ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken)
    {
        if (_at == _have)
        {
            _pending ??= stream.ReadAsync(_chunk, CancellationToken.None).AsTask();
            var n = await _pending.WaitAsync(cancellationToken);
            _pending = null;
            _at = 0;
            _have = n;
            if (n == 0)
            {
                return 0;
            }
        }

        var take = Math.Min(_have - _at, buffer.Length);
        _chunk.AsSpan(_at, take).CopyTo(buffer.Span);
        _at += take;
        return take;
    }

    public async ValueTask DisposeAsync()
    {
        await stream.DisposeAsync();
        owner?.Dispose();
        if (_pending is { } p)
        {
            // The stream is closed; the abandoned read ends with an error or 0 bytes, which nobody needs.
            await p.ContinueWith(static _ => { }, CancellationToken.None, TaskContinuationOptions.ExecuteSynchronously, TaskScheduler.Default);
        }
    }
}

namespace ShuntSweep.Instruments.Transports;

/// <summary>A byte pipe to one instrument (socket, serial port, usbtmc device file, in-process stream); sessions and decorators build on it.</summary>
/// <remarks>
/// Not thread-safe: the session that owns a transport serialises every call.
/// <see cref="ReadAsync"/> honours cancellation without losing bytes: data that arrives after a cancelled read is returned by the next read.
/// </remarks>
public interface ITransport : IAsyncDisposable
{
    /// <summary>The resource string the transport is connected to, for messages and the traffic log.</summary>
    string Resource { get; }

    /// <summary>Sends <paramref name="data"/> as one write (a command and its terminator must not be split by the caller).</summary>
    ValueTask WriteAsync(ReadOnlyMemory<byte> data, CancellationToken cancellationToken);

    /// <summary>Reads at least one byte into <paramref name="buffer"/>; returns 0 when the instrument closed the connection.</summary>
    ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken);
}

/// <summary>Opens a fresh transport to the same instrument, for the reconnect path and for device clear by reconnection.</summary>
public delegate ValueTask<ITransport> TransportOpener(CancellationToken cancellationToken);

using System.IO.Pipelines;

namespace ShuntSweep.Simulation.Hosting;

/// <summary>One end of an in-memory duplex connection: reads from one pipe, writes to the other, so a client and the simulator talk as over a socket.</summary>
internal sealed class DuplexPipeStream(PipeReader reader, PipeWriter writer) : Stream
{
    private readonly Stream _in = reader.AsStream();
    private readonly Stream _out = writer.AsStream();

    /// <summary>Creates a connected pair: what one end writes, the other reads.</summary>
    public static (DuplexPipeStream Client, DuplexPipeStream Server) CreatePair()
    {
        var toServer = new Pipe();
        var toClient = new Pipe();
        return (new DuplexPipeStream(toClient.Reader, toServer.Writer), new DuplexPipeStream(toServer.Reader, toClient.Writer));
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
    public override void Flush() => _out.Flush();

    /// <inheritdoc />
    public override Task FlushAsync(CancellationToken cancellationToken) => _out.FlushAsync(cancellationToken);

    /// <inheritdoc />
    public override int Read(byte[] buffer, int offset, int count) => _in.Read(buffer, offset, count);

    /// <inheritdoc />
    public override ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default) => _in.ReadAsync(buffer, cancellationToken);

    /// <inheritdoc />
    public override Task<int> ReadAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) => _in.ReadAsync(buffer, offset, count, cancellationToken);

    /// <inheritdoc />
    public override void Write(byte[] buffer, int offset, int count) => _out.Write(buffer, offset, count);

    /// <inheritdoc />
    public override ValueTask WriteAsync(ReadOnlyMemory<byte> buffer, CancellationToken cancellationToken = default) => _out.WriteAsync(buffer, cancellationToken);

    /// <inheritdoc />
    public override Task WriteAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) => _out.WriteAsync(buffer, offset, count, cancellationToken);

    /// <inheritdoc />
    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    /// <inheritdoc />
    public override void SetLength(long value) => throw new NotSupportedException();

    /// <inheritdoc />
    protected override void Dispose(bool disposing)
    {
        if (disposing)
        {
            _out.Dispose();
            _in.Dispose();
        }

        base.Dispose(disposing);
    }
}

using System.Globalization;
using System.Text;

namespace ShuntSweep.Simulation.Tests.Support;

/// <summary>A minimal line-based SCPI client over any stream, for talking to the simulator in raw SCPI text.</summary>
internal sealed class ScpiClient(Stream stream) : IAsyncDisposable
{
    private readonly List<byte> _pending = [];

    public async Task SendAsync(string line) => await stream.WriteAsync(Encoding.ASCII.GetBytes(line + "\n"), TestContext.Current.CancellationToken);

    public async Task SendRawAsync(byte[] bytes) => await stream.WriteAsync(bytes, TestContext.Current.CancellationToken);

    public async Task<string> QueryAsync(string line)
    {
        await SendAsync(line);
        return await ReadLineAsync();
    }

    public async Task<double> NumberAsync(string line) => double.Parse(await QueryAsync(line), NumberStyles.Float, CultureInfo.InvariantCulture);

    public async Task<double[]> NumbersAsync(string line) =>
        (await QueryAsync(line)).Split(',').Select(s => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture)).ToArray();

    public async Task<string> ReadLineAsync()
    {
        var buffer = new byte[1];
        while (true)
        {
            var newline = _pending.IndexOf((byte)'\n');
            if (newline >= 0)
            {
                var line = Encoding.ASCII.GetString(_pending.GetRange(0, newline).ToArray());
                _pending.RemoveRange(0, newline + 1);
                return line;
            }

            var n = await stream.ReadAsync(buffer, TestContext.Current.CancellationToken);
            if (n == 0)
            {
                throw new EndOfStreamException("The simulator closed the connection.");
            }

            _pending.Add(buffer[0]);
        }
    }

    /// <summary>Reads every queued error until 0,"No error".</summary>
    public async Task<List<string>> DrainErrorsAsync()
    {
        var errors = new List<string>();
        for (var i = 0; i < 100; i++)
        {
            var e = await QueryAsync("SYST:ERR?");
            if (e.StartsWith("0,", StringComparison.Ordinal))
            {
                return errors;
            }

            errors.Add(e);
        }

        throw new InvalidOperationException("The error queue never emptied.");
    }

    public ValueTask DisposeAsync() => stream.DisposeAsync();
}

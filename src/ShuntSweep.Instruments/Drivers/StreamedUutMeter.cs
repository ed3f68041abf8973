using System.Globalization;
using System.Text;
using System.Threading.Channels;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Timing;
using ShuntSweep.Core.Uut;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Transports;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A UUT that sends its display as text lines on its own (a "data out" serial stream), decoded by the pattern of the bench file.</summary>
/// <remarks>A background reader keeps the lines; arming forgets every line received so far, and a fetch returns the first reading that arrives after the arm.</remarks>
internal sealed class StreamedUutMeter : IUutMeter, IAsyncDisposable
{
    private readonly ITransport _transport;
    private readonly StreamedReadingSettings _settings;
    private readonly TimeSpan _timeout;
    private readonly Channel<string> _lines = Channel.CreateBounded<string>(new BoundedChannelOptions(256) { FullMode = BoundedChannelFullMode.DropOldest });
    private readonly CancellationTokenSource _stop = new();
    private readonly Task _reader;
    private readonly TimeProvider _time;

    public StreamedUutMeter(ITransport transport, StreamedReadingSettings settings, TimeSpan timeout, TimeProvider time)
    {
        _transport = transport;
        _settings = settings;
        _timeout = timeout;
        _time = time;
        _reader = Task.Run(ReadLinesAsync);
    }

    public string Resource => _transport.Resource;

    public TimeSpan MeasurementTime => _settings.ReadingInterval;

    public Task<InstrumentIdentity> IdentifyAsync(CancellationToken cancellationToken = default) =>
        Task.FromResult(new InstrumentIdentity("(display stream)", Resource, "-", "-"));

    public Task SelectRangeAsync(RangeSpec range, CancellationToken cancellationToken = default) => Task.CompletedTask;

    public Task ArmAsync(CancellationToken cancellationToken = default)
    {
        while (_lines.Reader.TryRead(out _))
        {
            // Readings from before the arm belong to an earlier point.
        }

        return Task.CompletedTask;
    }

    public async Task<IReadOnlyList<double>> FetchAsync(CancellationToken cancellationToken = default)
    {
        var limit = _timeout + (2 * _settings.ReadingInterval);
        using var timeout = new CancellationTokenSource(limit, _time);
        using var linked = CancellationTokenSource.CreateLinkedTokenSource(timeout.Token, cancellationToken);
        try
        {
            while (true)
            {
                var line = await _lines.Reader.ReadAsync(linked.Token);
                if (Decode(line) is { } value)
                {
                    return [value];
                }
            }
        }
        catch (OperationCanceledException) when (timeout.IsCancellationRequested && !cancellationToken.IsCancellationRequested)
        {
            throw new InstrumentTimeoutException(Resource, $"no line matching the reading pattern arrived within {QuantityFormatter.Format(limit.TotalSeconds, SiUnit.Second)}.", limit);
        }
        catch (ChannelClosedException ex)
        {
            throw new InstrumentConnectionException(Resource, "the UUT's display stream ended.", ex.InnerException);
        }
    }

    /// <summary>The reading in a line: overload → +∞, the <c>value</c> group scaled by the <c>unit</c> group, or null when the line is not a reading.</summary>
    internal double? Decode(string line)
    {
        if (_settings.Overload is { } ol && ol.IsMatch(line))
        {
            return double.PositiveInfinity;
        }

        var match = _settings.Pattern.Match(line);
        if (!match.Success || !double.TryParse(match.Groups["value"].Value, NumberStyles.Float, CultureInfo.InvariantCulture, out var value))
        {
            return null;
        }

        var unit = match.Groups["unit"];
        var scale = !unit.Success ? 1 : unit.Value.Trim() switch
        {
            "A" or "" => 1,
            "mA" => 1e-3,
            "uA" or "µA" or "μA" => 1e-6,
            "nA" => 1e-9,
            _ => double.NaN,
        };
        return double.IsNaN(scale) ? null : value * scale;
    }

    public async ValueTask DisposeAsync()
    {
        await _stop.CancelAsync();
        await _transport.DisposeAsync();
        try
        {
            await _reader;
        }
        catch (Exception ex) when (ex is OperationCanceledException or IOException or ObjectDisposedException)
        {
            // The stream ended because we closed it.
        }

        _stop.Dispose();
    }

    private async Task ReadLinesAsync()
    {
        var buffer = new byte[512];
        var line = new StringBuilder();
        try
        {
            while (!_stop.IsCancellationRequested)
            {
                var n = await _transport.ReadAsync(buffer, _stop.Token);
                if (n == 0)
                {
                    break;
                }

                for (var i = 0; i < n; i++)
                {
                    var c = (char)buffer[i];
                    if (c is '\n' or '\r')
                    {
                        if (line.Length > 0)
                        {
                            _lines.Writer.TryWrite(line.ToString());
                            line.Clear();
                        }
                    }
                    else if (line.Length < 4096)
                    {
                        line.Append(c);
                    }
                }
            }

            _lines.Writer.TryComplete();
        }
        catch (Exception ex) when (ex is OperationCanceledException or IOException or ObjectDisposedException or System.Net.Sockets.SocketException)
        {
            _lines.Writer.TryComplete(ex is OperationCanceledException ? null : ex);
        }
    }
}

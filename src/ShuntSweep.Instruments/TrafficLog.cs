using System.Buffers;
using System.Globalization;
using System.Text.Json;

namespace ShuntSweep.Instruments;

/// <summary>The traffic log: one JSON line per exchange with what was sent and what came back, the instrument's role and resource, and the run's own clock.</summary>
/// <remarks>
/// Lines are <c>{"t","elapsedS","role","resource","tx","rx","ms"}</c> (no <c>rx</c> for a command without an answer) and
/// <c>{"t","elapsedS","role","resource","note"}</c> for what the session did on its own (a late answer discarded, a reconnect).
/// Writing is buffered and costs no I/O on the exchange itself; disposing flushes, and the run disposes it on every way it ends.
/// </remarks>
public sealed class TrafficLog : IDisposable
{
    private readonly Lock _gate = new();
    private readonly FileStream _file;
    private readonly ArrayBufferWriter<byte> _buffer = new(512);
    private readonly Utf8JsonWriter _json;
    private readonly TimeProvider _clock;
    private readonly DateTimeOffset _start;
    private bool _disposed;

    private TrafficLog(FileStream file, TimeProvider clock, DateTimeOffset start)
    {
        _file = file;
        _clock = clock;
        _start = start;
        _json = new Utf8JsonWriter(_buffer, new JsonWriterOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
    }

    /// <summary>Creates (or replaces) the log at <paramref name="path"/>; times come from <paramref name="clock"/> (the bench's, virtual on a simulated bench) and count from <paramref name="start"/>.</summary>
    public static TrafficLog Create(string path, TimeProvider clock, DateTimeOffset start)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(clock);
        var directory = Path.GetDirectoryName(Path.GetFullPath(path));
        if (directory is not null)
        {
            Directory.CreateDirectory(directory);
        }

        return new TrafficLog(new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.Read, 1 << 20), clock, start);
    }

    /// <summary>The recorder of one instrument, tagged with its role and resource.</summary>
    public TrafficTap For(string role, string resource) => new(this, role, resource);

    /// <summary>Writes what is buffered to the file.</summary>
    public void Flush()
    {
        lock (_gate)
        {
            if (!_disposed)
            {
                _file.Flush();
            }
        }
    }

    /// <inheritdoc />
    public void Dispose()
    {
        lock (_gate)
        {
            if (_disposed)
            {
                return;
            }

            _disposed = true;
            _json.Dispose();
            _file.Dispose();
        }
    }

    /// <summary>Appends one line; <paramref name="received"/> null for a command without an answer, <paramref name="note"/> for a session note instead of an exchange.</summary>
    internal void Write(TrafficTap tap, string? sent, string? received, double milliseconds, string? note)
    {
        var now = _clock.GetUtcNow();
        lock (_gate)
        {
            if (_disposed)
            {
                return;
            }

            _json.WriteStartObject();
            _json.WriteString("t", now.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss.fffffff'Z'", CultureInfo.InvariantCulture));
            _json.WriteNumber("elapsedS", Math.Round((now - _start).TotalSeconds, 7));
            _json.WriteString("role", tap.Role);
            _json.WriteString("resource", tap.Resource);
            if (note is not null)
            {
                _json.WriteString("note", note);
            }
            else
            {
                _json.WriteString("tx", sent);
                if (received is not null)
                {
                    _json.WriteString("rx", received);
                }

                _json.WriteNumber("ms", Math.Round(milliseconds, 3));
            }

            _json.WriteEndObject();
            _json.Flush();
            _file.Write(_buffer.WrittenSpan);
            _file.WriteByte((byte)'\n');
            _buffer.ResetWrittenCount();
            _json.Reset();
        }
    }
}

/// <summary>Records the traffic of one instrument into its <see cref="TrafficLog"/>.</summary>
public sealed class TrafficTap
{
    private readonly TrafficLog _log;

    internal TrafficTap(TrafficLog log, string role, string resource)
    {
        _log = log;
        Role = role;
        Resource = resource;
    }

    /// <summary>The instrument's bench role (<c>supply</c>, <c>dropMeter</c>, …).</summary>
    public string Role { get; }

    /// <summary>The instrument's resource string.</summary>
    public string Resource { get; }

    /// <summary>Records one exchange: what was sent, what came back (null for a command without an answer), and how long it took on the wall clock.</summary>
    public void Exchange(string sent, string? received, double milliseconds) => _log.Write(this, sent, received, milliseconds, null);

    /// <summary>Records something the session did on its own.</summary>
    public void Note(string text) => _log.Write(this, null, null, 0, text);
}

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
    /// <summary>How strings are escaped in the log: only what JSON requires, so SCPI text stays readable.</summary>
    internal static readonly System.Text.Encodings.Web.JavaScriptEncoder Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping;

    private static readonly JsonEncodedText TimeName = JsonEncodedText.Encode("t");
    private static readonly JsonEncodedText ElapsedName = JsonEncodedText.Encode("elapsedS");
    private static readonly JsonEncodedText RoleName = JsonEncodedText.Encode("role");
    private static readonly JsonEncodedText ResourceName = JsonEncodedText.Encode("resource");
    private static readonly JsonEncodedText NoteName = JsonEncodedText.Encode("note");
    private static readonly JsonEncodedText SentName = JsonEncodedText.Encode("tx");
    private static readonly JsonEncodedText ReceivedName = JsonEncodedText.Encode("rx");
    private static readonly JsonEncodedText MillisecondsName = JsonEncodedText.Encode("ms");
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
        _json = new Utf8JsonWriter(_buffer, new JsonWriterOptions { Encoder = Encoder });
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

            // The time as "O" gives (seven fraction digits, Z) straight into UTF-8, and the names pre-encoded: this runs on every exchange.
            Span<byte> t = stackalloc byte[40];
            now.UtcDateTime.TryFormat(t, out var length, "O", CultureInfo.InvariantCulture);
            _json.WriteStartObject();
            _json.WriteString(TimeName, t[..length]);
            _json.WriteNumber(ElapsedName, Math.Round((now - _start).TotalSeconds, 7));
            _json.WriteString(RoleName, tap.EncodedRole);
            _json.WriteString(ResourceName, tap.EncodedResource);
            if (note is not null)
            {
                _json.WriteString(NoteName, note);
            }
            else
            {
                _json.WriteString(SentName, sent);
                if (received is not null)
                {
                    _json.WriteString(ReceivedName, received);
                }

                _json.WriteNumber(MillisecondsName, Math.Round(milliseconds, 3));
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
        EncodedRole = JsonEncodedText.Encode(role, TrafficLog.Encoder);
        EncodedResource = JsonEncodedText.Encode(resource, TrafficLog.Encoder);
    }

    /// <summary>The instrument's bench role (<c>supply</c>, <c>dropMeter</c>, …).</summary>
    public string Role { get; }

    /// <summary>The instrument's resource string.</summary>
    public string Resource { get; }

    /// <summary>The role as JSON, escaped once for every line it tags.</summary>
    internal JsonEncodedText EncodedRole { get; }

    /// <summary>The resource as JSON, escaped once for every line it tags.</summary>
    internal JsonEncodedText EncodedResource { get; }

    /// <summary>Records one exchange: what was sent, what came back (null for a command without an answer), and how long it took on the wall clock.</summary>
    public void Exchange(string sent, string? received, double milliseconds) => _log.Write(this, sent, received, milliseconds, null);

    /// <summary>Records something the session did on its own.</summary>
    public void Note(string text) => _log.Write(this, null, null, 0, text);
}

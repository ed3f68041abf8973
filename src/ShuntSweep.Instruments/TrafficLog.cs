using System.Buffers;
using System.Collections.Concurrent;
using System.Globalization;
using System.Text.Json;

namespace ShuntSweep.Instruments;

/// <summary>The traffic log: one JSON line per exchange with what was sent and what came back, the instrument's role and resource, and the run's own clock.</summary>
/// <remarks>
/// Lines are <c>{"t","elapsedS","role","resource","tx","rx","ms"}</c> (no <c>rx</c> for a command without an answer) and
/// <c>{"t","elapsedS","role","resource","note"}</c> for what the session did on its own (a late answer discarded, a reconnect).
/// An exchange only queues its line, stamped with the clock's time; a writer thread of the log's own formats and writes the lines in
/// the order they were queued, woken once per batch of lines, so the exchange pays for neither JSON nor I/O. <see cref="Flush"/>
/// waits until everything queued is in the file; disposing writes the rest and closes it, and the run disposes it on every way it ends.
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

    /// <summary>How many lines are queued per wake-up of the writer (a power of two): waking it for every line would cost the exchange
    /// more than formatting the line itself.</summary>
    private const int Batch = 256;

    private readonly string _path;
    private readonly FileStream _file;
    private readonly ArrayBufferWriter<byte> _buffer = new(512);
    private readonly Utf8JsonWriter _json;
    private readonly TimeProvider _clock;
    private readonly DateTimeOffset _start;
    private readonly Lock _gate = new();
    private readonly ConcurrentQueue<Line> _queue = new();
    // Never disposed: a Write racing Dispose may still release it, and it holds no handle unless one is asked for.
    private readonly SemaphoreSlim _wake = new(0);
    private readonly Thread _writer;
    private Exception? _failure;
    private int _queued;
    private volatile bool _closing;

    private TrafficLog(string path, FileStream file, TimeProvider clock, DateTimeOffset start)
    {
        _path = path;
        _file = file;
        _clock = clock;
        _start = start;
        _json = new Utf8JsonWriter(_buffer, new JsonWriterOptions { Encoder = Encoder });
        _writer = new Thread(WriteQueued) { IsBackground = true, Name = "traffic log" };
        _writer.Start();
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

        return new TrafficLog(path, new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.Read, 1 << 20), clock, start);
    }

    /// <summary>The recorder of one instrument, tagged with its role and resource.</summary>
    public TrafficTap For(string role, string resource) => new(this, role, resource);

    /// <summary>Waits until every line queued so far is written to the file.</summary>
    /// <exception cref="IOException">When the file could not be written (the message names it).</exception>
    public void Flush()
    {
        using var written = new ManualResetEventSlim();
        lock (_gate)
        {
            // Under the lock, so that the request is queued before a concurrent Dispose closes the queue, never after its last drain.
            if (_closing)
            {
                written.Set();
            }
            else
            {
                _queue.Enqueue(new Line(null, null, null, 0, null, default, written));
                _wake.Release();
            }
        }

        written.Wait();
        ThrowIfFailed();
    }

    /// <summary>Writes the lines still queued and closes the file.</summary>
    /// <exception cref="IOException">When the file could not be written (the message names it).</exception>
    public void Dispose()
    {
        lock (_gate)
        {
            if (_closing)
            {
                return;
            }

            _closing = true;
            _wake.Release();
        }

        _writer.Join();
        _json.Dispose();
        _file.Dispose();
        ThrowIfFailed();
    }

    /// <summary>Queues one line; <paramref name="received"/> null for a command without an answer, <paramref name="note"/> for a session note instead of an exchange.</summary>
    internal void Write(TrafficTap tap, string? sent, string? received, double milliseconds, string? note)
    {
        if (_closing)
        {
            return;
        }

        _queue.Enqueue(new Line(tap, sent, received, milliseconds, note, _clock.GetUtcNow(), null));
        if ((Interlocked.Increment(ref _queued) & (Batch - 1)) == 0)
        {
            _wake.Release();
        }
    }

    private void ThrowIfFailed()
    {
        if (Volatile.Read(ref _failure) is { } failure)
        {
            throw new IOException($"The traffic log {_path} could not be written: {failure.Message}", failure);
        }
    }

    /// <summary>The writer thread: formats and writes what is queued until the log is disposed; after a failed write it only drains.</summary>
    private void WriteQueued()
    {
        while (true)
        {
            _wake.Wait();
            var closing = _closing;
            while (_queue.TryDequeue(out var line))
            {
                try
                {
                    if (line.Written is { } written)
                    {
                        if (_failure is null)
                        {
                            _file.Flush();
                        }

                        written.Set();
                    }
                    else if (_failure is null)
                    {
                        Format(line);
                    }
                }
                catch (IOException ex)
                {
                    Volatile.Write(ref _failure, ex);
                    line.Written?.Set();
                }
            }

            if (closing)
            {
                return;
            }
        }
    }

    private void Format(Line line)
    {
        // The time as "O" gives (seven fraction digits, Z) straight into UTF-8, and the names pre-encoded.
        Span<byte> t = stackalloc byte[40];
        line.Time.UtcDateTime.TryFormat(t, out var length, "O", CultureInfo.InvariantCulture);
        _json.WriteStartObject();
        _json.WriteString(TimeName, t[..length]);
        _json.WriteNumber(ElapsedName, Math.Round((line.Time - _start).TotalSeconds, 7));
        _json.WriteString(RoleName, line.Tap!.EncodedRole);
        _json.WriteString(ResourceName, line.Tap.EncodedResource);
        if (line.Note is not null)
        {
            _json.WriteString(NoteName, line.Note);
        }
        else
        {
            _json.WriteString(SentName, line.Sent);
            if (line.Received is not null)
            {
                _json.WriteString(ReceivedName, line.Received);
            }

            _json.WriteNumber(MillisecondsName, Math.Round(line.Milliseconds, 3));
        }

        _json.WriteEndObject();
        _json.Flush();
        _file.Write(_buffer.WrittenSpan);
        _file.WriteByte((byte)'\n');
        _buffer.ResetWrittenCount();
        _json.Reset();
    }

    /// <summary>One queued line as the exchange left it, or (with <paramref name="Written"/>) a request to be told once the file holds
    /// everything queued before it.</summary>
    private readonly record struct Line(TrafficTap? Tap, string? Sent, string? Received, double Milliseconds, string? Note, DateTimeOffset Time, ManualResetEventSlim? Written);
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

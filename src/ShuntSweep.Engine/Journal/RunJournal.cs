using System.Text;
using System.Text.Json;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Engine.Journal;

/// <summary>The append-only record of a run in its directory: samples in <c>journal.csv</c>, what happened in <c>events.jsonl</c>.</summary>
/// <remarks>Each step's rows are appended in one write and flushed to disk before its <c>step-done</c> event, which records the journal's length;
/// a run killed at any moment therefore leaves every completed step readable, and resume cuts the journal back to the last <c>step-done</c>.</remarks>
public sealed class RunJournal : IDisposable
{
    /// <summary>The journal's file name inside a run directory.</summary>
    public const string JournalFile = "journal.csv";

    /// <summary>The event log's file name inside a run directory.</summary>
    public const string EventsFile = "events.jsonl";

    private static readonly JsonSerializerOptions JsonOptions = new() { PropertyNamingPolicy = JsonNamingPolicy.CamelCase };
    private readonly FileStream _journal;
    private readonly FileStream _events;
    private readonly TimeProvider _time;
    private readonly DateTimeOffset _start;

    private RunJournal(string directory, FileStream journal, FileStream events, TimeProvider time, DateTimeOffset start)
    {
        Directory = directory;
        _journal = journal;
        _events = events;
        _time = time;
        _start = start;
    }

    /// <summary>The run directory.</summary>
    public string Directory { get; }

    /// <summary>The full path of the journal.</summary>
    public string JournalPath => Path.Combine(Directory, JournalFile);

    /// <summary>Creates a new journal in <paramref name="directory"/> (which must not already hold one).</summary>
    public static RunJournal Create(string directory, TimeProvider time, DateTimeOffset start)
    {
        ArgumentNullException.ThrowIfNull(time);
        System.IO.Directory.CreateDirectory(directory);
        var journal = new FileStream(Path.Combine(directory, JournalFile), FileMode.CreateNew, FileAccess.Write, FileShare.Read);
        var events = new FileStream(Path.Combine(directory, EventsFile), FileMode.CreateNew, FileAccess.Write, FileShare.Read);
        var run = new RunJournal(directory, journal, events, time, start);
        AppendDurably(journal, JournalCsv.Header);
        return run;
    }

    /// <summary>Reopens the journal of an interrupted run, cut back to the end of <paramref name="lastDone"/>.</summary>
    public static RunJournal Reopen(string directory, StepDone lastDone, TimeProvider time, DateTimeOffset start)
    {
        ArgumentNullException.ThrowIfNull(lastDone);
        var journalPath = Path.Combine(directory, JournalFile);
        using (var reader = new StreamReader(journalPath))
        {
            var header = reader.ReadLine() + "\n";
            if (header != JournalCsv.Header)
            {
                throw new InvalidDataException($"{journalPath}: its columns ({header.TrimEnd()}) are not the ones this version writes ({JournalCsv.Header.TrimEnd()}); appending would mix two layouts. Fit it as it is, and start a new run instead of resuming.");
            }
        }

        var journal = new FileStream(journalPath, FileMode.Open, FileAccess.Write, FileShare.Read);
        journal.SetLength(lastDone.JournalBytes);
        journal.Seek(0, SeekOrigin.End);
        var eventsPath = Path.Combine(directory, EventsFile);
        var events = new FileStream(eventsPath, FileMode.Open, FileAccess.Write, FileShare.Read);
        events.SetLength(EventLog.CompleteLength(eventsPath));
        events.Seek(0, SeekOrigin.End);
        return new RunJournal(directory, journal, events, time, start);
    }

    /// <summary>Appends the samples of one completed step, flushes them to disk, then records the step as done.</summary>
    public void CompleteStep(int step, IReadOnlyList<Sample> samples)
    {
        ArgumentNullException.ThrowIfNull(samples);
        AppendDurably(_journal, JournalCsv.FormatRows(samples));
        Event("step-done", new Dictionary<string, object?> { ["step"] = step, ["rows"] = samples.Count, ["journalBytes"] = _journal.Length });
    }

    /// <summary>Records an event with its time and any details.</summary>
    public void Event(string name, IReadOnlyDictionary<string, object?>? details = null)
    {
        var now = _time.GetUtcNow();
        var record = new Dictionary<string, object?>
        {
            ["time"] = now.ToString("O", System.Globalization.CultureInfo.InvariantCulture),
            ["elapsedS"] = (now - _start).TotalSeconds,
            ["event"] = name,
        };
        if (details is not null)
        {
            foreach (var (k, v) in details)
            {
                record[k] = v;
            }
        }

        AppendDurably(_events, JsonSerializer.Serialize(record, JsonOptions) + "\n");
    }

    /// <inheritdoc />
    public void Dispose()
    {
        _journal.Dispose();
        _events.Dispose();
    }

    private static void AppendDurably(FileStream stream, string text)
    {
        var bytes = Encoding.UTF8.GetBytes(text);
        stream.Write(bytes);
        stream.Flush(flushToDisk: true);
    }
}

/// <summary>A step recorded as complete, and the journal's length in bytes just after it.</summary>
public sealed record StepDone(int Step, long JournalBytes);

/// <summary>Reads a run's event log.</summary>
public static class EventLog
{
    /// <summary>The last step recorded as done in the event log of <paramref name="directory"/>, or null when none is.</summary>
    public static StepDone? LastStepDone(string directory)
    {
        StepDone? last = null;
        foreach (var e in Read(Path.Combine(directory, RunJournal.EventsFile)))
        {
            if (e.GetProperty("event").GetString() == "step-done")
            {
                last = new StepDone(e.GetProperty("step").GetInt32(), e.GetProperty("journalBytes").GetInt64());
            }
        }

        return last;
    }

    /// <summary>How the last run in <paramref name="directory"/> ended (the <c>end</c> of its last <c>run-end</c> event), or null when no run has ended there.</summary>
    public static string? LastRunEnd(string directory) =>
        File.Exists(Path.Combine(directory, RunJournal.EventsFile)) && Read(Path.Combine(directory, RunJournal.EventsFile))
            .LastOrDefault(e => e.GetProperty("event").GetString() == "run-end") is { ValueKind: JsonValueKind.Object } end
            ? end.GetProperty("end").GetString()
            : null;

    /// <summary>The time of the last complete event in <paramref name="directory"/>, to tell how long a run stood before it was resumed.</summary>
    public static DateTimeOffset? LastTime(string directory) =>
        File.Exists(Path.Combine(directory, RunJournal.EventsFile)) && Read(Path.Combine(directory, RunJournal.EventsFile)).LastOrDefault() is { ValueKind: JsonValueKind.Object } last
            && DateTimeOffset.TryParse(last.GetProperty("time").GetString(), System.Globalization.CultureInfo.InvariantCulture, System.Globalization.DateTimeStyles.RoundtripKind, out var t)
            ? t
            : null;

    /// <summary>The steps of the run in <paramref name="directory"/> whose drop had not settled when their maximum wait ran out (<c>not-settled</c> events).</summary>
    public static IReadOnlySet<int> UnsettledSteps(string directory) =>
        File.Exists(Path.Combine(directory, RunJournal.EventsFile))
            ? Read(Path.Combine(directory, RunJournal.EventsFile))
                .Where(e => e.GetProperty("event").GetString() == "not-settled" && e.TryGetProperty("step", out var s) && s.ValueKind == JsonValueKind.Number)
                .Select(e => e.GetProperty("step").GetInt32())
                .ToHashSet()
            : new HashSet<int>();

    /// <summary>How long each adaptive point of the run in <paramref name="directory"/> waited for its drop to settle, by step index
    /// (<c>settled</c> and <c>not-settled</c> events), so that a plan of the same sequence can count on the same waits.</summary>
    public static IReadOnlyDictionary<int, TimeSpan> SettlingWaits(string directory) =>
        Read(Path.Combine(directory, RunJournal.EventsFile))
            .Where(e => e.GetProperty("event").GetString() is "settled" or "not-settled"
                && e.TryGetProperty("step", out var s) && s.ValueKind == JsonValueKind.Number
                && e.TryGetProperty("waitedS", out var w) && w.ValueKind == JsonValueKind.Number)
            .GroupBy(e => e.GetProperty("step").GetInt32())
            .ToDictionary(g => g.Key, g => TimeSpan.FromSeconds(g.Last().GetProperty("waitedS").GetDouble()));

    /// <summary>The events of a log, leaving out a last line torn by an interrupted write.</summary>
    public static IEnumerable<JsonElement> Read(string path)
    {
        var text = File.ReadAllText(path);
        var end = text.LastIndexOf('\n') + 1;
        var lines = text[..end].Split('\n');
        for (var i = 0; i < lines.Length; i++)
        {
            if (lines[i].Length == 0)
            {
                continue;
            }

            JsonElement element;
            try
            {
                using var doc = JsonDocument.Parse(lines[i]);
                element = doc.RootElement.Clone();
            }
            catch (JsonException ex)
            {
                throw new InvalidDataException($"{path}:{i + 1}: not a complete event record ({ex.Message}); the event log is damaged in the middle (two writers, or an edit), so the run cannot be resumed safely. Fit its journal as it is, and start a new run.", ex);
            }

            yield return element;
        }
    }

    /// <summary>The length in bytes of the complete lines of the file at <paramref name="path"/>.</summary>
    public static long CompleteLength(string path)
    {
        var bytes = File.ReadAllBytes(path);
        return Array.LastIndexOf(bytes, (byte)'\n') + 1;
    }
}

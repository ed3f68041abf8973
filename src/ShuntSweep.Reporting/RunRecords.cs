using System.Globalization;
using System.Text.Json;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Reporting;

/// <summary>What a run directory holds, read once for the report: the result (required), the manifest, journal, events and UUT when present.</summary>
/// <param name="Directory">The full path of the run directory.</param>
/// <param name="Result">The analysis result.</param>
/// <param name="Manifest">The run manifest (null for a result fitted from a journal alone).</param>
/// <param name="Samples">The journal's samples (empty when there is no journal).</param>
/// <param name="Events">The run's events, in order.</param>
/// <param name="Uut">The UUT as the bench file describes it, when the bench file named by the manifest can still be read.</param>
/// <param name="Notes">Things the report could not read, in words, shown in the report.</param>
internal sealed record RunRecords(
    string Directory,
    CharacterisationResult Result,
    RunManifest? Manifest,
    IReadOnlyList<Sample> Samples,
    IReadOnlyList<RunEvent> Events,
    UutDescription? Uut,
    IReadOnlyList<string> Notes)
{
    /// <summary>The result file's name inside a run directory.</summary>
    public const string ResultFile = "result.json";

    /// <summary>The journal's file name inside a run directory.</summary>
    public const string JournalFile = "journal.csv";

    /// <summary>The event log's file name inside a run directory.</summary>
    public const string EventsFile = "events.jsonl";

    /// <summary>The instrument traffic log's file name inside a run directory.</summary>
    public const string TrafficFile = "traffic.jsonl";

    /// <summary>Reads the run in <paramref name="directory"/>; only <c>result.json</c> is required.</summary>
    /// <exception cref="DirectoryNotFoundException">When the directory does not exist.</exception>
    /// <exception cref="FileNotFoundException">When it has no <c>result.json</c>.</exception>
    public static RunRecords Load(string directory)
    {
        var dir = Path.GetFullPath(directory);
        if (!System.IO.Directory.Exists(dir))
        {
            throw new DirectoryNotFoundException($"No run directory at '{dir}'.");
        }

        var resultPath = Path.Combine(dir, ResultFile);
        if (!File.Exists(resultPath))
        {
            throw new FileNotFoundException($"'{dir}' has no {ResultFile}; fit the journal first (shuntsweep fit {Path.Combine(dir, JournalFile)}).", resultPath);
        }

        var notes = new List<string>();
        var result = ResultJson.Read(resultPath);
        var manifest = File.Exists(Path.Combine(dir, RunManifest.FileName)) ? RunManifest.Read(dir) : null;
        if (manifest is null)
        {
            notes.Add($"No {RunManifest.FileName}: the UUT, bench and instrument identities are unknown.");
        }

        IReadOnlyList<Sample> samples = [];
        var journalPath = Path.Combine(dir, JournalFile);
        if (File.Exists(journalPath))
        {
            var journal = JournalCsv.Read(journalPath);
            samples = journal.Samples;
            if (journal.TornTail)
            {
                notes.Add("The journal's last line was incomplete (an interrupted write) and was left out.");
            }
        }
        else
        {
            notes.Add($"No {JournalFile}: plots that need the raw samples (thermal holds) are left out.");
        }

        var events = RunEvent.ReadAll(Path.Combine(dir, EventsFile));
        if (result.RunEnd is null && events.Count > 0)
        {
            // A result fitted from the journal of a run takes the run's end from its event log: a stopped run never reads as complete.
            result = result with { RunEnd = events.LastOrDefault(e => e.Name == "run-end")?.Field("end") ?? RunEndWords.CutOff };
        }

        return new RunRecords(dir, result, manifest, samples, events, LoadUut(dir, manifest, notes), notes) { Approval = Reporting.Approval.Read(dir) };
    }

    /// <summary>Who approved the record and when, when it was approved.</summary>
    public Approval? Approval { get; init; }

    /// <summary>The record's identifier: <c>SSR-</c> and the first twelve hex digits of the archive's run id (UUT, start, sequence, bench, seed).</summary>
    public string? ReportId => Manifest is null ? null : "SSR-" + Archive.SqlArchive.RunId(Manifest)[..12].ToUpperInvariant();

    /// <summary>Whether <paramref name="fileName"/> exists in the run directory.</summary>
    public bool Has(string fileName) => File.Exists(Path.Combine(Directory, fileName));

    /// <summary>The event that ended the run, when the run got that far.</summary>
    public RunEvent? RunEnd => Events.LastOrDefault(e => e.Name == "run-end");

    private static UutDescription? LoadUut(string dir, RunManifest? manifest, List<string> notes)
    {
        if (manifest is null || string.IsNullOrEmpty(manifest.BenchFile))
        {
            return null;
        }

        var path = Path.IsPathRooted(manifest.BenchFile) ? manifest.BenchFile : Path.Combine(dir, manifest.BenchFile);
        if (!File.Exists(path))
        {
            path = Path.GetFullPath(manifest.BenchFile);
        }

        if (!File.Exists(path))
        {
            notes.Add($"The bench file {manifest.BenchFile} is not at hand: jack fuse ratings and categories are not shown.");
            return null;
        }

        if (RunManifest.HashFile(path) != manifest.BenchSha256)
        {
            notes.Add($"The bench file {manifest.BenchFile} has changed since the run (SHA-256 differs): jack fuse ratings and categories are not shown.");
            return null;
        }

        return BenchReader.Load(path).Uut;
    }
}

/// <summary>One line of a run's <c>events.jsonl</c>: when, what, and its other fields as text.</summary>
/// <param name="Time">The event's time, when recorded.</param>
/// <param name="ElapsedSeconds">Seconds since the start of the run.</param>
/// <param name="Name">The event's name, for example <c>run-start</c>.</param>
/// <param name="Fields">Every other field, formatted as invariant text.</param>
internal sealed record RunEvent(DateTimeOffset? Time, double ElapsedSeconds, string Name, IReadOnlyDictionary<string, string> Fields)
{
    /// <summary>The field called <paramref name="name"/>, or null.</summary>
    public string? Field(string name) => Fields.TryGetValue(name, out var v) ? v : null;

    /// <summary>Reads an event log; a missing file has no events, a line torn by an interrupted write is left out.</summary>
    /// <exception cref="InvalidDataException">When a complete line is not a JSON object (names the line).</exception>
    public static IReadOnlyList<RunEvent> ReadAll(string path)
    {
        if (!File.Exists(path))
        {
            return [];
        }

        var text = File.ReadAllText(path);
        var lines = text.Split('\n');
        var complete = lines.Length - 1; // the last piece is empty after a final line ending, or a torn write without one
        var events = new List<RunEvent>();
        for (var i = 0; i < complete; i++)
        {
            if (string.IsNullOrWhiteSpace(lines[i]))
            {
                continue;
            }

            try
            {
                using var doc = JsonDocument.Parse(lines[i]);
                events.Add(FromJson(doc.RootElement));
            }
            catch (JsonException e)
            {
                throw new InvalidDataException($"{path}:{i + 1}: not a JSON event line: {e.Message}", e);
            }
        }

        return events;
    }

    private static RunEvent FromJson(JsonElement e)
    {
        if (e.ValueKind != JsonValueKind.Object)
        {
            throw new JsonException("expected an object");
        }

        DateTimeOffset? time = null;
        var elapsed = double.NaN;
        var name = "?";
        var fields = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var p in e.EnumerateObject())
        {
            switch (p.Name)
            {
                case "time" when p.Value.ValueKind == JsonValueKind.String &&
                    DateTimeOffset.TryParse(p.Value.GetString(), CultureInfo.InvariantCulture, DateTimeStyles.RoundtripKind, out var t):
                    time = t;
                    break;
                case "elapsedS" when p.Value.ValueKind == JsonValueKind.Number:
                    elapsed = p.Value.GetDouble();
                    break;
                case "event" when p.Value.ValueKind == JsonValueKind.String:
                    name = p.Value.GetString() ?? "?";
                    break;
                default:
                    fields[p.Name] = p.Value.ValueKind == JsonValueKind.String ? p.Value.GetString() ?? string.Empty : p.Value.GetRawText();
                    break;
            }
        }

        return new RunEvent(time, elapsed, name, fields);
    }
}

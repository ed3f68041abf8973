using System.Security.Cryptography;
using System.Text.Json;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Reporting;

/// <summary>One file of a run directory with the SHA-256 of its bytes at approval.</summary>
/// <param name="Name">The file's name inside the run directory.</param>
/// <param name="Sha256">Its SHA-256, lower-case hex.</param>
public sealed record SealedFile(string Name, string Sha256);

/// <summary>A run's approval (<c>approval.json</c>): who approved the record and when, and the SHA-256 of every file it rests on, so that any
/// later change to them is detected.</summary>
/// <param name="Approver">The person who approved the record.</param>
/// <param name="Role">Their role or authorisation (for example "technical manager"), when given.</param>
/// <param name="Time">When they approved it (UTC).</param>
/// <param name="Files">The files sealed, with their hashes at approval; the report is sealed with the approval block in it.</param>
public sealed record Approval(string Approver, string? Role, DateTimeOffset Time, IReadOnlyList<SealedFile> Files)
{
    /// <summary>The approval's file name inside a run directory.</summary>
    public const string FileName = "approval.json";

    /// <summary>The files an approval seals, in order; a file the run did not write is left out (and its absence is then a change).</summary>
    public static IReadOnlyList<string> Sealed { get; } =
        [RunRecords.JournalFile, RunRecords.EventsFile, RunManifest.FileName, RunRecords.ResultFile, RunReport.FileName];

    private static readonly JsonSerializerOptions Options = new() { PropertyNamingPolicy = JsonNamingPolicy.CamelCase, WriteIndented = true };

    /// <summary>Approves the run in <paramref name="runDirectory"/>: writes the approval, renders the report with the approval block, then seals
    /// every file (the report included) and writes the approval with their hashes.</summary>
    /// <exception cref="FileNotFoundException">When the run has no <c>result.json</c> (nothing to approve).</exception>
    public static Approval Approve(string runDirectory, string approver, string? role, TimeProvider time)
    {
        ArgumentNullException.ThrowIfNull(runDirectory);
        ArgumentException.ThrowIfNullOrWhiteSpace(approver);
        ArgumentNullException.ThrowIfNull(time);
        var dir = Path.GetFullPath(runDirectory);
        var now = time.GetUtcNow();
        var unsealed = new Approval(approver, role, now, []);
        unsealed.Write(dir);
        RunReport.Write(dir, time);
        var approval = unsealed with { Files = Sealed.Where(f => File.Exists(Path.Combine(dir, f))).Select(f => new SealedFile(f, Hash(Path.Combine(dir, f)))).ToList() };
        approval.Write(dir);
        return approval;
    }

    /// <summary>The approval of the run in <paramref name="runDirectory"/>, or null when it was not approved.</summary>
    /// <exception cref="InvalidDataException">When <c>approval.json</c> is not an approval.</exception>
    public static Approval? Read(string runDirectory)
    {
        var path = Path.Combine(runDirectory, FileName);
        if (!File.Exists(path))
        {
            return null;
        }

        try
        {
            return JsonSerializer.Deserialize<Approval>(File.ReadAllText(path), Options) ?? throw new InvalidDataException($"{path}: empty approval.");
        }
        catch (JsonException e)
        {
            throw new InvalidDataException($"{path}: not an approval record ({e.Message}).", e);
        }
    }

    /// <summary>Every sealed file whose bytes changed or that is gone since approval, in words; empty when the record is as approved.</summary>
    public IReadOnlyList<string> Changes(string runDirectory)
    {
        var changes = new List<string>();
        if (Files.Count == 0)
        {
            changes.Add("the approval seals no file (it was interrupted before its hashes were written)");
        }

        foreach (var f in Files)
        {
            var path = Path.Combine(runDirectory, f.Name);
            if (!File.Exists(path))
            {
                changes.Add($"{f.Name} is missing");
            }
            else if (Hash(path) != f.Sha256)
            {
                changes.Add($"{f.Name} changed since approval (SHA-256 {f.Sha256[..16]}… then, {Hash(path)[..16]}… now)");
            }
        }

        foreach (var name in Sealed.Where(n => Files.All(f => f.Name != n) && File.Exists(Path.Combine(runDirectory, n)) && Files.Count > 0))
        {
            changes.Add($"{name} was added after approval");
        }

        return changes;
    }

    private void Write(string dir)
    {
        var path = Path.Combine(dir, FileName);
        File.WriteAllText(path + ".tmp", JsonSerializer.Serialize(this, Options) + "\n");
        File.Move(path + ".tmp", path, overwrite: true);
    }

    private static string Hash(string path) => Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(path)));
}

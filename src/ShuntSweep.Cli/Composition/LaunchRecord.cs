using System.Text.Json;

namespace ShuntSweep.Cli.Composition;

/// <summary>How a run was started beyond its sequence and bench (answers file, confirmation, archive target), kept in the run directory so that a resume continues the same way.</summary>
/// <param name="Answers">The full path of the answers file, or null.</param>
/// <param name="AssumeYes">Whether <c>--yes</c> confirmed turning the outputs on.</param>
/// <param name="Archive">The archive target given with <c>--archive</c>, or null for the default.</param>
internal sealed record LaunchRecord(string? Answers, bool AssumeYes, string? Archive)
{
    /// <summary>The file's name inside a run directory.</summary>
    public const string FileName = "launch.json";

    private static readonly JsonSerializerOptions Options = new() { PropertyNamingPolicy = JsonNamingPolicy.CamelCase, WriteIndented = true };

    /// <summary>Reads the record of <paramref name="directory"/>, or null when the run predates it.</summary>
    public static LaunchRecord? Read(string directory)
    {
        var path = Path.Combine(directory, FileName);
        if (!File.Exists(path))
        {
            return null;
        }

        try
        {
            return JsonSerializer.Deserialize<LaunchRecord>(File.ReadAllText(path), Options)
                ?? throw new InvalidDataException($"{path}: empty launch record.");
        }
        catch (JsonException ex)
        {
            throw new InvalidDataException($"{path}:{(ex.LineNumber ?? 0) + 1}:{(ex.BytePositionInLine ?? 0) + 1}: not a launch record ({ex.Message}).", ex);
        }
    }

    /// <summary>Writes the record into <paramref name="directory"/>.</summary>
    public void Write(string directory) => File.WriteAllText(Path.Combine(directory, FileName), JsonSerializer.Serialize(this, Options) + "\n");
}

using System.Security.Cryptography;
using System.Text.Json;

namespace ShuntSweep.Core.Records;

/// <summary>What a run was: the exact sequence and bench (by hash), the instruments that answered, the software, the start and the seed.</summary>
/// <remarks>Resume compares the hashes and refuses a changed sequence or bench.</remarks>
public sealed record RunManifest(
    string Software,
    string SequenceFile,
    string SequenceSha256,
    string BenchFile,
    string BenchSha256,
    string BenchName,
    string UutManufacturer,
    string UutModel,
    string UutSerial,
    string? UutAssetId,
    IReadOnlyDictionary<string, string> Instruments,
    DateTimeOffset Start,
    int Seed,
    bool Simulated)
{
    /// <summary>The fraction of a jack's fuse rating the sequence allowed (its fuseDerating limit), for plots that mark it; null in older manifests.</summary>
    public double? FuseDerating { get; init; }

    /// <summary>The manifest's file name inside a run directory.</summary>
    public const string FileName = "manifest.json";

    private static readonly JsonSerializerOptions Options = new() { PropertyNamingPolicy = JsonNamingPolicy.CamelCase, WriteIndented = true };

    /// <summary>The SHA-256 of a file's bytes, in lower-case hex.</summary>
    public static string HashFile(string path) => Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(path)));

    /// <summary>Writes the manifest into <paramref name="directory"/>.</summary>
    public void Write(string directory)
    {
        var path = Path.Combine(directory, FileName);
        File.WriteAllText(path + ".tmp", JsonSerializer.Serialize(this, Options));
        File.Move(path + ".tmp", path, overwrite: true);
    }

    /// <summary>Reads the manifest of the run in <paramref name="directory"/>.</summary>
    public static RunManifest Read(string directory) =>
        JsonSerializer.Deserialize<RunManifest>(File.ReadAllText(Path.Combine(directory, FileName)), Options)
        ?? throw new InvalidDataException($"{Path.Combine(directory, FileName)} is empty.");
}

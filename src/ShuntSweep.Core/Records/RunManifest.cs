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

    /// <summary>The procedure's identifier (the sequence's <c>id:</c> key), when given.</summary>
    public string? ProcedureId { get; init; }

    /// <summary>The procedure's version (the sequence's <c>version:</c> key), when given.</summary>
    public string? ProcedureVersion { get; init; }

    /// <summary>Each bench instrument's calibration certificate and due date as checked at the start of the run.</summary>
    public IReadOnlyList<Bench.CalibrationStatus>? Calibrations { get; init; }

    /// <summary>Why the run went ahead with an instrument past its calibration due date (given by the operator); null when none was overdue.</summary>
    public string? CalibrationOverride { get; init; }

    /// <summary>The context of the run that the calibration record states: operator, customer, conditions, as-found or as-left.</summary>
    public RunContext? Context { get; init; }

    /// <summary>The manifest's file name inside a run directory.</summary>
    public const string FileName = "manifest.json";

    private static readonly JsonSerializerOptions Options = new()
    {
        PropertyNamingPolicy = JsonNamingPolicy.CamelCase,
        WriteIndented = true,
        Converters = { new System.Text.Json.Serialization.JsonStringEnumConverter(JsonNamingPolicy.CamelCase) },
    };

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

/// <summary>Who ran a calibration, for whom, under which conditions, and whether it records the UUT as found or as left.</summary>
/// <param name="Operator">The person who ran it.</param>
/// <param name="Customer">The customer the UUT belongs to.</param>
/// <param name="Laboratory">The laboratory's name and address, as the certificate heads it.</param>
/// <param name="AmbientCelsius">The ambient temperature during the run, in °C.</param>
/// <param name="RelativeHumidityPercent">The relative humidity during the run, in %.</param>
/// <param name="Condition">Whether the run records the UUT as it arrived (<c>as-found</c>) or as it leaves after adjustment (<c>as-left</c>).</param>
public sealed record RunContext(string? Operator, string? Customer, string? Laboratory, double? AmbientCelsius, double? RelativeHumidityPercent, string? Condition);

using System.Text.Json;
using System.Text.Json.Serialization;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Analysis;

/// <summary>Writes and reads <c>result.json</c>: camelCase names, plain numbers, NaN and infinities as <c>null</c>.</summary>
public static class ResultJson
{
    /// <summary>The serializer options used for every result file.</summary>
    public static JsonSerializerOptions Options { get; } = CreateOptions();

    /// <summary>Writes <paramref name="result"/> to <paramref name="path"/>, creating the folder if needed.</summary>
    public static void Write(CharacterisationResult result, string path)
    {
        ArgumentNullException.ThrowIfNull(result);
        var dir = Path.GetDirectoryName(Path.GetFullPath(path));
        if (!string.IsNullOrEmpty(dir))
        {
            Directory.CreateDirectory(dir);
        }

        File.WriteAllText(path, Serialize(result));
    }

    /// <summary>The JSON text of <paramref name="result"/>.</summary>
    public static string Serialize(CharacterisationResult result) => JsonSerializer.Serialize(result, Options);

    /// <summary>Reads a result file; throws <see cref="InvalidDataException"/> naming the file, line and position on malformed JSON.</summary>
    public static CharacterisationResult Read(string path)
    {
        if (!File.Exists(path))
        {
            throw new FileNotFoundException($"No result file at '{path}'.", path);
        }

        return Deserialize(File.ReadAllText(path), path);
    }

    /// <summary>Parses result JSON; <paramref name="source"/> names the text in error messages.</summary>
    public static CharacterisationResult Deserialize(string json, string source = "result.json")
    {
        try
        {
            return JsonSerializer.Deserialize<CharacterisationResult>(json, Options)
                ?? throw new InvalidDataException($"{source}: the file holds no result (it is 'null').");
        }
        catch (JsonException e)
        {
            var where = e.LineNumber is { } line ? $"line {line + 1}, position {e.BytePositionInLine + 1}" : "unknown position";
            throw new InvalidDataException($"{source}: {where}: not a valid result file: {e.Message}", e);
        }
    }

    private static JsonSerializerOptions CreateOptions()
    {
        var o = new JsonSerializerOptions
        {
            PropertyNamingPolicy = JsonNamingPolicy.CamelCase,
            WriteIndented = true,
            RespectNullableAnnotations = true,
            RespectRequiredConstructorParameters = true,
        };
        o.Converters.Add(new FiniteDoubleConverter());
        o.Converters.Add(new JsonStringEnumConverter(JsonNamingPolicy.CamelCase));
        o.MakeReadOnly(populateMissingResolver: true);
        return o;
    }

    private sealed class FiniteDoubleConverter : JsonConverter<double>
    {
        public override bool HandleNull => true;

        public override double Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options) =>
            reader.TokenType == JsonTokenType.Null ? double.NaN : reader.GetDouble();

        public override void Write(Utf8JsonWriter writer, double value, JsonSerializerOptions options)
        {
            if (double.IsFinite(value))
            {
                writer.WriteNumberValue(value);
            }
            else
            {
                writer.WriteNullValue();
            }
        }
    }
}

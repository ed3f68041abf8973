using ShuntSweep.Core.Quantities;
using YamlDotNet.Core;
using YamlDotNet.RepresentationModel;

namespace ShuntSweep.Core.Documents;

/// <summary>Loads a YAML file into a strict reader whose every error names file, line and column.</summary>
public static class YamlDocument
{
    /// <summary>The largest file read; a sequence of the most points a plan may hold fits in a small fraction of it.</summary>
    /// <remarks>Checked before the file is parsed, so a runaway generated file is refused before it costs gigabytes.</remarks>
    public const long MaxFileBytes = 4 * 1024 * 1024;

    /// <summary>The deepest nesting of lists and mappings accepted.</summary>
    public const int MaxDepth = 64;

    /// <summary>Loads the file at <paramref name="path"/>; its top level must be a mapping.</summary>
    public static MappingReader Load(string path) => Parse(ReadText(path), path);

    /// <summary>Reads the text of a file, which must be UTF-8 (a byte-order mark is allowed) and at most <see cref="MaxFileBytes"/> long.</summary>
    /// <exception cref="DocumentException">The path is a directory, the file cannot be read, is too large, or is not UTF-8 (the position of the first bad byte is given).</exception>
    /// <exception cref="FileNotFoundException">There is no such file.</exception>
    public static string ReadText(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        if (Directory.Exists(path))
        {
            throw new DocumentException(path, 0, 0, "this is a directory; expected a YAML file.");
        }

        byte[] bytes;
        try
        {
            var length = new FileInfo(path).Length;
            if (length > MaxFileBytes)
            {
                throw new DocumentException(path, 0, 0, $"the file is {length / (1024.0 * 1024.0):0.#} MB; files larger than {MaxFileBytes / (1024 * 1024)} MB are refused (a plan has a bounded number of points: use 'linear' or 'log' series instead of long lists).");
            }

            bytes = File.ReadAllBytes(path);
        }
        catch (Exception ex) when (ex is UnauthorizedAccessException or IOException and not FileNotFoundException and not DirectoryNotFoundException)
        {
            throw new DocumentException(path, 0, 0, $"the file cannot be read: {ex.Message}");
        }

        return DecodeUtf8(bytes, path);
    }

    /// <summary>Refuses collections nested deeper than <see cref="MaxDepth"/>, before the recursive document model is built from them.</summary>
    /// <remarks>The event parser keeps its own stack, so this scan cannot overflow the call stack the way building a model of
    /// <c>[[[[…</c> a hundred thousand levels deep would.</remarks>
    private static void RefuseDeepNesting(string text, string fileName)
    {
        var parser = new Parser(new StringReader(text));
        var depth = 0;
        while (parser.MoveNext())
        {
            switch (parser.Current)
            {
                case YamlDotNet.Core.Events.SequenceStart or YamlDotNet.Core.Events.MappingStart when ++depth > MaxDepth:
                    throw new DocumentException(fileName, (int)parser.Current.Start.Line, (int)parser.Current.Start.Column, $"lists and mappings are nested more than {MaxDepth} levels deep here; no ShuntSweep file needs more than a few.");
                case YamlDotNet.Core.Events.SequenceEnd or YamlDotNet.Core.Events.MappingEnd:
                    depth--;
                    break;
            }
        }
    }

    /// <summary>Decodes <paramref name="bytes"/> as UTF-8 (without its byte-order mark), refusing any other encoding with the position of the first byte that is not UTF-8.</summary>
    public static string DecodeUtf8(ReadOnlySpan<byte> bytes, string fileName)
    {
        if (bytes.StartsWith((ReadOnlySpan<byte>)[0xFF, 0xFE]) || bytes.StartsWith((ReadOnlySpan<byte>)[0xFE, 0xFF]))
        {
            throw new DocumentException(fileName, 1, 1, "the file is UTF-16 (it starts with a UTF-16 byte-order mark); save it as UTF-8.");
        }

        if (bytes.StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF]))
        {
            bytes = bytes[3..];
        }

        var line = 1;
        var column = 1;
        var rest = bytes;
        while (!rest.IsEmpty)
        {
            if (System.Text.Rune.DecodeFromUtf8(rest, out var rune, out var consumed) != System.Buffers.OperationStatus.Done)
            {
                throw new DocumentException(fileName, line, column, $"byte 0x{rest[0]:X2} is not UTF-8; files must be UTF-8 (re-save it as UTF-8 in your editor).");
            }

            if (rune.Value == '\n')
            {
                line++;
                column = 1;
            }
            else
            {
                column++;
            }

            rest = rest[consumed..];
        }

        return System.Text.Encoding.UTF8.GetString(bytes);
    }

    /// <summary>Parses YAML text; <paramref name="fileName"/> is used in messages only.</summary>
    public static MappingReader Parse(string text, string fileName)
    {
        var stream = new YamlStream();
        try
        {
            RefuseDeepNesting(text, fileName);
            stream.Load(new StringReader(text));
        }
        catch (YamlException ex)
        {
            var problem = ex.InnerException?.Message ?? ex.Message;
            var cut = problem.IndexOf("):", StringComparison.Ordinal);
            if (problem.StartsWith("(Line", StringComparison.Ordinal) && cut > 0)
            {
                problem = problem[(cut + 2)..].Trim();
            }

            throw new DocumentException(fileName, (int)ex.Start.Line, (int)ex.Start.Column, $"not valid YAML: {problem}");
        }
        catch (Exception ex) when (ex is InvalidOperationException or ArgumentException)
        {
            // YamlDotNet throws these (without a position) on some malformed flow collections and anchors.
            throw new DocumentException(fileName, 0, 0, $"not valid YAML (an unclosed [ or {{ ?): {ex.Message}");
        }

        if (stream.Documents.Count == 0)
        {
            throw new DocumentException(fileName, 0, 0, "the file is empty; expected a mapping of keys.");
        }

        if (stream.Documents.Count > 1)
        {
            var second = stream.Documents[1].RootNode;
            throw new DocumentException(fileName, (int)second.Start.Line, (int)second.Start.Column, "a second YAML document starts here ('---'); a file holds exactly one document.");
        }

        var root = stream.Documents[0].RootNode;
        return root is YamlMappingNode map
            ? new MappingReader(fileName, map, "document")
            : throw new DocumentException(fileName, (int)root.Start.Line, (int)root.Start.Column, "expected a mapping of keys at the top of the file.");
    }
}

/// <summary>One YAML value with its position, read strictly.</summary>
public readonly struct NodeReader
{
    internal NodeReader(string file, YamlNode node, string what)
    {
        File = file;
        Node = node;
        What = what;
    }

    /// <summary>The file the node came from.</summary>
    public string File { get; }

    /// <summary>The underlying YAML node.</summary>
    public YamlNode Node { get; }

    /// <summary>A short description of the node for messages (its key path).</summary>
    public string What { get; }

    /// <summary>The 1-based line of the node.</summary>
    public int Line => (int)Node.Start.Line;

    /// <summary>The 1-based column of the node.</summary>
    public int Column => (int)Node.Start.Column;

    /// <summary>Builds an error positioned at this node.</summary>
    public DocumentException Error(string problem) => new(File, Line, Column, problem);

    /// <summary>The scalar text of the node.</summary>
    public string AsString() =>
        Node is YamlScalarNode { Value: { } v } ? v : throw Error($"{What}: expected a single value, found a {Kind(Node)}.");

    /// <summary>The node as a quantity in <paramref name="unit"/> (SI value).</summary>
    public double AsQuantity(SiUnit unit)
    {
        var text = AsString();
        try
        {
            return QuantityParser.Parse(text, unit);
        }
        catch (FormatException ex)
        {
            throw Error($"{What}: {ex.Message}");
        }
    }

    /// <summary>The node as a quantity in <paramref name="unit"/> (SI value) that must lie in <paramref name="allowed"/>.</summary>
    public double AsQuantity(SiUnit unit, Allowed allowed)
    {
        var value = AsQuantity(unit);
        return allowed.Contains(value) ? value : throw Error($"{What}: {AsString()} is out of range; expected {allowed.Text}.");
    }

    /// <summary>The node as a whole number within [<paramref name="min"/>, <paramref name="max"/>].</summary>
    public int AsInt(int min = int.MinValue, int max = int.MaxValue)
    {
        var text = AsString();
        if (!int.TryParse(text, System.Globalization.NumberStyles.Integer, System.Globalization.CultureInfo.InvariantCulture, out var v))
        {
            throw Error($"{What}: expected a whole number, found '{text}'.");
        }

        return v < min || v > max ? throw Error($"{What}: {v} is outside {min}…{max}.") : v;
    }

    /// <summary>The node as true/false (also yes/no, on/off).</summary>
    public bool AsBool() => AsString().ToLowerInvariant() switch
    {
        "true" or "yes" or "on" => true,
        "false" or "no" or "off" => false,
        var other => throw Error($"{What}: expected true or false, found '{other}'."),
    };

    /// <summary>The node as a mapping.</summary>
    public MappingReader AsMapping() =>
        Node is YamlMappingNode map ? new MappingReader(File, map, What) : throw Error($"{What}: expected a mapping of keys, found a {Kind(Node)}.");

    /// <summary>The node as a sequence of items.</summary>
    public IReadOnlyList<NodeReader> AsSequence()
    {
        if (Node is not YamlSequenceNode seq)
        {
            throw Error($"{What}: expected a list, found a {Kind(Node)}.");
        }

        var file = File;
        var what = What;
        return seq.Children.Select((c, i) => new NodeReader(file, c, $"{what}[{i}]")).ToList();
    }

    /// <summary>The number of items when the node is a list (0 otherwise), known without reading them.</summary>
    public int ItemCount => Node is YamlSequenceNode seq ? seq.Children.Count : 0;

    /// <summary>True when the node is a mapping.</summary>
    public bool IsMapping => Node is YamlMappingNode;

    /// <summary>True when the node is a sequence.</summary>
    public bool IsSequence => Node is YamlSequenceNode;

    internal static string Kind(YamlNode node) => node switch
    {
        YamlMappingNode => "mapping",
        YamlSequenceNode => "list",
        _ => "single value",
    };
}

/// <summary>A YAML mapping read strictly: required keys must be there, and <see cref="Finish"/> rejects any key nobody asked for.</summary>
public sealed class MappingReader
{
    private readonly YamlMappingNode _map;
    private readonly HashSet<string> _known = new(StringComparer.Ordinal);

    internal MappingReader(string file, YamlMappingNode map, string what)
    {
        File = file;
        _map = map;
        What = what;
    }

    /// <summary>The file the mapping came from.</summary>
    public string File { get; }

    /// <summary>The key path of this mapping, for messages.</summary>
    public string What { get; }

    /// <summary>The 1-based line of the mapping.</summary>
    public int Line => (int)_map.Start.Line;

    /// <summary>The 1-based column of the mapping.</summary>
    public int Column => (int)_map.Start.Column;

    /// <summary>Builds an error positioned at the start of this mapping.</summary>
    public DocumentException Error(string problem) => new(File, Line, Column, problem);

    /// <summary>The value under <paramref name="key"/>, or null when absent.</summary>
    public NodeReader? Optional(string key)
    {
        _known.Add(key);
        foreach (var (k, v) in _map.Children)
        {
            if (k is YamlScalarNode { Value: { } name } && name == key)
            {
                return new NodeReader(File, v, What == "document" ? key : $"{What}.{key}");
            }
        }

        return null;
    }

    /// <summary>The value under <paramref name="key"/>; an error naming the key when absent.</summary>
    public NodeReader Required(string key)
    {
        if (Optional(key) is { } found)
        {
            return found;
        }

        foreach (var (k, _) in _map.Children)
        {
            if (k is YamlScalarNode { Value: { } name } && !_known.Contains(name) && EditDistance(name.ToLowerInvariant(), key.ToLowerInvariant()) <= Math.Max(2, key.Length / 3))
            {
                throw new NodeReader(File, k, What).Error($"{What}: unknown key '{name}' (did you mean '{key}'?); the key '{key}' is required here.");
            }
        }

        throw Error($"{What}: the key '{key}' is required here.");
    }

    /// <summary>A required string.</summary>
    public string Text(string key) => Required(key).AsString();

    /// <summary>An optional string.</summary>
    public string? StringOr(string key, string? fallback) => Optional(key)?.AsString() ?? fallback;

    /// <summary>A required quantity in <paramref name="unit"/>.</summary>
    public double Quantity(string key, SiUnit unit) => Required(key).AsQuantity(unit);

    /// <summary>An optional quantity in <paramref name="unit"/>.</summary>
    public double QuantityOr(string key, SiUnit unit, double fallback) => Optional(key)?.AsQuantity(unit) ?? fallback;

    /// <summary>A required quantity in <paramref name="unit"/> that must lie in <paramref name="allowed"/>.</summary>
    public double Quantity(string key, SiUnit unit, Allowed allowed) => Required(key).AsQuantity(unit, allowed);

    /// <summary>An optional quantity in <paramref name="unit"/> that must lie in <paramref name="allowed"/> when given.</summary>
    public double QuantityOr(string key, SiUnit unit, double fallback, Allowed allowed) => Optional(key)?.AsQuantity(unit, allowed) ?? fallback;

    /// <summary>An optional quantity in <paramref name="unit"/> that must lie in <paramref name="allowed"/> when given; null when absent.</summary>
    public double? QuantityOrNull(string key, SiUnit unit, Allowed allowed) => Optional(key)?.AsQuantity(unit, allowed);

    /// <summary>An optional quantity in <paramref name="unit"/>, null when absent.</summary>
    public double? QuantityOrNull(string key, SiUnit unit) => Optional(key)?.AsQuantity(unit);

    /// <summary>An optional whole number.</summary>
    public int IntOr(string key, int fallback, int min = int.MinValue, int max = int.MaxValue) =>
        Optional(key)?.AsInt(min, max) ?? fallback;

    /// <summary>An optional boolean.</summary>
    public bool BoolOr(string key, bool fallback) => Optional(key)?.AsBool() ?? fallback;

    /// <summary>An optional nested mapping.</summary>
    public MappingReader? Mapping(string key) => Optional(key)?.AsMapping();

    /// <summary>An optional list (empty when absent).</summary>
    public IReadOnlyList<NodeReader> List(string key) => Optional(key)?.AsSequence() ?? [];

    /// <summary>One of the allowed words, case-insensitive, returned in the spelling of <paramref name="allowed"/>.</summary>
    public string Choice(string key, string fallback, params string[] allowed)
    {
        var node = Optional(key);
        if (node is null)
        {
            return fallback;
        }

        var text = node.Value.AsString();
        foreach (var a in allowed)
        {
            if (string.Equals(a, text, StringComparison.OrdinalIgnoreCase))
            {
                return a;
            }
        }

        throw node.Value.Error($"{node.Value.What}: '{text}' is not one of {string.Join(", ", allowed)}{Suggest(text, allowed)}.");
    }

    /// <summary>The entries of the mapping as key/value pairs, all marked known.</summary>
    public IEnumerable<(string Key, NodeReader Value)> Entries()
    {
        foreach (var (k, v) in _map.Children)
        {
            var key = k is YamlScalarNode { Value: { } name } ? name : throw new NodeReader(File, k, What).Error($"{What}: keys must be single words.");
            _known.Add(key);
            yield return (key, new NodeReader(File, v, What == "document" ? key : $"{What}.{key}"));
        }
    }

    /// <summary>Rejects every key that no caller asked for, suggesting the nearest known key.</summary>
    public void Finish()
    {
        foreach (var (k, _) in _map.Children)
        {
            if (k is YamlScalarNode { Value: { } name } && !_known.Contains(name))
            {
                throw new NodeReader(File, k, What).Error(
                    $"{What}: unknown key '{name}'{Suggest(name, _known)}; expected one of {string.Join(", ", _known.Order(StringComparer.Ordinal))}.");
            }
        }
    }

    private static string Suggest(string text, IEnumerable<string> candidates)
    {
        var best = candidates
            .Select(c => (c, d: EditDistance(text.ToLowerInvariant(), c.ToLowerInvariant())))
            .Where(x => x.d <= Math.Max(2, x.c.Length / 3))
            .OrderBy(x => x.d)
            .Select(x => x.c)
            .FirstOrDefault();
        return best is null ? string.Empty : $" (did you mean '{best}'?)";
    }

    internal static int EditDistance(string a, string b)
    {
        var previous = new int[b.Length + 1];
        var current = new int[b.Length + 1];
        for (var j = 0; j <= b.Length; j++)
        {
            previous[j] = j;
        }

        for (var i = 1; i <= a.Length; i++)
        {
            current[0] = i;
            for (var j = 1; j <= b.Length; j++)
            {
                var cost = a[i - 1] == b[j - 1] ? 0 : 1;
                current[j] = Math.Min(Math.Min(current[j - 1] + 1, previous[j] + 1), previous[j - 1] + cost);
            }

            (previous, current) = (current, previous);
        }

        return previous[b.Length];
    }
}

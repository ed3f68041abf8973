using ShuntSweep.Core.Documents;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>The commands one kind of instrument understands, by driver operation; loaded from a profile file so a new instrument needs data, not code.</summary>
/// <remarks>A profile file names only what differs from the built-in SCPI-99 profile; every operation it leaves out keeps the SCPI-99 command.</remarks>
public sealed class InstrumentProfile
{
    /// <summary>The name of the built-in profile of standard SCPI-99 commands.</summary>
    public const string DefaultName = "scpi-99";

    private static readonly Dictionary<string, string[]> Operations = new(StringComparer.Ordinal)
    {
        ["common"] = ["identify", "clearStatus", "nextError", "operationComplete", "afterResync"],
        ["supply"] = ["setVoltage", "queryVoltage", "setCurrentLimit", "queryCurrentLimit", "setOverVoltage", "queryOverVoltage", "setOutput", "queryOutput", "measureVoltage", "measureCurrent"],
        ["load"] = ["setMode", "setCurrent", "queryCurrent", "setInput", "queryInput", "measureVoltage", "measureCurrent", "queryRegulation", "regulationLostMask"],
        ["voltmeter"] = ["configure", "setNplc", "setAutoZero", "setSamples", "setTrigger", "arm", "fetch"],
        ["uut"] = ["selectRange", "setNplc", "arm", "fetch"],
        ["reference"] = ["configure", "setNplc", "arm", "fetch"],
    };

    private static readonly Lazy<InstrumentProfile> Builtin = new(() =>
    {
        using var stream = typeof(InstrumentProfile).Assembly.GetManifestResourceStream($"ShuntSweep.Instruments.Profiles.{DefaultName}.yaml")
            ?? throw new InvalidOperationException("the built-in SCPI-99 profile is missing from the assembly.");
        using var reader = new StreamReader(stream);
        return Parse(reader.ReadToEnd(), $"(built-in) {DefaultName}.yaml", null);
    });

    private readonly Dictionary<string, string[]> _commands;

    private InstrumentProfile(string name, string source, Dictionary<string, string[]> commands, string on, string off, string auto)
    {
        Name = name;
        Source = source;
        _commands = commands;
        OnWord = on;
        OffWord = off;
        AutoWord = auto;
    }

    /// <summary>The built-in profile of standard SCPI-99 commands.</summary>
    public static InstrumentProfile Default => Builtin.Value;

    /// <summary>The profile's name.</summary>
    public string Name { get; }

    /// <summary>Where the profile came from (a file path or the built-in resource).</summary>
    public string Source { get; }

    /// <summary>The word sent for true.</summary>
    public string OnWord { get; }

    /// <summary>The word sent for false.</summary>
    public string OffWord { get; }

    /// <summary>The word sent for "choose automatically" (autorange).</summary>
    public string AutoWord { get; }

    /// <summary>Loads the built-in profile called <paramref name="nameOrPath"/> or the profile file at that path (relative to <paramref name="baseDirectory"/>).</summary>
    public static InstrumentProfile Load(string nameOrPath, string? baseDirectory)
    {
        ArgumentException.ThrowIfNullOrEmpty(nameOrPath);
        if (string.Equals(nameOrPath, DefaultName, StringComparison.OrdinalIgnoreCase))
        {
            return Default;
        }

        var path = Path.IsPathRooted(nameOrPath) ? nameOrPath : Path.Combine(baseDirectory ?? ".", nameOrPath);
        if (!File.Exists(path))
        {
            throw new FileNotFoundException($"the instrument profile '{nameOrPath}' is neither the built-in '{DefaultName}' nor an existing file (looked for {Path.GetFullPath(path)}).", path);
        }

        return Parse(File.ReadAllText(path), path, Default);
    }

    /// <summary>Parses profile text; operations it leaves out come from <paramref name="fallback"/> (null only for the built-in profile, which must be complete).</summary>
    public static InstrumentProfile Parse(string text, string fileName, InstrumentProfile? fallback)
    {
        var doc = YamlDocument.Parse(text, fileName);
        var name = doc.Text("profile");
        doc.Optional("description");
        var words = doc.Mapping("words");
        var on = words?.StringOr("on", null) ?? fallback?.OnWord ?? "ON";
        var off = words?.StringOr("off", null) ?? fallback?.OffWord ?? "OFF";
        var auto = words?.StringOr("auto", null) ?? fallback?.AutoWord ?? "AUTO";
        words?.Finish();

        var commands = new Dictionary<string, string[]>(StringComparer.Ordinal);
        foreach (var (section, ops) in Operations)
        {
            var map = doc.Mapping(section);
            foreach (var op in ops)
            {
                var key = $"{section}.{op}";
                var node = map?.Optional(op);
                if (node is { } n)
                {
                    var templates = n.IsSequence ? n.AsSequence().Select(x => x.AsString()).ToArray() : [n.AsString()];
                    foreach (var t in templates)
                    {
                        CheckTemplate(t, n, key);
                    }

                    if (key == "load.regulationLostMask" && templates is not [""] && (templates.Length != 1 || !int.TryParse(templates[0], System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out _)))
                    {
                        throw n.Error($"{key}: expected the bit value as a whole number, for example \"2\" for bit 1.");
                    }

                    commands[key] = templates.Where(t => t.Length > 0).ToArray();
                }
                else if (fallback is not null)
                {
                    commands[key] = fallback._commands[key];
                }
                else
                {
                    throw (map?.Error($"{section}: the operation '{op}' is missing; a complete profile names every operation.")
                        ?? doc.Error($"the section '{section}' is missing; a complete profile names every operation."));
                }
            }

            map?.Finish();
        }

        doc.Finish();
        return new InstrumentProfile(name, fileName, commands, on, off, auto);
    }

    /// <summary>True when the profile has a command for <paramref name="operation"/> (for example <c>supply.queryVoltage</c>).</summary>
    public bool Supports(string operation) => Lookup(operation).Length > 0;

    /// <summary>The commands for <paramref name="operation"/> with no value.</summary>
    public IReadOnlyList<string> Commands(string operation) => Lookup(operation);

    /// <summary>The commands for <paramref name="operation"/> with <c>{value}</c> replaced by a number.</summary>
    public IReadOnlyList<string> Commands(string operation, double value) => Render(operation, ScpiResponse.FormatNumber(value));

    /// <summary>The commands for <paramref name="operation"/> with <c>{value}</c> replaced by the on or off word.</summary>
    public IReadOnlyList<string> Commands(string operation, bool value) => Render(operation, value ? OnWord : OffWord);

    /// <summary>The commands for <paramref name="operation"/> with <c>{value}</c> replaced by a number, or the auto word when null.</summary>
    public IReadOnlyList<string> CommandsOrAuto(string operation, double? value) =>
        Render(operation, value is { } v ? ScpiResponse.FormatNumber(v) : AutoWord);

    /// <summary>The single query for <paramref name="operation"/>; throws when the profile has none.</summary>
    public string Query(string operation)
    {
        var q = Lookup(operation);
        return q.Length == 1
            ? q[0]
            : throw new NotSupportedException($"the profile '{Name}' ({Source}) has {(q.Length == 0 ? "no" : "more than one")} command for '{operation}'; a query needs exactly one.");
    }

    private string[] Lookup(string operation) =>
        _commands.TryGetValue(operation, out var c) ? c : throw new ArgumentOutOfRangeException(nameof(operation), operation, "not a profile operation.");

    private string[] Render(string operation, string value)
    {
        var templates = Lookup(operation);
        if (templates.Length == 0)
        {
            throw new NotSupportedException($"the profile '{Name}' ({Source}) has no command for '{operation}'.");
        }

        var result = new string[templates.Length];
        for (var i = 0; i < templates.Length; i++)
        {
            result[i] = templates[i].Replace("{value}", value, StringComparison.Ordinal);
        }

        return result;
    }

    private static void CheckTemplate(string template, NodeReader node, string key)
    {
        var rest = template.Replace("{value}", string.Empty, StringComparison.Ordinal);
        if (rest.Contains('{', StringComparison.Ordinal) || rest.Contains('}', StringComparison.Ordinal))
        {
            throw node.Error($"{key}: '{template}' has a placeholder other than {{value}}.");
        }

        if (!System.Text.Ascii.IsValid(template) || template.AsSpan().IndexOfAny('\n', '\r') >= 0)
        {
            throw node.Error($"{key}: '{template}' must be one line of ASCII.");
        }
    }
}

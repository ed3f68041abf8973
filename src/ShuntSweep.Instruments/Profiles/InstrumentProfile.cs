using System.Globalization;
using System.Text.RegularExpressions;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>The commands one kind of instrument understands, by driver operation, and how its answers are read; loaded from a profile file so a
/// new instrument needs data, not code.</summary>
/// <remarks>A profile file names only what differs from the built-in SCPI-99 profile; every operation it leaves out keeps the SCPI-99 command.
/// Version 1 files map operations to command strings; version 2 (<c>version: 2</c>) adds answer patterns, number formats, units,
/// conversions, range codes, processing times, error modes, free-form identities and over-range words.</remarks>
public sealed class InstrumentProfile
{
    /// <summary>The name of the built-in profile of standard SCPI-99 commands.</summary>
    public const string DefaultName = "scpi-99";

    /// <summary>Every operation by section, and the SI unit symbol of the quantity it carries ("" for none).</summary>
    internal static readonly Dictionary<string, (string Op, string Unit)[]> Sections = new(StringComparer.Ordinal)
    {
        ["common"] = [("identify", ""), ("clearStatus", ""), ("nextError", ""), ("operationComplete", ""), ("afterResync", "")],
        ["supply"] =
        [
            ("setVoltage", "V"), ("queryVoltage", "V"), ("setCurrentLimit", "A"), ("queryCurrentLimit", "A"), ("setOverVoltage", "V"),
            ("queryOverVoltage", "V"), ("setOutput", ""), ("queryOutput", ""), ("measureVoltage", "V"), ("measureCurrent", "A"),
        ],
        ["load"] =
        [
            ("setMode", ""), ("setCurrent", "A"), ("queryCurrent", "A"), ("setInput", ""), ("queryInput", ""), ("measureVoltage", "V"),
            ("measureCurrent", "A"), ("queryRegulation", ""), ("regulationLostMask", ""),
        ],
        ["voltmeter"] = [("configure", "V"), ("setNplc", ""), ("setAutoZero", ""), ("setSamples", ""), ("setTrigger", ""), ("arm", ""), ("fetch", "V")],
        ["uut"] = [("selectRange", "A"), ("setNplc", ""), ("arm", ""), ("fetch", "A")],
        ["reference"] = [("configure", "A"), ("setNplc", ""), ("arm", ""), ("fetch", "A")],
    };

    private static readonly string[] Placeholders = ["{value}", "{code}", "{name}"];

    private static readonly Lazy<InstrumentProfile> Builtin = new(() =>
    {
        using var stream = typeof(InstrumentProfile).Assembly.GetManifestResourceStream($"ShuntSweep.Instruments.Profiles.{DefaultName}.yaml")
            ?? throw new InvalidOperationException("the built-in SCPI-99 profile is missing from the assembly.");
        using var reader = new StreamReader(stream);
        return Parse(reader.ReadToEnd(), $"(built-in) {DefaultName}.yaml", null);
    });

    private readonly Dictionary<string, ProfileOperation> _operations;
    private readonly Dictionary<string, RoleWords> _words;

    private InstrumentProfile(ProfileHeader header, Dictionary<string, ProfileOperation> operations, Dictionary<string, RoleWords> words)
    {
        Name = header.Name;
        Source = header.Source;
        Version = header.Version;
        OnWord = header.On;
        OffWord = header.Off;
        AutoWord = header.Auto;
        Errors = header.Errors;
        InterCommandDelay = header.Gap;
        _operations = operations;
        _words = words;
        Pacing = new CommandPacing(
            InterCommandDelay,
            operations.Values
                .Where(o => o.ProcessingTime > TimeSpan.Zero)
                .SelectMany(o => o.Templates.Select(t => (Header(t), Open: t.Length > Header(t).Length && t[Header(t).Length] == '{', o.ProcessingTime)))
                .Where(h => h.Item1.Length > 0)
                .ToList());
    }

    /// <summary>The built-in profile of standard SCPI-99 commands.</summary>
    public static InstrumentProfile Default => Builtin.Value;

    /// <summary>The profile's name.</summary>
    public string Name { get; }

    /// <summary>Where the profile came from (a file path or the built-in resource).</summary>
    public string Source { get; }

    /// <summary>The format version of the file the profile was read from (1 or 2).</summary>
    public int Version { get; }

    /// <summary>The word sent for true.</summary>
    public string OnWord { get; }

    /// <summary>The word sent for false.</summary>
    public string OffWord { get; }

    /// <summary>The word sent for "choose automatically" (autorange).</summary>
    public string AutoWord { get; }

    /// <summary>How the instrument reports rejected commands.</summary>
    public ErrorReporting Errors { get; }

    /// <summary>The least time between two commands.</summary>
    public TimeSpan InterCommandDelay { get; }

    /// <summary>The waits the session keeps between commands (the gap and each command's processing time).</summary>
    public CommandPacing Pacing { get; }

    /// <summary>Every operation, by key (<c>supply.setVoltage</c>).</summary>
    public IReadOnlyDictionary<string, ProfileOperation> Operations => _operations;

    /// <summary>True when the instrument answers an identity query.</summary>
    public bool HasIdentity => Supports("common.identify");

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
        var version = doc.Optional("version") is { } v ? v.AsInt(1, 2) : 1;
        doc.Optional("description");
        var words = doc.Mapping("words");
        var on = words?.StringOr("on", null) ?? fallback?.OnWord ?? "ON";
        var off = words?.StringOr("off", null) ?? fallback?.OffWord ?? "OFF";
        var auto = words?.StringOr("auto", null) ?? fallback?.AutoWord ?? "AUTO";
        words?.Finish();

        var errors = fallback?.Errors ?? ErrorReporting.Scpi;
        var gap = TimeSpan.Zero;
        if (version == 2)
        {
            errors = ReadErrors(doc.Mapping("errors")) ?? errors;
            gap = TimeSpan.FromSeconds(NonNegative(doc, "interCommandDelay"));
        }
        else
        {
            RequireVersion2(doc, "errors", "interCommandDelay");
        }

        var operations = new Dictionary<string, ProfileOperation>(StringComparer.Ordinal);
        var roleWords = new Dictionary<string, RoleWords>(StringComparer.Ordinal);
        foreach (var (section, ops) in Sections)
        {
            var map = doc.Mapping(section);
            roleWords[section] = version == 2 && map is not null
                ? new RoleWords(WordList(map, "overRange"), WordList(map, "noData"))
                : (map is not null ? RequireVersion2(map, "overRange", "noData") : null) ?? fallback?._words[section] ?? RoleWords.None;
            foreach (var (op, unit) in ops)
            {
                var key = $"{section}.{op}";
                if (map?.Optional(op) is { } n)
                {
                    if (version == 2 && key == "common.nextError")
                    {
                        throw n.Error($"{key}: a version 2 profile says how errors are read in the section 'errors' (mode, query, mask).");
                    }

                    operations[key] = ReadOperation(n, key, unit, version);
                    if (version == 1 && key == "common.nextError")
                    {
                        errors = operations[key].Templates is [var q] ? ErrorReporting.Scpi with { Query = q } : ErrorReporting.Nothing;
                    }
                }
                else if (fallback is not null)
                {
                    operations[key] = fallback._operations[key];
                }
                else
                {
                    throw map?.Error($"{section}: the operation '{op}' is missing; a complete profile names every operation.")
                        ?? doc.Error($"the section '{section}' is missing; a complete profile names every operation.");
                }
            }

            map?.Finish();
        }

        doc.Finish();
        return new InstrumentProfile(new ProfileHeader(name, fileName, version, on, off, auto, errors, gap), operations, roleWords);
    }

    /// <summary>True when the profile has a command for <paramref name="operation"/> (for example <c>supply.queryVoltage</c>).</summary>
    public bool Supports(string operation) => Operation(operation).IsSupported;

    /// <summary>The operation called <paramref name="operation"/>.</summary>
    public ProfileOperation Operation(string operation) =>
        _operations.TryGetValue(operation, out var o) ? o : throw new ArgumentOutOfRangeException(nameof(operation), operation, "not a profile operation.");

    /// <summary>The over-range and no-data words of a section's instrument.</summary>
    public RoleWords Words(string section) => _words.TryGetValue(section, out var w) ? w : RoleWords.None;

    /// <summary>The commands for <paramref name="operation"/> with no value.</summary>
    public IReadOnlyList<string> Commands(string operation) => Operation(operation).Templates;

    /// <summary>The commands for <paramref name="operation"/> with <c>{value}</c> replaced by a number, converted and scaled as the profile says.</summary>
    /// <param name="operation">The operation.</param>
    /// <param name="value">The value in SI units (or NPLC).</param>
    /// <param name="lineFrequency">The mains frequency, for an NPLC the instrument takes in seconds.</param>
    public IReadOnlyList<string> Commands(string operation, double value, double lineFrequency = 50)
    {
        var op = Supported(operation);
        return op.Render(op.FormatValue(value, lineFrequency), null, null);
    }

    /// <summary>The commands for <paramref name="operation"/> with <c>{value}</c> replaced by the on or off word.</summary>
    public IReadOnlyList<string> Commands(string operation, bool value)
    {
        var op = Supported(operation);
        return op.Render(value ? op.Words.On ?? OnWord : op.Words.Off ?? OffWord, null, null);
    }

    /// <summary>The commands for <paramref name="operation"/> with <c>{value}</c> replaced by a number, or the auto word when null.</summary>
    public IReadOnlyList<string> CommandsOrAuto(string operation, double? value)
    {
        var op = Supported(operation);
        return op.Render(value is { } v ? op.FormatValue(v, 50) : op.Words.Auto ?? AutoWord, null, null);
    }

    /// <summary>The commands that select a range: <c>{value}</c> is its full scale, <c>{code}</c> its code from the table, <c>{name}</c> its name.</summary>
    /// <exception cref="NotSupportedException">The table has no code for the range.</exception>
    public IReadOnlyList<string> CommandsForRange(string operation, string name, double fullScale)
    {
        ArgumentNullException.ThrowIfNull(name);
        var op = Supported(operation);
        string? code = null;
        if (op.Uses("code") && !op.Codes.TryGetValue(name, out code))
        {
            throw new NotSupportedException($"the profile '{Name}' ({Source}) has no code for the range '{name}' in '{operation}'; its codes are for {string.Join(", ", op.Codes.Keys)}.");
        }

        return op.Render(op.FormatValue(fullScale, 50), code, name);
    }

    /// <summary>The single query for <paramref name="operation"/>; throws when the profile has none.</summary>
    public string Query(string operation)
    {
        var q = Commands(operation);
        return q.Count == 1
            ? q[0]
            : throw new NotSupportedException($"the profile '{Name}' ({Source}) has {(q.Count == 0 ? "no" : "more than one")} command for '{operation}'; a query needs exactly one.");
    }

    /// <summary>Reads the answer to <paramref name="operation"/> as one value in SI units (over-range → ±∞, no data → NaN).</summary>
    /// <exception cref="FormatException">The answer does not read as the profile says.</exception>
    public double ParseNumber(string operation, string answer) => Operation(operation).Answer.ParseOne(answer, Words(Section(operation)));

    /// <summary>Reads the answer to <paramref name="operation"/> as one or more values in SI units.</summary>
    public double[] ParseNumbers(string operation, string answer) => Operation(operation).Answer.ParseAll(answer, Words(Section(operation)));

    /// <summary>Reads a boolean answer: the operation's or the profile's on/off words, or 0/1 and ON/OFF (SCPI-99 Vol. 1 §7.3).</summary>
    public bool ParseBoolean(string operation, string answer)
    {
        ArgumentNullException.ThrowIfNull(answer);
        var op = Operation(operation);
        var t = op.Answer.Pattern is { } p && p.Match(answer) is { Success: true } m && m.Groups["value"].Success ? m.Groups["value"].Value.Trim() : answer.Trim();
        if (string.Equals(t, op.Words.On ?? OnWord, StringComparison.OrdinalIgnoreCase))
        {
            return true;
        }

        return !string.Equals(t, op.Words.Off ?? OffWord, StringComparison.OrdinalIgnoreCase) && ScpiResponse.ParseBoolean(t);
    }

    /// <summary>Reads a whole-number answer (a status word).</summary>
    public int ParseInteger(string operation, string answer)
    {
        var value = ParseNumber(operation, answer);
        return double.IsFinite(value) && value == Math.Round(value) && Math.Abs(value) <= int.MaxValue
            ? (int)value
            : throw new FormatException($"'{ScpiResponse.Shorten(answer.Trim())}' is not a whole number.");
    }

    /// <summary>Reads the identity answer: with a pattern, its groups maker, model, serial and firmware (each optional); without, IEEE 488.2's four fields.</summary>
    public InstrumentIdentity ParseIdentity(string answer)
    {
        ArgumentNullException.ThrowIfNull(answer);
        var pattern = Operation("common.identify").Answer.Pattern;
        if (pattern is null)
        {
            return ScpiResponse.ParseIdentity(answer);
        }

        var m = pattern.Match(answer.Trim());
        if (!m.Success)
        {
            throw new FormatException($"'{ScpiResponse.Shorten(answer.Trim())}' does not match the identity pattern '{pattern}'.");
        }

        string Group(string g) => m.Groups[g] is { Success: true } x ? x.Value.Trim() : "-";
        return new InstrumentIdentity(Group("maker"), Group("model"), Group("serial"), Group("firmware"));
    }

    /// <summary>The identity recorded for an instrument that has no identity query: the profile's name stands for the model.</summary>
    public InstrumentIdentity UnknownIdentity() => new("(no identity query)", Name, "-", "-");

    /// <summary>The section an operation key belongs to (<c>supply</c> of <c>supply.setVoltage</c>).</summary>
    public static string Section(string operation)
    {
        ArgumentNullException.ThrowIfNull(operation);
        var dot = operation.IndexOf('.', StringComparison.Ordinal);
        return dot < 0 ? operation : operation[..dot];
    }

    /// <summary>The header of a command template: the text before its first space or placeholder.</summary>
    internal static string Header(string template)
    {
        var end = template.IndexOfAny([' ', '{']);
        return (end < 0 ? template : template[..end]).Trim();
    }

    private ProfileOperation Supported(string operation)
    {
        var op = Operation(operation);
        return op.IsSupported ? op : throw new NotSupportedException($"the profile '{Name}' ({Source}) has no command for '{operation}'.");
    }

    private static ProfileOperation ReadOperation(NodeReader node, string key, string unit, int version)
    {
        var position = new ProfilePosition(node.File, node.Line, node.Column);
        if (!node.IsMapping)
        {
            var plain = Templates(node, key);
            CheckMask(node, key, plain);
            return new ProfileOperation(key, plain, NumberFormat.Shortest, 1, false, new Dictionary<string, string>(), TimeSpan.Zero, AnswerFormat.Standard, (null, null, null), position);
        }

        if (version < 2)
        {
            throw node.Error($"{key}: an operation written as a mapping (send, answer, number, …) needs 'version: 2' at the top of the profile.");
        }

        var map = node.AsMapping();
        var templates = Templates(map.Required("send"), key);
        CheckMask(map.Required("send"), key, templates);
        var number = Format(map.Optional("number"));
        var toSeconds = false;
        if (map.Optional("convert") is { } c)
        {
            toSeconds = c.AsString() switch
            {
                "nplcToSeconds" when key.EndsWith(".setNplc", StringComparison.Ordinal) => true,
                "nplcToSeconds" => throw c.Error($"{key}: 'nplcToSeconds' converts an integration time; only setNplc operations carry one."),
                var other => throw c.Error($"{key}.convert: '{other}' is not a conversion; expected nplcToSeconds."),
            };
        }

        var symbol = toSeconds ? "s" : unit;
        var factor = 1.0;
        if (map.Optional("unit") is { } u)
        {
            try
            {
                factor = AnswerFormat.PrefixFactor(u.AsString(), symbol);
            }
            catch (FormatException ex)
            {
                throw u.Error($"{key}.unit: {ex.Message}");
            }
        }

        var codes = new Dictionary<string, string>(StringComparer.Ordinal);
        if (map.Mapping("codes") is { } table)
        {
            foreach (var (range, code) in table.Entries())
            {
                codes[range] = code.AsString();
            }
        }

        if (templates.Any(t => t.Contains("{code}", StringComparison.Ordinal)) && codes.Count == 0)
        {
            throw map.Error($"{key}: '{{code}}' needs a 'codes' table from range name to code, for example codes: {{ 600uA: \"1\", 6mA: \"2\" }}.");
        }

        var processing = TimeSpan.FromSeconds(NonNegative(map, "processingTime"));
        var answer = ReadAnswer(map.Mapping("answer"), key, symbol, factor);
        var w = map.Mapping("words");
        var words = (w?.StringOr("on", null), w?.StringOr("off", null), w?.StringOr("auto", null));
        w?.Finish();
        map.Finish();
        return new ProfileOperation(key, templates, number, factor, toSeconds, codes, processing, answer, words, position);
    }

    private static AnswerFormat ReadAnswer(MappingReader? map, string key, string symbol, double factor)
    {
        if (map is null)
        {
            return factor == 1 ? AnswerFormat.Standard : new AnswerFormat(null, symbol, factor, null, NumberFormat.Shortest, ",");
        }

        Regex? pattern = null;
        if (map.Optional("pattern") is { } p)
        {
            try
            {
                pattern = new Regex(p.AsString(), RegexOptions.CultureInvariant, TimeSpan.FromMilliseconds(100));
            }
            catch (ArgumentException ex)
            {
                throw p.Error($"{key}.answer.pattern: not a valid regular expression: {ex.Message}");
            }

            var groups = pattern.GetGroupNames();
            if (key == "common.identify")
            {
                if (!groups.Any(g => g is "maker" or "model" or "serial" or "firmware"))
                {
                    throw p.Error($"{key}.answer.pattern: an identity pattern needs at least one of the groups maker, model, serial, firmware, for example '(?<model>\\S+) SN(?<serial>\\d+)'.");
                }
            }
            else if (!groups.Contains("value"))
            {
                throw p.Error($"{key}.answer.pattern: the pattern needs a group named 'value', for example '(?<value>[-+0-9.E]+) *(?<unit>[munµk]?{symbol})'.");
            }
        }

        var reply = map.StringOr("reply", null);
        var replyNumber = Format(map.Optional("number"));
        var separator = map.StringOr("separator", ",")!;
        map.Finish();
        return new AnswerFormat(pattern, symbol, factor, reply, replyNumber, separator.Length == 0 ? "," : separator);
    }

    private static ErrorReporting? ReadErrors(MappingReader? map)
    {
        if (map is null)
        {
            return null;
        }

        var mode = map.Choice("mode", "queue", "queue", "code", "status", "none") switch
        {
            "code" => ErrorMode.Code,
            "status" => ErrorMode.Status,
            "none" => ErrorMode.None,
            _ => ErrorMode.Queue,
        };
        var query = map.StringOr("query", mode == ErrorMode.Queue ? "SYST:ERR?" : null);
        var mask = map.Optional("mask")?.AsInt(1, int.MaxValue) ?? 0;
        var clear = map.StringOr("clear", string.Empty)!;
        if (mode != ErrorMode.None && string.IsNullOrWhiteSpace(query))
        {
            throw map.Error($"errors: the mode '{map.Text("mode")}' needs 'query', the command that reads the error.");
        }

        if (mode == ErrorMode.Status && mask == 0)
        {
            throw map.Error("errors: the mode 'status' needs 'mask', the bits of the status word that mean an error (for example 4 for bit 2).");
        }

        if (mode == ErrorMode.None && (map.Optional("query") is not null || map.Optional("mask") is not null))
        {
            throw map.Error("errors: the mode 'none' reads nothing; remove 'query' and 'mask'.");
        }

        map.Finish();
        return mode == ErrorMode.None ? ErrorReporting.Nothing : new ErrorReporting(mode, query!, mask, clear);
    }

    private static string[] Templates(NodeReader node, string key)
    {
        var templates = node.IsSequence ? node.AsSequence().Select(x => x.AsString()).ToArray() : [node.AsString()];
        foreach (var t in templates)
        {
            var rest = Placeholders.Aggregate(t, (s, p) => s.Replace(p, string.Empty, StringComparison.Ordinal));
            if (rest.Contains('{', StringComparison.Ordinal) || rest.Contains('}', StringComparison.Ordinal))
            {
                throw node.Error($"{key}: '{t}' has a placeholder other than {{value}}, {{code}} and {{name}}.");
            }

            if (!System.Text.Ascii.IsValid(t) || t.AsSpan().IndexOfAny('\n', '\r') >= 0)
            {
                throw node.Error($"{key}: '{t}' must be one line of ASCII.");
            }
        }

        return templates.Where(t => t.Length > 0).ToArray();
    }

    private static void CheckMask(NodeReader node, string key, string[] templates)
    {
        if (key == "load.regulationLostMask" && templates.Length > 0
            && (templates.Length != 1 || !int.TryParse(templates[0], NumberStyles.None, CultureInfo.InvariantCulture, out _)))
        {
            throw node.Error($"{key}: expected the bit value as a whole number, for example \"2\" for bit 1.");
        }
    }

    private static NumberFormat Format(NodeReader? node)
    {
        if (node is not { } n)
        {
            return NumberFormat.Shortest;
        }

        try
        {
            return NumberFormat.Parse(n.AsString());
        }
        catch (FormatException ex)
        {
            throw n.Error($"{n.What}: {ex.Message}");
        }
    }

    private static double NonNegative(MappingReader map, string key)
    {
        var seconds = map.QuantityOr(key, SiUnit.Second, 0);
        return seconds is >= 0 and <= 60 ? seconds : throw map.Required(key).Error($"{map.Required(key).What}: {seconds} s is outside 0…60 s.");
    }

    private static string[] WordList(MappingReader map, string key) =>
        map.Optional(key) is not { } n ? [] : n.IsSequence ? n.AsSequence().Select(x => x.AsString()).ToArray() : [n.AsString()];

    private static RoleWords? RequireVersion2(MappingReader map, params string[] keys)
    {
        foreach (var key in keys)
        {
            if (map.Optional(key) is { } n)
            {
                throw n.Error($"{n.What}: needs 'version: 2' at the top of the profile.");
            }
        }

        return null;
    }

    private sealed record ProfileHeader(string Name, string Source, int Version, string On, string Off, string Auto, ErrorReporting Errors, TimeSpan Gap);
}

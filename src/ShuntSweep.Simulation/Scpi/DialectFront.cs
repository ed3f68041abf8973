using System.Globalization;
using System.Text;
using System.Text.RegularExpressions;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Simulation.Scpi;

/// <summary>Serves a simulated instrument in the dialect of a profile: each line is matched against the profile's command templates, translated
/// to the SCPI-99 command of the same operation, executed on the SCPI front, and its answer written back as the profile says the instrument
/// writes it (units, number format, over-range and no-data words, identity layout, error mode).</summary>
/// <remarks>
/// The front is strict where a real instrument would be: a number not written in the operation's number format, a code not in its table, a
/// word it does not know, or a command that arrives while the instrument is still busy with the previous one (its processing time or the
/// profile's inter-command delay) is rejected, and reported only as the profile's error mode allows; with mode <c>none</c> it is lost silently.
/// </remarks>
internal sealed class DialectFront : IInstrumentFront
{
    /// <summary>The share of a processing time the front enforces; the rest absorbs timer and link jitter.</summary>
    private const double Strictness = 0.8;

    private readonly InstrumentProfile _dialect;
    private readonly string _section;
    private readonly ScpiInstrument _scpi;
    private readonly double _lineFrequency;
    private readonly IReadOnlyDictionary<string, double> _fullScales;
    private readonly TimeProvider _wall;
    private readonly List<(Regex Pattern, ProfileOperation Operation, int Index)> _matchers = [];
    private long _heardAt;
    private double _busySeconds;

    /// <summary>Creates the front of <paramref name="scpi"/> for the profile section <paramref name="section"/> of <paramref name="dialect"/>.</summary>
    /// <param name="dialect">The profile whose dialect is spoken.</param>
    /// <param name="section">The section the instrument is driven by (supply, load, voltmeter, uut, reference).</param>
    /// <param name="scpi">The SCPI front that does the work.</param>
    /// <param name="lineFrequency">The mains frequency an NPLC given in seconds counts in.</param>
    /// <param name="fullScales">Range name → full scale in A, for range codes and names.</param>
    /// <param name="wall">The wall clock busy times are kept on.</param>
    public DialectFront(InstrumentProfile dialect, string section, ScpiInstrument scpi, double lineFrequency, IReadOnlyDictionary<string, double> fullScales, TimeProvider wall)
    {
        _dialect = dialect;
        _section = section;
        _scpi = scpi;
        _lineFrequency = lineFrequency;
        _fullScales = fullScales;
        _wall = wall;
        foreach (var op in dialect.Operations.Values.Where(o => o.IsSupported && (o.Key.StartsWith("common.", StringComparison.Ordinal) || o.Key.StartsWith(section + ".", StringComparison.Ordinal))))
        {
            if (op.Key is "load.regulationLostMask")
            {
                continue;
            }

            for (var i = 0; i < op.Templates.Count; i++)
            {
                _matchers.Add((Matcher(op.Templates[i]), op, i));
            }
        }
    }

    /// <inheritdoc />
    public void Push(int code, string? detail = null) => _scpi.Push(code, detail);

    /// <inheritdoc />
    public ValueTask<string?> ExecuteAsync(string line, CancellationToken cancellationToken)
    {
        var now = _wall.GetTimestamp();
        return ExecuteAsync(line, now, now, cancellationToken);
    }

    /// <inheritdoc />
    /// <remarks>A line is lost only when it certainly came too soon: even its latest possible arrival is within the processing time of the
    /// earliest possible arrival of the command before it.</remarks>
    public async ValueTask<string?> ExecuteAsync(string line, long earliest, long latest, CancellationToken cancellationToken)
    {
        var now = earliest;
        if (_busySeconds > 0 && latest - _heardAt < (long)(_busySeconds * Strictness * _wall.TimestampFrequency))
        {
            _scpi.Push(ScpiErrors.ExecutionError, $"'{line}' arrived while the instrument was busy");
            return null;
        }

        var text = line.Trim();
        if (_dialect.Errors.CanAsk && string.Equals(text, _dialect.Errors.Query, StringComparison.OrdinalIgnoreCase))
        {
            return await ErrorAnswerAsync(cancellationToken);
        }

        foreach (var (pattern, op, index) in _matchers)
        {
            var m = pattern.Match(text);
            if (!m.Success)
            {
                continue;
            }

            Hold(op, now);
            return await RunAsync(op, index, m, cancellationToken);
        }

        _scpi.Push(ScpiErrors.UndefinedHeader, text);
        Hold(null, now);
        return null;
    }

    private async ValueTask<string?> RunAsync(ProfileOperation op, int index, Match m, CancellationToken cancellationToken)
    {
        var scpiOp = InstrumentProfile.Default.Operation(op.Key);
        string? value = null;
        if (m.Groups["value"].Success)
        {
            value = TranslateValue(op, m.Groups["value"].Value);
        }
        else if (m.Groups["code"].Success)
        {
            var code = m.Groups["code"].Value.Trim();
            var range = op.Codes.FirstOrDefault(c => string.Equals(c.Value, code, StringComparison.OrdinalIgnoreCase)).Key;
            value = range is not null && _fullScales.TryGetValue(range, out var fs) ? Number(fs) : null;
        }
        else if (m.Groups["name"].Success)
        {
            value = _fullScales.TryGetValue(m.Groups["name"].Value.Trim(), out var fs) ? Number(fs) : null;
        }

        var placeholder = m.Groups["value"].Success || m.Groups["code"].Success || m.Groups["name"].Success;
        if (placeholder && value is null)
        {
            _scpi.Push(ScpiErrors.IllegalParameterValue, $"'{m.Value}' is not a value this instrument takes");
            return null;
        }

        var commands = scpiOp.Templates
            .Where(t => placeholder ? t.Contains("{value}", StringComparison.Ordinal) : !t.Contains("{value}", StringComparison.Ordinal) && index == 0)
            .Select(t => value is null ? t : t.Replace("{value}", value, StringComparison.Ordinal))
            .ToList();
        if (commands.Count == 0)
        {
            return null; // A word the dialect needs and SCPI does not (a mode selection that is implied): accepted.
        }

        if (op.Key.EndsWith(".fetch", StringComparison.Ordinal) && !_dialect.Supports(_section + ".arm"))
        {
            // A polled instrument measures when it is asked.
            commands.InsertRange(0, InstrumentProfile.Default.Commands(_section + ".arm"));
        }

        string? answer = null;
        foreach (var c in commands)
        {
            answer = await _scpi.ExecuteAsync(c, cancellationToken) ?? answer;
        }

        return answer is null ? null : await RewriteAsync(op, answer, cancellationToken);
    }

    /// <summary>Turns the dialect's value into SCPI program data, or null when the instrument would refuse it.</summary>
    private string? TranslateValue(ProfileOperation op, string written)
    {
        var text = written.Trim();
        var (on, off, auto) = (op.Words.On ?? _dialect.OnWord, op.Words.Off ?? _dialect.OffWord, op.Words.Auto ?? _dialect.AutoWord);
        if (IsBooleanSetting(op.Key))
        {
            return string.Equals(text, on, StringComparison.OrdinalIgnoreCase) ? "ON" : string.Equals(text, off, StringComparison.OrdinalIgnoreCase) ? "OFF" : null;
        }

        if (string.Equals(text, auto, StringComparison.OrdinalIgnoreCase))
        {
            return "AUTO";
        }

        if (!op.Number.Accepts(text))
        {
            _scpi.Push(ScpiErrors.InvalidCharacterInNumber, $"'{text}' is not written as {op.Number}");
            return null;
        }

        return Number(op.ReadValue(text, _lineFrequency));
    }

    /// <summary>Writes a SCPI answer the way the dialect's instrument answers.</summary>
    private async ValueTask<string> RewriteAsync(ProfileOperation op, string answer, CancellationToken cancellationToken)
    {
        switch (op.Key)
        {
            case "common.identify":
                return Identity(op, answer);
            case "supply.queryOutput" or "load.queryInput":
                return ScpiResponse.ParseBoolean(answer) ? op.Words.On ?? _dialect.OnWord : op.Words.Off ?? _dialect.OffWord;
            case "load.queryRegulation":
                var lost = (ScpiResponse.ParseInteger(answer) & 2) != 0;
                var mask = _dialect.Supports("load.regulationLostMask") ? int.Parse(_dialect.Commands("load.regulationLostMask")[0], CultureInfo.InvariantCulture) : 0;
                var word = lost ? mask : 0;
                if (_dialect.Errors.Mode == ErrorMode.Status && string.Equals(op.Templates[0], _dialect.Errors.Query, StringComparison.OrdinalIgnoreCase))
                {
                    word |= await StatusErrorBitsAsync(cancellationToken);
                }

                return word.ToString(CultureInfo.InvariantCulture);
        }

        if (op.Answer == AnswerFormat.Standard && op.UnitFactor == 1)
        {
            return answer;
        }

        try
        {
            var words = _dialect.Words(_section);
            return string.Join(op.Answer.Separator, ScpiResponse.ParseNumbers(answer).Select(v => op.Answer.Write(v, words)));
        }
        catch (FormatException)
        {
            return answer;
        }
    }

    private static string Identity(ProfileOperation op, string answer)
    {
        var id = ScpiResponse.ParseIdentity(answer);
        return op.Answer.Reply is { } reply
            ? reply.Replace("{maker}", id.Manufacturer, StringComparison.Ordinal).Replace("{model}", id.Model, StringComparison.Ordinal)
                .Replace("{serial}", id.Serial, StringComparison.Ordinal).Replace("{firmware}", id.Firmware, StringComparison.Ordinal)
            : answer;
    }

    /// <summary>Answers the dialect's error query from the SCPI queue: the entry, its bare code, or a status word whose error bit says whether any is queued.</summary>
    private async ValueTask<string> ErrorAnswerAsync(CancellationToken cancellationToken)
    {
        var errors = _dialect.Errors;
        if (errors.Mode == ErrorMode.Status)
        {
            var word = await StatusErrorBitsAsync(cancellationToken);
            if (_dialect.Supports("load.queryRegulation") && _section == "load" && string.Equals(_dialect.Query("load.queryRegulation"), errors.Query, StringComparison.OrdinalIgnoreCase))
            {
                word |= int.Parse(await RewriteAsync(_dialect.Operation("load.queryRegulation"), await _scpi.ExecuteAsync("STAT:QUES:COND?", cancellationToken) ?? "0", cancellationToken), CultureInfo.InvariantCulture);
            }

            return word.ToString(CultureInfo.InvariantCulture);
        }

        var entry = await _scpi.ExecuteAsync("SYST:ERR?", cancellationToken) ?? "0,\"No error\"";
        return errors.Mode == ErrorMode.Code ? ScpiResponse.ParseError(entry).Code.ToString(CultureInfo.InvariantCulture) : entry;
    }

    /// <summary>The lowest bit of the error mask when the SCPI queue holds any entry (the read empties it), else 0.</summary>
    private async ValueTask<int> StatusErrorBitsAsync(CancellationToken cancellationToken)
    {
        var any = false;
        for (var i = 0; i <= ScpiInstrument.QueueCapacity; i++)
        {
            var entry = ScpiResponse.ParseError(await _scpi.ExecuteAsync("SYST:ERR?", cancellationToken) ?? "0");
            if (entry.Code == 0)
            {
                break;
            }

            any = true;
        }

        var mask = _dialect.Errors.Mask;
        return any ? mask & -mask : 0;
    }

    /// <summary>Keeps the instrument deaf for its processing time from the moment <paramref name="arrived"/> the command arrived, as the tool counts it from sending.</summary>
    private void Hold(ProfileOperation? op, long arrived)
    {
        _heardAt = arrived;
        _busySeconds = Math.Max(_dialect.InterCommandDelay.TotalSeconds, op?.ProcessingTime.TotalSeconds ?? 0);
    }

    private static bool IsBooleanSetting(string key) => key is "supply.setOutput" or "load.setInput" or "voltmeter.setAutoZero";

    private static string Number(double value) => value.ToString("R", CultureInfo.InvariantCulture);

    /// <summary>A pattern that matches a command written from <paramref name="template"/>: literal text without case, runs of spaces as one or more.</summary>
    private static Regex Matcher(string template)
    {
        var pattern = new StringBuilder("^");
        var i = 0;
        while (i < template.Length)
        {
            var next = template.IndexOf('{', i);
            var literal = next < 0 ? template[i..] : template[i..next];
            pattern.Append(Regex.Escape(literal).Replace("\\ ", " +", StringComparison.Ordinal));
            if (next < 0)
            {
                break;
            }

            var close = template.IndexOf('}', next);
            var name = template[(next + 1)..close];
            pattern.Append(CultureInfo.InvariantCulture, $"(?<{name}>.+?)");
            i = close + 1;
        }

        return new Regex(pattern.Append('$').ToString(), RegexOptions.IgnoreCase | RegexOptions.CultureInvariant, TimeSpan.FromMilliseconds(100));
    }
}

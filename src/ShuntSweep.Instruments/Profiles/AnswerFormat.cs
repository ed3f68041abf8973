using System.Globalization;
using System.Text.RegularExpressions;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>How the answer to one query is read: an optional pattern with a named group <c>value</c> and an optional group <c>unit</c>
/// (an SI prefix before the operation's unit, <c>mV</c>, <c>uA</c>, <c>µA</c>), the unit the bare number is in, and how the simulator writes it.</summary>
/// <remarks>Without a pattern the answer is an IEEE 488.2 number (NR1/NR2/NR3, SCPI 9.9E37 overload); several readings are separated by
/// <see cref="Separator"/>, and each is read on its own.</remarks>
public sealed class AnswerFormat
{
    private static readonly (string Prefix, double Factor)[] Prefixes =
    [
        ("p", 1e-12), ("n", 1e-9), ("u", 1e-6), ("µ", 1e-6), ("μ", 1e-6), ("m", 1e-3), (string.Empty, 1), ("k", 1e3), ("M", 1e6), ("G", 1e9),
    ];

    /// <summary>Creates an answer format.</summary>
    /// <param name="pattern">A pattern with a group <c>value</c> (and optionally <c>unit</c>); null for a bare IEEE 488.2 number.</param>
    /// <param name="unitSymbol">The SI symbol the unit group must end in (V, A, s), empty for a plain number.</param>
    /// <param name="scale">What the number is multiplied by when the answer carries no unit (1e-3 for an answer in mA).</param>
    /// <param name="reply">How the simulator writes the answer: a template with <c>{value}</c>; null for NR3.</param>
    /// <param name="replyNumber">How the simulator writes the number in <paramref name="reply"/>.</param>
    /// <param name="separator">What separates several readings in one answer.</param>
    public AnswerFormat(Regex? pattern, string unitSymbol, double scale, string? reply, NumberFormat replyNumber, string separator)
    {
        Pattern = pattern;
        UnitSymbol = unitSymbol;
        Scale = scale;
        Reply = reply;
        ReplyNumber = replyNumber;
        Separator = separator;
    }

    /// <summary>The answer of a standard SCPI query: a bare number in SI units, readings separated by commas.</summary>
    public static AnswerFormat Standard { get; } = new(null, string.Empty, 1, null, NumberFormat.Shortest, ",");

    /// <summary>The pattern with the groups <c>value</c> and optionally <c>unit</c>; null for a bare number.</summary>
    public Regex? Pattern { get; }

    /// <summary>The SI unit symbol the unit group must end in; empty when the quantity has none.</summary>
    public string UnitSymbol { get; }

    /// <summary>The factor from the instrument's bare number to SI units.</summary>
    public double Scale { get; }

    /// <summary>The simulator's answer template with <c>{value}</c>; null for NR3.</summary>
    public string? Reply { get; }

    /// <summary>How the simulator writes the number in its answer.</summary>
    public NumberFormat ReplyNumber { get; }

    /// <summary>What separates several readings.</summary>
    public string Separator { get; }

    /// <summary>Reads one value in SI units; the role's over-range words give +∞ and its no-data words NaN.</summary>
    /// <exception cref="FormatException">The answer matches neither the pattern nor a word.</exception>
    public double ParseOne(string answer, RoleWords words)
    {
        ArgumentNullException.ThrowIfNull(answer);
        ArgumentNullException.ThrowIfNull(words);
        var t = answer.Trim();
        if (words.IsOverRange(t))
        {
            return t.StartsWith('-') ? double.NegativeInfinity : double.PositiveInfinity;
        }

        if (words.IsNoData(t))
        {
            return double.NaN;
        }

        if (Pattern is null)
        {
            return Scaled(ScpiResponse.ParseNumber(t), Scale);
        }

        var match = Pattern.Match(t);
        if (!match.Success)
        {
            throw new FormatException($"'{ScpiResponse.Shorten(t)}' does not match the answer pattern '{Pattern}'.");
        }

        var value = ScpiResponse.ParseNumber(match.Groups["value"].Value);
        var unit = match.Groups["unit"];
        return Scaled(value, unit.Success && unit.Value.Trim().Length > 0 ? PrefixFactor(unit.Value.Trim(), UnitSymbol) : Scale);
    }

    /// <summary>Reads every value of an answer with several readings.</summary>
    public double[] ParseAll(string answer, RoleWords words)
    {
        ArgumentNullException.ThrowIfNull(answer);
        return answer.Split(Separator).Select(a => ParseOne(a, words)).ToArray();
    }

    /// <summary>Writes <paramref name="si"/> as the instrument would (for the simulator): scaled to the instrument's unit, in the reply template.</summary>
    public string Write(double si, RoleWords words)
    {
        ArgumentNullException.ThrowIfNull(words);
        if (double.IsInfinity(si))
        {
            return words.OverRange.Count > 0 ? (si < 0 && words.OverRange[0].Length > 0 ? "-" : string.Empty) + words.OverRange[0] : (si > 0 ? "+9.9E37" : "-9.9E37");
        }

        if (double.IsNaN(si))
        {
            return words.NoData.Count > 0 ? words.NoData[0] : "9.91E37";
        }

        var number = Reply is null && ReplyNumber == NumberFormat.Shortest
            ? (si / Scale).ToString("+0.000000E+00;-0.000000E+00", CultureInfo.InvariantCulture)
            : ReplyNumber.Format(si / Scale);
        return Reply is null ? number : Reply.Replace("{value}", number, StringComparison.Ordinal);
    }

    /// <summary>The factor an SI prefix before <paramref name="symbol"/> stands for (<c>mV</c> → 1e-3).</summary>
    /// <exception cref="FormatException">The unit is not the expected one with a known prefix.</exception>
    public static double PrefixFactor(string unit, string symbol)
    {
        ArgumentNullException.ThrowIfNull(unit);
        ArgumentNullException.ThrowIfNull(symbol);
        var aliases = symbol switch
        {
            "Ohm" => new[] { "Ohm", "ohm", "Ω", "OHM" },
            _ => [symbol],
        };
        foreach (var alias in aliases)
        {
            if (!unit.EndsWith(alias, StringComparison.OrdinalIgnoreCase))
            {
                continue;
            }

            var prefix = unit[..^alias.Length];
            foreach (var (p, f) in Prefixes)
            {
                if (string.Equals(prefix, p, StringComparison.Ordinal))
                {
                    return f;
                }
            }
        }

        throw new FormatException($"'{unit}' is not {(symbol.Length == 0 ? "a unit this answer can carry" : $"{symbol} with an SI prefix (p, n, u, µ, m, k, M, G)")}.");
    }

    private static double Scaled(double value, double factor) => double.IsFinite(value) ? value * factor : value;
}

/// <summary>The words a role's instrument answers instead of a number: over-range (an overload, read as ±∞) and no data (a reading not ready, read as NaN).</summary>
/// <param name="OverRange">Words meaning over-range, compared without case; the first is what the simulator answers.</param>
/// <param name="NoData">Words meaning no reading, compared without case.</param>
public sealed record RoleWords(IReadOnlyList<string> OverRange, IReadOnlyList<string> NoData)
{
    /// <summary>No words: every answer must be a number.</summary>
    public static RoleWords None { get; } = new([], []);

    /// <summary>True when <paramref name="answer"/> is one of the over-range words (a leading sign allowed).</summary>
    public bool IsOverRange(string answer) => OverRange.Any(w => Matches(answer, w));

    /// <summary>True when <paramref name="answer"/> is one of the no-data words.</summary>
    public bool IsNoData(string answer) => NoData.Any(w => string.Equals(answer, w, StringComparison.OrdinalIgnoreCase));

    private static bool Matches(string answer, string word) =>
        string.Equals(answer, word, StringComparison.OrdinalIgnoreCase)
        || (answer.Length > 1 && answer[0] is '+' or '-' && string.Equals(answer[1..], word, StringComparison.OrdinalIgnoreCase));
}

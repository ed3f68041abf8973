using System.Globalization;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>How a number is written into a command (or, by the simulator, into an answer): many instruments reject an exponent or need a fixed number of decimals.</summary>
/// <remarks>Written in a profile as <c>shortest</c> (the default: the shortest text that reads back to the same double, exponent where shorter),
/// <c>plain</c> (no exponent), <c>fixed N</c> (N decimals, no exponent), <c>significant N</c> (N significant digits, no exponent) or
/// <c>scientific N</c> (one digit, N decimals and an exponent such as <c>1.250E-03</c>).</remarks>
public sealed record NumberFormat
{
    private NumberFormat(NumberStyleKind kind, int digits)
    {
        Kind = kind;
        Digits = digits;
    }

    /// <summary>The kinds of number format.</summary>
    public enum NumberStyleKind
    {
        /// <summary>Shortest round-trip form.</summary>
        Shortest,

        /// <summary>No exponent, as many digits as needed (up to 15 significant).</summary>
        Plain,

        /// <summary>A fixed number of decimals, no exponent.</summary>
        Fixed,

        /// <summary>A number of significant digits, no exponent.</summary>
        Significant,

        /// <summary>Mantissa with a number of decimals and an exponent.</summary>
        Scientific,
    }

    /// <summary>The shortest round-trip form (what version 1 profiles send).</summary>
    public static NumberFormat Shortest { get; } = new(NumberStyleKind.Shortest, 0);

    /// <summary>Which kind of format.</summary>
    public NumberStyleKind Kind { get; }

    /// <summary>Decimals (fixed, scientific) or significant digits (significant); 0 otherwise.</summary>
    public int Digits { get; }

    /// <summary>Reads a format as written in a profile (<c>fixed 3</c>, <c>significant 5</c>, <c>plain</c>…).</summary>
    /// <exception cref="FormatException">The text is not a number format.</exception>
    public static NumberFormat Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var parts = text.Trim().Split(' ', StringSplitOptions.RemoveEmptyEntries);
        static int Count(string[] p, int min, int max) =>
            p.Length == 2 && int.TryParse(p[1], NumberStyles.None, CultureInfo.InvariantCulture, out var n) && n >= min && n <= max
                ? n
                : throw new FormatException($"'{string.Join(' ', p)}' needs a count from {min} to {max}, for example '{p[0]} {Math.Max(min, 3)}'.");
        return parts switch
        {
            ["shortest"] => Shortest,
            ["plain"] => new NumberFormat(NumberStyleKind.Plain, 0),
            ["fixed", ..] => new NumberFormat(NumberStyleKind.Fixed, Count(parts, 0, 15)),
            ["significant", ..] => new NumberFormat(NumberStyleKind.Significant, Count(parts, 1, 15)),
            ["scientific", ..] => new NumberFormat(NumberStyleKind.Scientific, Count(parts, 0, 15)),
            _ => throw new FormatException($"'{text}' is not a number format; expected shortest, plain, fixed N, significant N or scientific N."),
        };
    }

    /// <summary>Writes <paramref name="value"/> in this format (invariant culture).</summary>
    public string Format(double value)
    {
        if (!double.IsFinite(value))
        {
            throw new ArgumentOutOfRangeException(nameof(value), value, "only finite numbers can be sent to an instrument.");
        }

        return Kind switch
        {
            NumberStyleKind.Plain => RoundedPlain(value, 15),
            NumberStyleKind.Fixed => Clean(value.ToString("F" + Digits.ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture)),
            NumberStyleKind.Significant => RoundedPlain(value, Digits, keepZeros: true),
            NumberStyleKind.Scientific => Clean(value.ToString("0." + new string('0', Digits) + "E+00", CultureInfo.InvariantCulture)),
            _ => value.ToString("R", CultureInfo.InvariantCulture),
        };
    }

    /// <summary>True when <paramref name="text"/> is written the way this format writes numbers (the simulator refuses anything else).</summary>
    public bool Accepts(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var t = text.Trim();
        if (!Messaging.ScpiResponse.IsDecimalNumeric(t))
        {
            return false;
        }

        var hasExponent = t.AsSpan().IndexOfAny('e', 'E') >= 0;
        var dot = t.IndexOf('.', StringComparison.Ordinal);
        return Kind switch
        {
            NumberStyleKind.Shortest => true,
            NumberStyleKind.Plain or NumberStyleKind.Significant => !hasExponent,
            NumberStyleKind.Fixed => !hasExponent && (Digits == 0 ? dot < 0 : dot >= 0 && t.Length - dot - 1 == Digits),
            _ => hasExponent && (Digits == 0 ? dot < 0 : dot >= 0 && t.IndexOfAny(['e', 'E']) - dot - 1 == Digits),
        };
    }

    /// <inheritdoc />
    public override string ToString() => Kind switch
    {
        NumberStyleKind.Fixed or NumberStyleKind.Significant or NumberStyleKind.Scientific => $"{Kind.ToString().ToLowerInvariant()} {Digits}",
        _ => Kind.ToString().ToLowerInvariant(),
    };

    /// <summary>Rounds to <paramref name="significant"/> digits and writes the result without an exponent.</summary>
    private static string RoundedPlain(double value, int significant, bool keepZeros = false)
    {
        if (value == 0)
        {
            return keepZeros && significant > 1 ? "0." + new string('0', significant - 1) : "0";
        }

        var rounded = double.Parse(value.ToString("E" + (significant - 1).ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);
        var exponent = (int)Math.Floor(Math.Log10(Math.Abs(rounded)));
        var decimals = significant - 1 - exponent;
        if (decimals >= 0)
        {
            var text = Clean(rounded.ToString("F" + Math.Min(decimals, 99).ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture));
            return keepZeros ? text : TrimZeros(text);
        }

        return Clean(rounded.ToString("F0", CultureInfo.InvariantCulture));
    }

    private static string TrimZeros(string text) => text.Contains('.', StringComparison.Ordinal) ? text.TrimEnd('0').TrimEnd('.') : text;

    /// <summary>Writes negative zero as zero, which no instrument needs to see.</summary>
    private static string Clean(string text) => text.StartsWith('-') && text.AsSpan(1).IndexOfAnyExcept("0.") < 0 ? text[1..] : text;
}

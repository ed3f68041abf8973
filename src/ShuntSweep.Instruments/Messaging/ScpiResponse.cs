using System.Globalization;
using ShuntSweep.Instruments.Drivers;

namespace ShuntSweep.Instruments.Messaging;

/// <summary>Parses IEEE 488.2 response data: decimal numbers (NR1/NR2/NR3), booleans, error-queue entries and <c>*IDN?</c> identities.</summary>
/// <remarks>
/// Number formats follow IEEE 488.2 §8.7.2–8.7.4 (NR1 integer, NR2 with a decimal point, NR3 with an exponent); the special values
/// follow SCPI-99 Vol. 1 §7.2.1: 9.9E37 is the overload (±infinity) value and 9.91E37 is "not a number".
/// Parsing is lenient only where listeners commonly are: surrounding spaces and a lower-case exponent letter are accepted.
/// </remarks>
public static class ScpiResponse
{
    /// <summary>The SCPI-99 value for positive infinity / overload (negated for negative overload).</summary>
    public const double Overload = 9.9e37;

    /// <summary>The SCPI-99 value for "not a number".</summary>
    public const double NotANumber = 9.91e37;

    /// <summary>Parses one NR1, NR2 or NR3 value; 9.9E37 becomes ±infinity and 9.91E37 becomes NaN.</summary>
    /// <exception cref="FormatException">The text is not a decimal numeric response.</exception>
    public static double ParseNumber(ReadOnlySpan<char> text)
    {
        var t = text.Trim();
        if (!IsDecimalNumeric(t))
        {
            throw new FormatException($"'{Shorten(t)}' is not an IEEE 488.2 decimal number (NR1, NR2 or NR3).");
        }

        var value = double.Parse(t, NumberStyles.Float, CultureInfo.InvariantCulture);
        return Math.Abs(value) switch
        {
            Overload => value > 0 ? double.PositiveInfinity : double.NegativeInfinity,
            NotANumber => double.NaN,
            _ => double.IsInfinity(value) ? throw new FormatException($"'{Shorten(t)}' is outside the range of a double.") : value,
        };
    }

    /// <summary>Parses a comma-separated list of decimal numbers (the answer of <c>FETCh?</c> with several samples).</summary>
    public static double[] ParseNumbers(ReadOnlySpan<char> text)
    {
        var count = text.Count(',') + 1;
        var values = new double[count];
        var i = 0;
        foreach (var range in text.Split(','))
        {
            values[i++] = ParseNumber(text[range]);
        }

        return values;
    }

    /// <summary>Parses an NR1 integer (an NR2/NR3 with an integral value is accepted, as some instruments answer <c>+2.00000E+00</c>).</summary>
    public static int ParseInteger(ReadOnlySpan<char> text)
    {
        var value = ParseNumber(text);
        return double.IsFinite(value) && value == Math.Round(value) && Math.Abs(value) <= int.MaxValue
            ? (int)value
            : throw new FormatException($"'{Shorten(text.Trim())}' is not a whole number.");
    }

    /// <summary>Parses a boolean response: SCPI-99 Vol. 1 §7.3 answers 0 or 1; ON/OFF is accepted too.</summary>
    public static bool ParseBoolean(ReadOnlySpan<char> text)
    {
        var t = text.Trim();
        if (t.Equals("1", StringComparison.Ordinal) || t.Equals("ON", StringComparison.OrdinalIgnoreCase))
        {
            return true;
        }

        if (t.Equals("0", StringComparison.Ordinal) || t.Equals("OFF", StringComparison.OrdinalIgnoreCase))
        {
            return false;
        }

        return IsDecimalNumeric(t) ? ParseNumber(t) != 0 : throw new FormatException($"'{Shorten(t)}' is not a boolean (0 or 1).");
    }

    /// <summary>Parses an error-queue entry <c>&lt;code&gt;,"&lt;message&gt;"</c> (SCPI-99 Vol. 2 §21.8; doubled quotes inside the string per IEEE 488.2 §8.7.8).</summary>
    public static InstrumentError ParseError(ReadOnlySpan<char> text)
    {
        var t = text.Trim();
        var comma = t.IndexOf(',');
        var codeText = comma < 0 ? t : t[..comma];
        if (!int.TryParse(codeText.Trim(), NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var code))
        {
            throw new FormatException($"'{Shorten(t)}' is not an error-queue entry (expected <code>,\"<message>\").");
        }

        if (comma < 0)
        {
            return new InstrumentError(code, string.Empty);
        }

        var rest = t[(comma + 1)..].Trim();
        return new InstrumentError(code, Unquote(rest));
    }

    /// <summary>Parses the answer of <c>*IDN?</c>: four comma-separated fields, maker, model, serial, firmware (IEEE 488.2 §10.14.1).</summary>
    public static InstrumentIdentity ParseIdentity(ReadOnlySpan<char> text)
    {
        var t = text.Trim();
        Span<Range> parts = stackalloc Range[5];
        var n = t.Split(parts, ',');
        if (n != 4)
        {
            throw new FormatException($"'{Shorten(t)}' is not an IEEE 488.2 identity: expected 4 comma-separated fields (maker, model, serial, firmware), found {(n == 5 ? "more than 4" : n.ToString(CultureInfo.InvariantCulture))}.");
        }

        return new InstrumentIdentity(
            Unquote(t[parts[0]].Trim()), Unquote(t[parts[1]].Trim()), Unquote(t[parts[2]].Trim()), Unquote(t[parts[3]].Trim()));
    }

    /// <summary>Formats a number as program data that every SCPI listener accepts (shortest round-trip form, invariant culture).</summary>
    public static string FormatNumber(double value) =>
        double.IsFinite(value)
            ? value.ToString("R", CultureInfo.InvariantCulture)
            : throw new ArgumentOutOfRangeException(nameof(value), value, "only finite numbers can be sent to an instrument.");

    /// <summary>True when <paramref name="t"/> is NR1, NR2 or NR3: [sign] digits [. digits] [E [sign] digits], with at least one mantissa digit.</summary>
    internal static bool IsDecimalNumeric(ReadOnlySpan<char> t)
    {
        var i = 0;
        if (i < t.Length && (t[i] == '+' || t[i] == '-'))
        {
            i++;
        }

        var digits = 0;
        while (i < t.Length && char.IsAsciiDigit(t[i]))
        {
            i++;
            digits++;
        }

        if (i < t.Length && t[i] == '.')
        {
            i++;
            while (i < t.Length && char.IsAsciiDigit(t[i]))
            {
                i++;
                digits++;
            }
        }

        if (digits == 0)
        {
            return false;
        }

        if (i < t.Length && (t[i] == 'E' || t[i] == 'e'))
        {
            i++;
            if (i < t.Length && (t[i] == '+' || t[i] == '-'))
            {
                i++;
            }

            var exponentDigits = 0;
            while (i < t.Length && char.IsAsciiDigit(t[i]))
            {
                i++;
                exponentDigits++;
            }

            if (exponentDigits == 0)
            {
                return false;
            }
        }

        return i == t.Length;
    }

    private static string Unquote(ReadOnlySpan<char> s)
    {
        if (s.Length >= 2 && s[0] == '"' && s[^1] == '"')
        {
            return s[1..^1].ToString().Replace("\"\"", "\"", StringComparison.Ordinal);
        }

        return s.ToString();
    }

    internal static string Shorten(ReadOnlySpan<char> s)
    {
        var clean = new string(s.Length > 80 ? s[..80] : s);
        var printable = string.Concat(clean.Select(c => c is >= ' ' and < (char)127 ? c.ToString() : $"\\x{(int)c:X2}"));
        return s.Length > 80 ? printable + "…" : printable;
    }
}

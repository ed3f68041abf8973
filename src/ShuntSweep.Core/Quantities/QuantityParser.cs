using System.Globalization;

namespace ShuntSweep.Core.Quantities;

/// <summary>Parses numbers with an optional SI prefix and unit symbol (<c>10 mA</c>, <c>2.5V</c>, <c>500 ms</c>, <c>4.7 kΩ</c>).</summary>
/// <remarks>The result is in the coherent SI unit. A unit other than the expected one is an error, never a silent conversion.</remarks>
public static class QuantityParser
{
    private static readonly (string Symbol, SiUnit Unit)[] Symbols =
    [
        ("ohms", SiUnit.Ohm), ("ohm", SiUnit.Ohm), ("Ω", SiUnit.Ohm), ("Ohm", SiUnit.Ohm),
        ("Hz", SiUnit.Hertz), ("°C", SiUnit.Celsius), ("degC", SiUnit.Celsius),
        ("A", SiUnit.Ampere), ("V", SiUnit.Volt), ("s", SiUnit.Second), ("W", SiUnit.Watt), ("K", SiUnit.Kelvin),
    ];

    private static readonly Dictionary<string, double> Prefixes = new(StringComparer.Ordinal)
    {
        ["f"] = 1e-15, ["p"] = 1e-12, ["n"] = 1e-9, ["µ"] = 1e-6, ["μ"] = 1e-6, ["u"] = 1e-6, ["m"] = 1e-3,
        ["k"] = 1e3, ["M"] = 1e6, ["G"] = 1e9, ["T"] = 1e12, [""] = 1.0,
    };

    /// <summary>Parses <paramref name="text"/> and returns its value in the coherent SI unit of <paramref name="expected"/>.</summary>
    /// <exception cref="FormatException">The text is not a number, or carries a unit other than <paramref name="expected"/>.</exception>
    public static double Parse(string text, SiUnit expected)
    {
        if (!TryParse(text, out var value, out var unit, out var error))
        {
            throw new FormatException(error);
        }

        if (unit != expected && !(unit == SiUnit.None && expected == SiUnit.None))
        {
            if (unit == SiUnit.None)
            {
                throw new FormatException($"'{text}' has no unit; expected a value in {Describe(expected)}, for example '10 {Example(expected)}'.");
            }

            throw new FormatException($"'{text}' is in {Describe(unit)}; expected {Describe(expected)}.");
        }

        return value;
    }

    /// <summary>Tries to parse a number with optional prefix and unit; on failure <paramref name="error"/> says why.</summary>
    public static bool TryParse(string? text, out double value, out SiUnit unit, out string error)
    {
        value = 0;
        unit = SiUnit.None;
        error = string.Empty;
        if (string.IsNullOrWhiteSpace(text))
        {
            error = "Expected a quantity such as '10 mA', found nothing.";
            return false;
        }

        var s = text.Trim();
        var end = NumberLength(s);
        if (end == 0 || !double.TryParse(s.AsSpan(0, end), NumberStyles.Float, CultureInfo.InvariantCulture, out var number))
        {
            error = $"'{text}' does not start with a number.";
            return false;
        }

        if (!double.IsFinite(number))
        {
            error = $"'{text}' is not a finite number.";
            return false;
        }

        var suffix = s[end..].Trim();
        if (suffix.Length == 0)
        {
            value = number;
            return true;
        }

        foreach (var (symbol, u) in Symbols)
        {
            if (!suffix.EndsWith(symbol, StringComparison.Ordinal))
            {
                continue;
            }

            var prefix = suffix[..^symbol.Length];
            if (u == SiUnit.Second && prefix is "min")
            {
                continue;
            }

            if (Prefixes.TryGetValue(prefix, out var factor))
            {
                value = number * factor;
                unit = u;
                return true;
            }
        }

        switch (suffix)
        {
            case "min":
                value = number * 60;
                unit = SiUnit.Second;
                return true;
            case "h":
                value = number * 3600;
                unit = SiUnit.Second;
                return true;
            case "ppm":
                value = number * 1e-6;
                return true;
            case "%":
                value = number * 1e-2;
                return true;
            default:
                error = $"'{text}' has an unknown unit '{suffix}'; expected an SI prefix (f p n µ u m k M G T) and a unit (A V Ω ohm s W Hz K °C), or ppm or %.";
                return false;
        }
    }

    private static int NumberLength(string s)
    {
        var i = 0;
        if (i < s.Length && (s[i] == '+' || s[i] == '-'))
        {
            i++;
        }

        while (i < s.Length && (char.IsAsciiDigit(s[i]) || s[i] == '.'))
        {
            i++;
        }

        // An exponent only when a digit follows 'e' (so "10 e" stays an error, and "1e-3" is a number).
        if (i < s.Length && (s[i] == 'e' || s[i] == 'E'))
        {
            var j = i + 1;
            if (j < s.Length && (s[j] == '+' || s[j] == '-'))
            {
                j++;
            }

            if (j < s.Length && char.IsAsciiDigit(s[j]))
            {
                while (j < s.Length && char.IsAsciiDigit(s[j]))
                {
                    j++;
                }

                i = j;
            }
        }

        return i;
    }

    private static string Describe(SiUnit unit) => unit switch
    {
        SiUnit.None => "a plain number",
        SiUnit.Ampere => "amperes (A)",
        SiUnit.Volt => "volts (V)",
        SiUnit.Ohm => "ohms (Ω)",
        SiUnit.Second => "seconds (s)",
        SiUnit.Watt => "watts (W)",
        SiUnit.Hertz => "hertz (Hz)",
        SiUnit.Kelvin => "kelvins (K)",
        SiUnit.Celsius => "degrees Celsius (°C)",
        _ => unit.ToString(),
    };

    private static string Example(SiUnit unit) => unit switch
    {
        SiUnit.Ampere => "mA",
        SiUnit.Volt => "V",
        SiUnit.Ohm => "mΩ",
        SiUnit.Second => "ms",
        SiUnit.Watt => "W",
        SiUnit.Hertz => "Hz",
        SiUnit.Kelvin => "K",
        SiUnit.Celsius => "°C",
        _ => string.Empty,
    };
}

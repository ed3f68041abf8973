using System.Globalization;

namespace ShuntSweep.Simulation.Scpi;

/// <summary>The unit a numeric parameter is in, for its suffix (IEEE 488.2 §7.7.3).</summary>
internal enum ScpiUnit
{
    /// <summary>No suffix allowed.</summary>
    None,

    /// <summary>Volt, suffix <c>V</c>.</summary>
    Volt,

    /// <summary>Ampere, suffix <c>A</c> (so <c>MA</c> is milliampere).</summary>
    Ampere,

    /// <summary>Ohm, suffix <c>OHM</c> (so <c>MOHM</c> is megohm).</summary>
    Ohm,

    /// <summary>Second, suffix <c>S</c>.</summary>
    Second,

    /// <summary>Hertz, suffix <c>HZ</c> (so <c>MHZ</c> is megahertz).</summary>
    Hertz,
}

/// <summary>Decodes NRf numbers (IEEE 488.2 §7.7.2) with MIN/MAX/DEF and suffix multipliers, and formats NR3 answers.</summary>
internal static class ScpiNumber
{
    /// <summary>The value SCPI-99 uses for overload (positive infinity): 9.9E37.</summary>
    public const double Overload = 9.9e37;

    /// <summary>The value SCPI-99 uses for "not a number": 9.91E37.</summary>
    public const double NotANumber = 9.91e37;

    // IEEE 488.2-1992 Table 7-2 suffix multipliers (copied via j123b567/scpi-parser libscpi/src/units.c; see data/reference/scpi).
    private static readonly (string Mnemonic, double Factor)[] Multipliers =
    [
        ("EX", 1e18), ("PE", 1e15), ("MA", 1e6), ("T", 1e12), ("G", 1e9), ("K", 1e3),
        ("M", 1e-3), ("U", 1e-6), ("N", 1e-9), ("P", 1e-12), ("F", 1e-15), ("A", 1e-18),
    ];

    /// <summary>Decodes <paramref name="text"/> into SI units; MIN, MAX and DEF give the supplied values.</summary>
    public static double Parse(string text, ScpiUnit unit, double min, double max, double @default)
    {
        var upper = text.ToUpperInvariant();
        switch (upper)
        {
            case "MIN" or "MINIMUM":
                return min;
            case "MAX" or "MAXIMUM":
                return max;
            case "DEF" or "DEFAULT":
                return @default;
            case "INF" or "INFINITY":
                return double.PositiveInfinity;
            case "NINF":
                return double.NegativeInfinity;
            case "NAN":
                return double.NaN;
        }

        if (upper.StartsWith('#'))
        {
            return NonDecimal(upper);
        }

        var end = MantissaAndExponentLength(upper);
        if (end == 0)
        {
            throw new ScpiException(
                char.IsAsciiLetter(upper[0]) ? ScpiErrors.IllegalParameterValue : ScpiErrors.InvalidCharacterInNumber,
                $"'{text}' is not a number");
        }

        if (!double.TryParse(upper[..end].Replace(" ", string.Empty, StringComparison.Ordinal).Replace("\t", string.Empty, StringComparison.Ordinal), NumberStyles.Float, CultureInfo.InvariantCulture, out var number))
        {
            throw new ScpiException(ScpiErrors.InvalidCharacterInNumber, $"'{text}'");
        }

        if (double.IsInfinity(number))
        {
            throw new ScpiException(ScpiErrors.ExponentTooLarge);
        }

        var suffix = upper[end..].Trim(' ', '\t');
        if (suffix.Length > 0 && !char.IsAsciiLetter(suffix[0]))
        {
            throw new ScpiException(ScpiErrors.InvalidCharacterInNumber, $"'{text}'");
        }

        return suffix.Length == 0 ? number : number * Factor(suffix, unit, text);
    }

    /// <summary>Formats a value as NR3 (<c>+1.234567E-03</c>); infinities become the SCPI overload value, NaN 9.91E37.</summary>
    public static string Nr3(double value)
    {
        if (double.IsNaN(value))
        {
            value = NotANumber;
        }
        else if (double.IsPositiveInfinity(value))
        {
            value = Overload;
        }
        else if (double.IsNegativeInfinity(value))
        {
            value = -Overload;
        }

        var text = value.ToString("E9", CultureInfo.InvariantCulture);
        var e = text.IndexOf('E', StringComparison.Ordinal);
        var mantissa = text[..e];
        var exponent = int.Parse(text.AsSpan(e + 1), CultureInfo.InvariantCulture);
        var sign = exponent < 0 ? '-' : '+';
        var body = mantissa.StartsWith('-') ? mantissa : "+" + mantissa;
        return $"{body}E{sign}{Math.Abs(exponent):00}";
    }

    private static double Factor(string suffix, ScpiUnit unit, string text)
    {
        var symbol = unit switch
        {
            ScpiUnit.Volt => "V",
            ScpiUnit.Ampere => "A",
            ScpiUnit.Ohm => "OHM",
            ScpiUnit.Second => "S",
            ScpiUnit.Hertz => "HZ",
            _ => throw new ScpiException(ScpiErrors.SuffixNotAllowed, $"'{text}'"),
        };

        if (suffix == symbol)
        {
            return 1;
        }

        if (!suffix.EndsWith(symbol, StringComparison.Ordinal))
        {
            throw new ScpiException(ScpiErrors.InvalidSuffix, $"'{suffix}' (expected {symbol} with an optional multiplier)");
        }

        var prefix = suffix[..^symbol.Length];

        // MOHM and MHZ are megohm and megahertz: IEEE 488.2 Table 7-2 note, "use M for OHM and HZ".
        if (prefix == "M" && unit is ScpiUnit.Ohm or ScpiUnit.Hertz)
        {
            return 1e6;
        }

        foreach (var (mnemonic, factor) in Multipliers)
        {
            if (prefix == mnemonic)
            {
                return factor;
            }
        }

        throw new ScpiException(ScpiErrors.InvalidSuffix, $"'{suffix}'");
    }

    private static double NonDecimal(string upper)
    {
        if (upper.Length < 3)
        {
            throw new ScpiException(ScpiErrors.InvalidCharacterInNumber, $"'{upper}'");
        }

        var radix = upper[1] switch
        {
            'H' => 16,
            'Q' => 8,
            'B' => 2,
            _ => throw new ScpiException(ScpiErrors.InvalidCharacterInNumber, $"'{upper}'"),
        };
        long value = 0;
        foreach (var c in upper.AsSpan(2))
        {
            var digit = c switch
            {
                >= '0' and <= '9' => c - '0',
                >= 'A' and <= 'F' => c - 'A' + 10,
                _ => 99,
            };
            if (digit >= radix || value > int.MaxValue)
            {
                throw new ScpiException(ScpiErrors.InvalidCharacterInNumber, $"'{upper}'");
            }

            value = (value * radix) + digit;
        }

        return value;
    }

    private static int MantissaAndExponentLength(string s)
    {
        var i = 0;
        if (i < s.Length && s[i] is '+' or '-')
        {
            i++;
        }

        var digits = 0;
        while (i < s.Length && char.IsAsciiDigit(s[i]))
        {
            i++;
            digits++;
        }

        if (i < s.Length && s[i] == '.')
        {
            i++;
            while (i < s.Length && char.IsAsciiDigit(s[i]))
            {
                i++;
                digits++;
            }
        }

        if (digits == 0)
        {
            return 0;
        }

        var mantissaEnd = i;
        while (i < s.Length && s[i] is ' ' or '\t')
        {
            i++;
        }

        if (i < s.Length && s[i] == 'E')
        {
            var j = i + 1;
            while (j < s.Length && s[j] is ' ' or '\t')
            {
                j++;
            }

            if (j < s.Length && s[j] is '+' or '-')
            {
                j++;
            }

            var exponentDigits = 0;
            while (j < s.Length && char.IsAsciiDigit(s[j]))
            {
                j++;
                exponentDigits++;
            }

            if (exponentDigits > 0)
            {
                return j;
            }
        }

        return mantissaEnd;
    }
}

using System.Globalization;
using System.Text;

namespace ShuntSweep.Core.Quantities;

/// <summary>The one way the tool prints a quantity for people: SI prefix in engineering steps, GUM 7.2.6 rounding.</summary>
/// <remarks>
/// Files keep plain SI numbers; this is for the terminal, the HTML report and JUnit text. A value with an uncertainty
/// shows the uncertainty to two significant digits (rounded to nearest) and the value rounded to the uncertainty's
/// last digit (JCGM 100:2008 7.2.6). No exponent form appears between 1 f and 1 T of the unit, and a value that rounds
/// to zero is printed as 0, never -0.
/// </remarks>
public static class QuantityFormatter
{
    /// <summary>Significant digits of a value printed without an uncertainty.</summary>
    public const int DefaultSignificantDigits = 4;

    private const int MaximumDigits = 15;

    /// <summary>Formats a value without an uncertainty to at most <paramref name="significant"/> digits, trailing zeros dropped (<c>12.3 mA</c>).</summary>
    public static string Format(double value, SiUnit unit, int significant = DefaultSignificantDigits)
    {
        if (!double.IsFinite(value))
        {
            return NotFinite(value, unit);
        }

        if (value == 0)
        {
            return Join("0", string.Empty, unit);
        }

        significant = Math.Clamp(significant, 1, MaximumDigits);
        var place = (int)Math.Floor(Math.Log10(Math.Abs(value))) - significant + 1;
        var digits = Scale(value, place);
        if (Math.Abs(digits) >= Pow10(significant))
        {
            place++;
            digits = Scale(value, place);
        }

        // A value without an uncertainty claims no more digits than it has: trailing zeros go (1 kHz, not 1.000 kHz).
        while (digits % 10 == 0)
        {
            digits /= 10;
            place++;
        }

        return Render(digits, place, unit, zeroPrefixPlace: place);
    }

    /// <summary>Formats <c>value ± uncertainty</c>: the uncertainty to two significant digits, the value to its last digit (<c>10.058 Ω ± 27 mΩ</c>).</summary>
    /// <remarks>Says nothing about what the uncertainty is; where it is an expanded uncertainty use <see cref="FormatExpanded"/> so k is shown.</remarks>
    public static string Format(double value, double uncertainty, SiUnit unit)
    {
        if (!double.IsFinite(value) || !double.IsFinite(uncertainty) || uncertainty <= 0)
        {
            return $"{Format(value, unit)} ± {FormatUncertainty(uncertainty, unit)}";
        }

        var place = UncertaintyPlace(uncertainty);
        var valueText = Math.Abs(Times10(value, -place)) >= 1e15
            ? Format(value, unit, MaximumDigits)
            : Render(Scale(value, place), place, unit, zeroPrefixPlace: place + 1);
        return $"{valueText} ± {Render(Scale(uncertainty, place), place, unit, zeroPrefixPlace: place)}";
    }

    /// <summary>Formats a value with its expanded uncertainty and coverage factor (<c>100.02147 g ± 0.79 mg (k = 2.26)</c>, GUM 7.2.4).</summary>
    public static string FormatExpanded(double value, double expandedUncertainty, double coverageFactor, SiUnit unit) =>
        $"{Format(value, expandedUncertainty, unit)} (k = {FormatCoverageFactor(coverageFactor)})";

    /// <summary>Formats an uncertainty on its own to two significant digits (<c>28 kHz</c>).</summary>
    public static string FormatUncertainty(double uncertainty, SiUnit unit)
    {
        if (!double.IsFinite(uncertainty))
        {
            return NotFinite(uncertainty, unit);
        }

        if (uncertainty == 0)
        {
            return Join("0", string.Empty, unit);
        }

        var place = UncertaintyPlace(Math.Abs(uncertainty));
        return Render(Scale(uncertainty, place), place, unit, zeroPrefixPlace: place);
    }

    /// <summary>Formats a reading as a meter with step <paramref name="resolution"/> would show it (<c>5.451 mA</c> at 1 µA).</summary>
    public static string FormatAtResolution(double value, double resolution, SiUnit unit)
    {
        if (!double.IsFinite(value))
        {
            return NotFinite(value, unit);
        }

        if (!double.IsFinite(resolution) || resolution < 1e-300)
        {
            return Format(value, unit);
        }

        // The resolution is q·10^place with a small integer q (1, 2, 5, 25 …); the reading is a whole number of steps.
        var place = (int)Math.Floor(Math.Log10(resolution));
        var q = 1L;
        for (var p = place; p >= place - 3; p--)
        {
            var steps = resolution / Pow10(p);
            if (Math.Abs(steps - Math.Round(steps)) <= 1e-6 * steps)
            {
                place = p;
                q = (long)Math.Round(steps);
                break;
            }
        }

        var counts = Math.Round(value / (q * Pow10(place)), MidpointRounding.AwayFromZero);
        if (Math.Abs(counts * q) >= 1e15)
        {
            return Format(value, unit, MaximumDigits);
        }

        return Render((long)counts * q, place, unit, zeroPrefixPlace: place);
    }

    /// <summary>Formats a fraction as a percentage to at most <paramref name="significant"/> digits (<c>80 %</c>, <c>+0.026 %</c> when
    /// <paramref name="showSign"/>), so that limits and changes read like every other number the tool prints.</summary>
    public static string FormatPercent(double fraction, int significant = 3, bool showSign = false)
    {
        var text = Format(fraction * 100, SiUnit.None, significant);
        return (showSign && fraction > 0 && text != "0" ? "+" + text : text) + " %";
    }

    /// <summary>A coverage factor as printed beside an expanded uncertainty: two decimals, as JCGM 100 Table G.2 gives it.</summary>
    public static string FormatCoverageFactor(double coverageFactor) =>
        double.IsFinite(coverageFactor) ? coverageFactor.ToString("0.00", CultureInfo.InvariantCulture) : "∞";

    /// <summary>The symbol of <paramref name="unit"/> (<c>Ω</c>, <c>°C</c>; empty for a plain number).</summary>
    public static string Symbol(SiUnit unit) => unit switch
    {
        SiUnit.Ampere => "A",
        SiUnit.Volt => "V",
        SiUnit.Ohm => "Ω",
        SiUnit.Second => "s",
        SiUnit.Watt => "W",
        SiUnit.Hertz => "Hz",
        SiUnit.Kelvin => "K",
        SiUnit.Celsius => "°C",
        _ => string.Empty,
    };

    /// <summary>The decimal place (power of ten) of the second significant digit of <paramref name="uncertainty"/> once rounded.</summary>
    private static int UncertaintyPlace(double uncertainty)
    {
        var place = (int)Math.Floor(Math.Log10(uncertainty)) - 1;
        return Math.Abs(Scale(uncertainty, place)) >= 100 ? place + 1 : place;
    }

    /// <summary>value / 10^place rounded to a whole number (half away from zero), held exactly as digits.</summary>
    private static long Scale(double value, int place)
    {
        var scaled = Math.Round(Times10(value, -place), MidpointRounding.AwayFromZero);
        return Math.Abs(scaled) < 1e17 ? (long)scaled : throw new OverflowException($"{value} has too many digits to print at 1e{place}.");
    }

    private static double Pow10(int exponent) => Math.Pow(10, exponent);

    /// <summary>value·10^exponent in steps a double can hold, so that a value near the ends of its range (1e-306 at 1e-309) does not pass through infinity.</summary>
    private static double Times10(double value, int exponent)
    {
        while (exponent > 300)
        {
            value *= 1e300;
            exponent -= 300;
        }

        while (exponent < -300)
        {
            value /= 1e300;
            exponent += 300;
        }

        return exponent >= 0 ? value * Pow10(exponent) : value / Pow10(-exponent);
    }

    /// <summary>Prints digits·10^place with the engineering prefix of its magnitude; a zero takes the prefix of <paramref name="zeroPrefixPlace"/>.</summary>
    private static string Render(long digits, int place, SiUnit unit, int zeroPrefixPlace)
    {
        // Keep at most 15 digits: a double carries no more.
        while (Math.Abs(digits) >= 1_000_000_000_000_000L)
        {
            digits = (long)Math.Round(digits / 10.0, MidpointRounding.AwayFromZero);
            place++;
        }

        var magnitude = digits == 0 ? zeroPrefixPlace : place + DigitCount(digits) - 1;
        var (lowest, highest, plain) = PrefixRange(unit);
        if (digits != 0 && (magnitude < plain.Low || magnitude > plain.High))
        {
            return Join(Exponent(digits, magnitude), string.Empty, unit);
        }

        var exponent = Math.Clamp(FloorDiv(magnitude, 3) * 3, lowest, highest);
        return Join(Fixed(digits, place - exponent), Prefix(exponent), unit);
    }

    /// <summary>The prefix exponents a unit may take and the magnitudes printed without an exponent.</summary>
    private static (int Lowest, int Highest, (int Low, int High) Plain) PrefixRange(SiUnit unit) => unit switch
    {
        SiUnit.None => (0, 0, (-4, 8)),
        SiUnit.Celsius => (0, 0, (-15, 14)),
        SiUnit.Second => (-15, 0, (-15, 14)),
        _ => (-15, 12, (-15, 14)),
    };

    /// <summary>digits·10^shift as a fixed-point numeral (shift below zero puts a decimal point in).</summary>
    private static string Fixed(long digits, int shift)
    {
        var text = new StringBuilder(Math.Abs(digits).ToString(CultureInfo.InvariantCulture));
        if (shift >= 0)
        {
            text.Append('0', digits == 0 ? 0 : shift);
        }
        else
        {
            var decimals = -shift;
            if (text.Length <= decimals)
            {
                text.Insert(0, "0", decimals - text.Length + 1);
            }

            text.Insert(text.Length - decimals, '.');
        }

        return digits < 0 ? "-" + text : text.ToString();
    }

    private static string Exponent(long digits, int magnitude)
    {
        var mantissa = Fixed(digits, -(DigitCount(digits) - 1));
        return $"{mantissa}e{magnitude.ToString(CultureInfo.InvariantCulture)}";
    }

    private static int DigitCount(long digits) => Math.Abs(digits).ToString(CultureInfo.InvariantCulture).Length;

    private static int FloorDiv(int a, int b) => (int)Math.Floor(a / (double)b);

    private static string Prefix(int exponent) => exponent switch
    {
        12 => "T",
        9 => "G",
        6 => "M",
        3 => "k",
        -3 => "m",
        -6 => "µ",
        -9 => "n",
        -12 => "p",
        -15 => "f",
        _ => string.Empty,
    };

    private static string Join(string number, string prefix, SiUnit unit)
    {
        var symbol = Symbol(unit);
        return prefix.Length + symbol.Length == 0 ? number : $"{number} {prefix}{symbol}";
    }

    private static string NotFinite(double value, SiUnit unit) =>
        double.IsNaN(value) ? "—" : Join(value > 0 ? "∞" : "-∞", string.Empty, unit);
}

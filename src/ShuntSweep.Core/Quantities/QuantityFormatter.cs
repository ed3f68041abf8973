using System.Globalization;

namespace ShuntSweep.Core.Quantities;

/// <summary>Formats SI values with an engineering prefix for people (<c>12.3 mA</c>); files keep plain SI numbers.</summary>
public static class QuantityFormatter
{
    private static readonly (double Factor, string Prefix)[] Steps =
    [
        (1e9, "G"), (1e6, "M"), (1e3, "k"), (1, ""), (1e-3, "m"), (1e-6, "µ"), (1e-9, "n"), (1e-12, "p"),
    ];

    /// <summary>Formats <paramref name="value"/> (in the coherent SI unit) with a prefix and <paramref name="significant"/> digits.</summary>
    public static string Format(double value, SiUnit unit, int significant = 4)
    {
        var symbol = unit switch
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
        if (!double.IsFinite(value))
        {
            return $"{value.ToString(CultureInfo.InvariantCulture)} {symbol}".TrimEnd();
        }

        if (value == 0 || unit == SiUnit.Celsius)
        {
            return $"{value.ToString("G" + significant, CultureInfo.InvariantCulture)} {symbol}".TrimEnd();
        }

        var magnitude = Math.Abs(value);
        foreach (var (factor, prefix) in Steps)
        {
            if (magnitude >= factor * 0.9995)
            {
                return $"{(value / factor).ToString("G" + significant, CultureInfo.InvariantCulture)} {prefix}{symbol}".TrimEnd();
            }
        }

        return $"{(value / 1e-12).ToString("G" + significant, CultureInfo.InvariantCulture)} p{symbol}";
    }
}

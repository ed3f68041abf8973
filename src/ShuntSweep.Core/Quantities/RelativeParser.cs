using System.Globalization;

namespace ShuntSweep.Core.Quantities;

/// <summary>Reads a relative amount written with its unit, <c>1 %</c> or <c>500 ppm</c>; a bare number is refused because it could mean a
/// fraction, a percentage or parts per million.</summary>
public static class RelativeParser
{
    /// <summary>Whether <paramref name="text"/> ends in a relative unit (<c>%</c> or <c>ppm</c>), so that callers accepting either a relative or an
    /// absolute amount know which it is.</summary>
    public static bool IsRelative(string text) =>
        text is not null && (text.TrimEnd().EndsWith('%') || text.TrimEnd().EndsWith("ppm", StringComparison.OrdinalIgnoreCase));

    /// <summary>The fraction that <paramref name="text"/> stands for (<c>1 %</c> is 0.01, <c>500 ppm</c> is 0.0005); <paramref name="what"/> names the
    /// value in the message.</summary>
    /// <exception cref="FormatException">When the text is a bare number, has another unit, or is not positive and finite.</exception>
    public static double ParsePositiveFraction(string text, string what)
    {
        ArgumentNullException.ThrowIfNull(text);
        var t = text.Trim();
        var (number, scale) = t.EndsWith('%') ? (t[..^1], 1e-2)
            : t.EndsWith("ppm", StringComparison.OrdinalIgnoreCase) ? (t[..^3], 1e-6)
            : (null, 0.0);
        if (number is null)
        {
            throw new FormatException(double.TryParse(t, NumberStyles.Float, CultureInfo.InvariantCulture, out var bare)
                ? $"{what} '{text}' has no unit and is ambiguous: write {Show(bare)} % or {Show(bare)} ppm (or {Show(bare * 100)} % if you meant a fraction)."
                : $"{what} '{text}': expected a positive amount with its unit, such as 1 % or 500 ppm.");
        }

        return double.TryParse(number.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && v > 0 && double.IsFinite(v)
            ? v * scale
            : throw new FormatException($"{what} '{text}': expected a positive amount with its unit, such as 1 % or 500 ppm.");
    }

    private static string Show(double v) => v.ToString("0.######", CultureInfo.InvariantCulture);
}

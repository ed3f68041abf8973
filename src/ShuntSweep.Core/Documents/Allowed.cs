using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Core.Documents;

/// <summary>The values a quantity in a file may take, with the words an error message uses for them (<c>≥ 0 Ω</c>, <c>from 0 % to 100 %</c>).</summary>
/// <param name="Min">The lowest allowed value (SI).</param>
/// <param name="Max">The highest allowed value (SI).</param>
/// <param name="AboveMin">True when <paramref name="Min"/> itself is not allowed.</param>
/// <param name="Text">The allowed range in words.</param>
public readonly record struct Allowed(double Min, double Max, bool AboveMin, string Text)
{
    /// <summary>Zero or more: resistances, times, noise levels.</summary>
    public static Allowed NonNegative(SiUnit unit) => new(0, double.PositiveInfinity, false, $"≥ {QuantityFormatter.Format(0, unit)}");

    /// <summary>Strictly above zero: resolutions, full scales, time constants.</summary>
    public static Allowed Positive(SiUnit unit) => new(0, double.PositiveInfinity, true, $"> {QuantityFormatter.Format(0, unit)}");

    /// <summary>From <paramref name="min"/> to <paramref name="max"/>, both included.</summary>
    public static Allowed Between(double min, double max, SiUnit unit) =>
        new(min, max, false, $"from {QuantityFormatter.Format(min, unit)} to {QuantityFormatter.Format(max, unit)}");

    /// <summary>Above zero and at most <paramref name="max"/>.</summary>
    public static Allowed UpTo(double max, SiUnit unit) =>
        new(0, max, true, $"above {QuantityFormatter.Format(0, unit)} and at most {QuantityFormatter.Format(max, unit)}");

    /// <summary>A percentage above 0 % and at most <paramref name="maxPercent"/> %.</summary>
    public static Allowed Percent(double maxPercent) =>
        new(0, maxPercent / 100, true, $"above 0 % and at most {maxPercent.ToString(System.Globalization.CultureInfo.InvariantCulture)} %");

    /// <summary>A temperature above absolute zero (−273.15 °C).</summary>
    public static Allowed Temperature => new(-273.15, double.PositiveInfinity, true, "above absolute zero (−273.15 °C)");

    /// <summary>True when <paramref name="value"/> is a finite number in the range.</summary>
    public bool Contains(double value) =>
        double.IsFinite(value) && (AboveMin ? value > Min : value >= Min) && value <= Max;
}

using System.Globalization;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Reporting.Archive;

/// <summary>How far a range's resistance may move from its first archived value before <c>history</c> flags it.</summary>
/// <param name="Fraction">The allowed change as a fraction of the first value (0.01 = 1 %), used when <paramref name="AbsoluteOhms"/> is null.</param>
/// <param name="AbsoluteOhms">The allowed change in ohms, when the limit was stated as a resistance.</param>
public sealed record DriftLimit(double Fraction, double? AbsoluteOhms = null)
{
    /// <summary>The default limit: 1 % of the first archived value.</summary>
    public static DriftLimit Default { get; } = new(0.01);

    /// <summary>Parses <c>0.5 %</c> or <c>500 ppm</c> (a fraction of the first value) or a resistance such as <c>2 mΩ</c> / <c>2 mohm</c>;
    /// a bare number is refused as ambiguous.</summary>
    /// <exception cref="FormatException">When the text is neither, or not positive.</exception>
    public static DriftLimit Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var t = text.Trim();
        if (RelativeParser.IsRelative(t))
        {
            return new DriftLimit(RelativeParser.ParsePositiveFraction(t, "Drift limit"));
        }

        if (double.TryParse(t, NumberStyles.Float, CultureInfo.InvariantCulture, out _))
        {
            throw new FormatException($"Drift limit '{text}' has no unit and is ambiguous: write a percentage (0.5 %), ppm (500 ppm) or a resistance (2 mohm).");
        }

        double ohms;
        try
        {
            ohms = QuantityParser.Parse(t, SiUnit.Ohm);
        }
        catch (FormatException e)
        {
            throw new FormatException($"Drift limit '{text}': expected a positive percentage such as 0.5% or a resistance such as 2 mohm ({e.Message}).", e);
        }

        return ohms > 0 ? new DriftLimit(double.NaN, ohms) : throw new FormatException($"Drift limit '{text}': the resistance must be positive.");
    }

    /// <summary>The allowed change from a first value of <paramref name="baselineOhms"/>.</summary>
    public double Allowed(double baselineOhms) => AbsoluteOhms ?? Fraction * Math.Abs(baselineOhms);

    /// <summary>The limit in words, for tables and plots.</summary>
    public override string ToString() => AbsoluteOhms is { } a
        ? $"±{QuantityFormatter.Format(a, SiUnit.Ohm, 3)} from the first run"
        : $"±{QuantityFormatter.FormatPercent(Fraction)} of the first run";
}

/// <summary>One reading of a range compared with the range's first archived reading.</summary>
/// <param name="Reading">The archived reading.</param>
/// <param name="ChangeOhms">Its resistance minus the first reading's.</param>
/// <param name="ChangeFraction">That change over the first reading's resistance.</param>
/// <param name="BeyondLimit">Whether |change| exceeds the limit.</param>
public sealed record DriftPoint(RangeReading Reading, double ChangeOhms, double ChangeFraction, bool BeyondLimit);

/// <summary>Compares each range's archived resistances with its first one.</summary>
public static class Drift
{
    /// <summary>Each reading of <paramref name="range"/> against its first finite reading; readings before that have NaN change.</summary>
    public static IReadOnlyList<DriftPoint> Assess(RangeHistory range, DriftLimit limit)
    {
        ArgumentNullException.ThrowIfNull(range);
        ArgumentNullException.ThrowIfNull(limit);
        var baseline = range.Readings.FirstOrDefault(r => double.IsFinite(r.ResistanceOhms))?.ResistanceOhms ?? double.NaN;
        return range.Readings.Select(r =>
        {
            var change = r.ResistanceOhms - baseline;
            return new DriftPoint(r, change, baseline != 0 ? change / baseline : double.NaN, Math.Abs(change) > limit.Allowed(baseline));
        }).ToList();
    }
}

using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Core.Uut;

/// <summary>What the specification says about a current meter under test: its identity, its input jacks and its current ranges.</summary>
public sealed record UutDescription(
    string Manufacturer,
    string Model,
    string Serial,
    string? AssetId,
    IReadOnlyList<JackSpec> Jacks,
    IReadOnlyList<RangeSpec> Ranges)
{
    /// <summary>The range called <paramref name="name"/>; throws when the UUT has no such range.</summary>
    public RangeSpec Range(string name) =>
        Ranges.FirstOrDefault(r => r.Name == name)
        ?? throw new KeyNotFoundException($"The UUT has no range '{name}'; it has {string.Join(", ", Ranges.Select(r => r.Name))}.");

    /// <summary>The jack called <paramref name="name"/>.</summary>
    public JackSpec Jack(string name) =>
        Jacks.FirstOrDefault(j => j.Name == name)
        ?? throw new KeyNotFoundException($"The UUT has no jack '{name}'; it has {string.Join(", ", Jacks.Select(j => j.Name))}.");
}

/// <summary>An input jack of the UUT and the fuse that protects it.</summary>
/// <param name="Name">The jack's marking, for example <c>mA</c> or <c>10A</c>.</param>
/// <param name="FuseRating">The rated current of the jack's fuse; no setpoint may exceed it (after derating).</param>
/// <param name="Category">The measurement category and voltage marked on the jack, for the safety notes (for example <c>CAT II 600 V</c>).</param>
public sealed record JackSpec(string Name, Current FuseRating, string? Category);

/// <summary>A current range of the UUT as its specification states it.</summary>
/// <param name="Name">The range's name, for example <c>60mA</c>.</param>
/// <param name="Jack">The jack the range is measured through.</param>
/// <param name="FullScale">The full-scale current of the range.</param>
/// <param name="Resolution">The smallest step of the reading (one count).</param>
/// <param name="NominalShunt">The shunt resistance the design calls for, when known.</param>
/// <param name="Accuracy">The reading accuracy, ±(% of reading + counts).</param>
/// <param name="BurdenAtFullScale">The specified maximum burden voltage at full scale, when stated.</param>
/// <param name="OverRange">How far above full scale the reading goes before it shows overload, as a fraction (0.1 = 10 %).</param>
/// <param name="BurdenLimit">An optional limit curve of drop against current (corner points, rising current), for judging every measured point
/// and not only full scale.</param>
public sealed record RangeSpec(
    string Name,
    string Jack,
    Current FullScale,
    Current Resolution,
    Resistance? NominalShunt,
    AccuracySpec Accuracy,
    Voltage? BurdenAtFullScale,
    double OverRange,
    IReadOnlyList<BurdenLimitPoint>? BurdenLimit = null);

/// <summary>One corner of a range's burden limit curve: at <paramref name="Current"/> the drop may be at most <paramref name="Drop"/>;
/// between corners the limit is interpolated linearly.</summary>
/// <param name="Current">The current of the corner (magnitude).</param>
/// <param name="Drop">The largest drop allowed there.</param>
public sealed record BurdenLimitPoint(Current Current, Voltage Drop)
{
    /// <summary>The limit at |<paramref name="amperes"/>| interpolated between the corners of <paramref name="curve"/>; NaN outside the curve's span.</summary>
    public static double LimitAt(IReadOnlyList<BurdenLimitPoint> curve, double amperes)
    {
        ArgumentNullException.ThrowIfNull(curve);
        var a = Math.Abs(amperes);
        for (var i = 0; i + 1 < curve.Count; i++)
        {
            var (i0, i1) = (curve[i].Current.Amperes, curve[i + 1].Current.Amperes);
            if (a >= i0 && a <= i1)
            {
                var t = i1 > i0 ? (a - i0) / (i1 - i0) : 0;
                return curve[i].Drop.Volts + (t * (curve[i + 1].Drop.Volts - curve[i].Drop.Volts));
            }
        }

        return curve.Count == 1 && a == curve[0].Current.Amperes ? curve[0].Drop.Volts : double.NaN;
    }
}

/// <summary>A reading accuracy of the usual form ±(% of reading + counts).</summary>
/// <param name="FractionOfReading">The reading part as a fraction (0.005 for 0.5 %).</param>
/// <param name="Counts">The number of counts (least significant digits) added.</param>
public sealed record AccuracySpec(double FractionOfReading, int Counts)
{
    /// <summary>The half-width of the accuracy interval for <paramref name="reading"/> on a range of <paramref name="resolution"/>.</summary>
    public Current Limit(Current reading, Current resolution) =>
        new((FractionOfReading * Math.Abs(reading.Amperes)) + (Counts * resolution.Amperes));
}

using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Engine.Sequences;

namespace ShuntSweep.Engine.Planning;

/// <summary>The supply's limits while the loop runs through one jack: a second line of defence behind the load's setpoint.</summary>
/// <param name="Jack">The UUT jack.</param>
/// <param name="CurrentLimit">The supply's current limit while the loop runs through the jack.</param>
/// <param name="FuseRating">The jack's fuse rating.</param>
/// <param name="Derating">The sequence's fuse derating (a fraction).</param>
/// <param name="LargestPlanned">The largest current the plan sets through the jack.</param>
public sealed record JackProtection(string Jack, Current CurrentLimit, Current FuseRating, double Derating, Current LargestPlanned);

/// <summary>Works out the supply's protection from the plan: a current limit per jack and an over-voltage level for the whole run.</summary>
/// <remarks>
/// If the load misbehaves (a wrong setpoint, a fault, a short) the supply's limit is what is left between its full current and the fuse,
/// so it is set to the largest planned current plus a margin, and never above the derated fuse rating or the bench's own limit.
/// </remarks>
public static class SupplyProtection
{
    /// <summary>The margin above the largest planned current, so that the supply never limits a planned point.</summary>
    public const double Margin = 0.10;

    /// <summary>The protection of every jack the plan runs current through, in the order the plan first uses them.</summary>
    public static IReadOnlyList<JackProtection> ForJacks(RunPlan plan, Sequence sequence, BenchDescription bench)
    {
        ArgumentNullException.ThrowIfNull(plan);
        ArgumentNullException.ThrowIfNull(sequence);
        ArgumentNullException.ThrowIfNull(bench);
        var derating = sequence.Limits.FuseDerating;
        return plan.Steps.OfType<CurrentStep>()
            .GroupBy(s => s.Jack)
            .Select(g =>
            {
                var largest = g.SelectMany(Currents).DefaultIfEmpty(0).Max();
                var fuse = bench.Uut.Jack(g.Key).FuseRating;
                var limit = Math.Min(
                    Math.Min(bench.Supply.CurrentLimit.Amperes, fuse.Amperes * derating),
                    Math.Max(largest * (1 + Margin), largest + 1e-3));
                return new JackProtection(g.Key, new Current(limit), fuse, derating, new Current(largest));
            })
            .ToList();
    }

    /// <summary>The over-voltage protection level: the bench's supply voltage plus 10 % and at least 0.5 V, so that a wrong voltage command cannot drive the loop.</summary>
    public static Voltage OverVoltage(BenchDescription bench)
    {
        ArgumentNullException.ThrowIfNull(bench);
        var v = bench.Supply.Voltage.Volts;
        return new Voltage(v + Math.Max(0.1 * v, 0.5));
    }

    private static IEnumerable<double> Currents(CurrentStep step) => step switch
    {
        MeasureStep m => [Math.Abs(m.Setpoint.Amperes)],
        HoldStep h => [Math.Abs(h.Setpoint.Amperes)],
        RampStep r => [Math.Abs(r.From.Amperes), Math.Abs(r.To.Amperes)],
        _ => [],
    };
}

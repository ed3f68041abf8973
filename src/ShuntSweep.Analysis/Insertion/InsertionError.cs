using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Analysis.Insertion;

/// <summary>What inserting the UUT on one range does to a circuit.</summary>
/// <param name="Range">The range.</param>
/// <param name="CurrentA">The current that flows with the UUT inserted, with its standard uncertainty from the fitted curve.</param>
/// <param name="ReadingA">What the UUT shows (the current through it); NaN when it shows overload.</param>
/// <param name="ErrorA">Reading minus the undisturbed current.</param>
/// <param name="RelativeError">ErrorA over the undisturbed current.</param>
/// <param name="DropVolts">The burden voltage across the UUT.</param>
/// <param name="VoltsLeft">The source voltage left for the circuit (source volts − drop).</param>
/// <param name="BelowMinimum">Whether the voltage left is below the circuit's stated minimum.</param>
/// <param name="Overload">Whether the current is beyond the range's full scale or the reading's limit.</param>
/// <param name="Extrapolated">Whether the current is beyond the largest current the curve was fitted to.</param>
public sealed record InsertionPrediction(
    string Range,
    Estimate CurrentA,
    double ReadingA,
    double ErrorA,
    double RelativeError,
    double DropVolts,
    double VoltsLeft,
    bool BelowMinimum,
    bool Overload,
    bool Extrapolated);

/// <summary>The insertion error of every examined range in one circuit, and the range recommended for it.</summary>
/// <param name="SourceVolts">The Thevenin (or rail) voltage.</param>
/// <param name="SourceOhms">The Thevenin resistance (or the circuit's own resistance on a rail).</param>
/// <param name="MinimumVolts">The circuit's minimum operating voltage, when given.</param>
/// <param name="UndisturbedCurrentA">V/R, the current without the UUT.</param>
/// <param name="Ranges">One prediction per examined range.</param>
/// <param name="Recommended">The recommended range, or null when none is usable.</param>
/// <param name="Reason">Why that range (or none) was recommended.</param>
public sealed record InsertionReport(
    double SourceVolts,
    double SourceOhms,
    double? MinimumVolts,
    double UndisturbedCurrentA,
    IReadOnlyList<InsertionPrediction> Ranges,
    string? Recommended,
    string Reason);

/// <summary>A reading taken in a known circuit, corrected back to the current that flows without the UUT.</summary>
/// <param name="Range">The range the reading was taken on.</param>
/// <param name="ReadingA">The reading.</param>
/// <param name="SourceOhms">The circuit's Thevenin resistance.</param>
/// <param name="DropVolts">The burden voltage at the reading, from the fitted curve.</param>
/// <param name="UndisturbedCurrentA">I + V_b(I)/R, with its standard uncertainty from the fitted curve.</param>
/// <param name="CorrectionA">What was added to the reading.</param>
/// <param name="Extrapolated">Whether the reading is beyond the largest current the curve was fitted to.</param>
public sealed record CorrectionResult(string Range, double ReadingA, double SourceOhms, double DropVolts, Estimate UndisturbedCurrentA, double CorrectionA, bool Extrapolated);

/// <summary>Predicts the insertion error of the characterised UUT in a user's circuit, and corrects readings for it.</summary>
public static class InsertionError
{
    /// <summary>Solves V = I·R + V_b(I) on each range's fitted curve (Brent's method) for a Thevenin source (V, R).</summary>
    /// <param name="result">The characterisation.</param>
    /// <param name="sourceVolts">The Thevenin voltage (or the rail voltage).</param>
    /// <param name="sourceOhms">The Thevenin resistance (or, on a rail, the circuit's resistance V/I); must be above zero.</param>
    /// <param name="range">One range to examine, or null for every range.</param>
    /// <param name="minimumVolts">The circuit's minimum operating voltage; ranges leaving less are flagged.</param>
    /// <exception cref="ArgumentException">On a non-finite voltage, a resistance not above zero, or a negative minimum.</exception>
    public static InsertionReport Predict(CharacterisationResult result, double sourceVolts, double sourceOhms, string? range = null, double? minimumVolts = null)
    {
        ArgumentNullException.ThrowIfNull(result);
        if (!double.IsFinite(sourceVolts))
        {
            throw new ArgumentException("The source voltage must be a finite number.");
        }

        if (!(sourceOhms > 0) || !double.IsFinite(sourceOhms))
        {
            throw new ArgumentException($"The source resistance must be above zero (got {sourceOhms:G6} Ω): the undisturbed current V/R must exist.");
        }

        if (minimumVolts is { } mv && (!double.IsFinite(mv) || mv < 0))
        {
            throw new ArgumentException("The minimum voltage must be zero or more.");
        }

        var undisturbed = sourceVolts / sourceOhms;
        var ranges = range is null ? result.Ranges : [result.Range(range)];
        var predictions = ranges.Select(r => PredictOne(DropCurve.For(r, result.DiodeTemperatureK), sourceVolts, sourceOhms, undisturbed, minimumVolts)).ToList();
        var (recommended, reason) = Recommend(predictions, minimumVolts);
        return new InsertionReport(sourceVolts, sourceOhms, minimumVolts, undisturbed, predictions, recommended, reason);
    }

    /// <summary>Corrects a reading taken on <paramref name="range"/> in a circuit of Thevenin resistance R: I₀ = I + V_b(I)/R.</summary>
    /// <exception cref="ArgumentException">On a non-finite reading or a resistance not above zero.</exception>
    public static CorrectionResult Correct(CharacterisationResult result, string range, double readingA, double sourceOhms)
    {
        ArgumentNullException.ThrowIfNull(result);
        if (!double.IsFinite(readingA))
        {
            throw new ArgumentException("The reading must be a finite number of amperes.");
        }

        if (!(sourceOhms > 0) || !double.IsFinite(sourceOhms))
        {
            throw new ArgumentException($"The source resistance must be above zero (got {sourceOhms:G6} Ω).");
        }

        var curve = DropCurve.For(result, range);
        var drop = curve.Drop(readingA);
        var correction = drop / sourceOhms;
        return new CorrectionResult(
            range,
            readingA,
            sourceOhms,
            drop,
            new Estimate(readingA + correction, curve.DropUncertainty(readingA) / sourceOhms),
            correction,
            Math.Abs(readingA) > curve.Range.FittedUpToA);
    }

    private static InsertionPrediction PredictOne(DropCurve curve, double volts, double ohms, double undisturbed, double? minimumVolts)
    {
        double G(double i) => (i * ohms) + curve.Drop(i) - volts;
        var current = Solve(G, undisturbed);
        var drop = curve.Drop(current);
        var u = curve.DropUncertainty(current) / Math.Abs(ohms + curve.Slope(current));
        var r = curve.Range;
        var limit = double.IsFinite(r.ReadingLimitA) ? Math.Min(r.ReadingLimitA, r.FullScaleA) : r.FullScaleA;
        var overload = Math.Abs(current) > limit * (1 + 1e-9);
        var reading = overload ? double.NaN : current;
        var left = volts - drop;
        return new InsertionPrediction(
            r.Name,
            new Estimate(current, u),
            reading,
            current - undisturbed,
            undisturbed != 0 ? (current - undisturbed) / undisturbed : double.NaN,
            drop,
            left,
            minimumVolts is { } mv && left < mv,
            overload,
            Math.Abs(current) > r.FittedUpToA);
    }

    private static double Solve(Func<double, double> g, double undisturbed)
    {
        if (undisturbed == 0)
        {
            undisturbed = 1e-12;
        }

        // g is increasing in I (source resistance plus a non-decreasing drop): widen [0, V/R] until it brackets the root.
        var a = 0.0;
        var b = undisturbed;
        for (var k = 0; k < 60 && Math.Sign(g(a)) == Math.Sign(g(b)); k++)
        {
            a -= undisturbed * (1 << Math.Min(k, 20));
            b += undisturbed * (1 << Math.Min(k, 20));
        }

        if (Math.Sign(g(a)) == Math.Sign(g(b)))
        {
            throw new ArgumentException("No current satisfies V = I·R + V_b(I) on this range's curve; the circuit is outside what the fit describes.");
        }

        return RootFinder.Brent(g, a, b);
    }

    private static (string? Range, string Reason) Recommend(IReadOnlyList<InsertionPrediction> predictions, double? minimumVolts)
    {
        var inRange = predictions.Where(p => !p.Overload).ToList();
        if (inRange.Count == 0)
        {
            return (null, "every examined range would overload at this current");
        }

        var usable = inRange.Where(p => !p.BelowMinimum).ToList();
        if (usable.Count == 0)
        {
            return (null, $"no range leaves the circuit its minimum of {minimumVolts:0.###} V");
        }

        var best = usable.OrderBy(p => Math.Abs(p.ErrorA)).First();
        return (best.Range, minimumVolts is null
            ? "smallest insertion error among the ranges that do not overload"
            : "smallest insertion error among the ranges that do not overload and leave the circuit its minimum voltage");
    }
}

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
/// <param name="TotalErrorA">What a user would see at worst: |insertion error| + the meter's specification at the reading + half a
/// count of resolution (NaN when the result carries no specification).</param>
/// <param name="ReadingResolutionA">The range's display resolution, at which the reading is printed (NaN when unknown).</param>
/// <param name="Reason">Why the range could not be computed (<c>not valid beyond …</c>); null when it was.</param>
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
    bool Extrapolated,
    double TotalErrorA = double.NaN,
    double ReadingResolutionA = double.NaN,
    string? Reason = null);

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
/// <param name="Budget">The budget of the undisturbed current: the reading's specification and resolution, the source resistance's
/// uncertainty and the range's fitted curve; null when the reading is beyond the curve's validity.</param>
/// <param name="Reason">Why no correction could be made (<c>not valid beyond …</c>); null when it was.</param>
public sealed record CorrectionResult(
    string Range,
    double ReadingA,
    double SourceOhms,
    double DropVolts,
    Estimate UndisturbedCurrentA,
    double CorrectionA,
    bool Extrapolated,
    Uncertainty.GumBudget? Budget = null,
    string? Reason = null);

/// <summary>Predicts the insertion error of the characterised UUT in a user's circuit, and corrects readings for it.</summary>
public static class InsertionError
{
    /// <summary>Solves V = I·R + V_b(I) on each range's fitted curve (Brent's method) for a Thevenin source (V, R).</summary>
    /// <param name="result">The characterisation.</param>
    /// <param name="sourceVolts">The Thevenin voltage (or the rail voltage).</param>
    /// <param name="sourceOhms">The Thevenin resistance (or, on a rail, the circuit's resistance V/I); must be above zero.</param>
    /// <param name="range">One range to examine, or null for every range.</param>
    /// <param name="minimumVolts">The circuit's minimum operating voltage; ranges leaving less are flagged.</param>
    /// <param name="offsetInCircuit">Whether the fitted offset is a real voltage in the circuit; by default it is the voltmeter's zero and left out.</param>
    /// <exception cref="ArgumentException">On a non-finite voltage, a resistance not above zero, or a negative minimum.</exception>
    public static InsertionReport Predict(CharacterisationResult result, double sourceVolts, double sourceOhms, string? range = null, double? minimumVolts = null, bool offsetInCircuit = false)
    {
        ArgumentNullException.ThrowIfNull(result);
        if (!double.IsFinite(sourceVolts))
        {
            throw new ArgumentException("The source voltage must be a finite number.");
        }

        if (!(sourceOhms > 0) || !double.IsFinite(sourceOhms))
        {
            throw new ArgumentException($"The source resistance must be above zero (got {Core.Quantities.QuantityFormatter.Format(sourceOhms, Core.Quantities.SiUnit.Ohm)}): the undisturbed current V/R must exist.");
        }

        if (minimumVolts is { } mv && (!double.IsFinite(mv) || mv < 0))
        {
            throw new ArgumentException("The minimum voltage must be zero or more.");
        }

        var undisturbed = sourceVolts / sourceOhms;
        var ranges = range is null ? result.Ranges : [result.Range(range)];
        var predictions = ranges.Select(r => PredictOne(DropCurve.For(r, result.DiodeTemperatureK, offsetInCircuit), sourceVolts, sourceOhms, undisturbed, minimumVolts)).ToList();
        var (recommended, reason) = Recommend(predictions, minimumVolts);
        return new InsertionReport(sourceVolts, sourceOhms, minimumVolts, undisturbed, predictions, recommended, reason);
    }

    /// <summary>Corrects a reading taken on <paramref name="range"/> in a circuit of Thevenin resistance R: I₀ = I + V_b(I)/R, with
    /// the reading's specification and resolution, the source resistance's uncertainty and the fitted curve in its budget.</summary>
    /// <param name="result">The characterisation.</param>
    /// <param name="range">The range the reading was taken on.</param>
    /// <param name="readingA">The reading.</param>
    /// <param name="sourceOhms">The circuit's Thevenin resistance.</param>
    /// <param name="sourceOhmsUncertainty">The standard uncertainty of the source resistance (0 when taken as exact).</param>
    /// <param name="offsetInCircuit">Whether the fitted offset is a real voltage in the circuit (by default the voltmeter's zero).</param>
    /// <exception cref="ArgumentException">On a non-finite reading or a resistance not above zero.</exception>
    public static CorrectionResult Correct(CharacterisationResult result, string range, double readingA, double sourceOhms, double sourceOhmsUncertainty = 0, bool offsetInCircuit = false)
    {
        ArgumentNullException.ThrowIfNull(result);
        if (!double.IsFinite(readingA))
        {
            throw new ArgumentException("The reading must be a finite number of amperes.");
        }

        if (!(sourceOhms > 0) || !double.IsFinite(sourceOhms))
        {
            throw new ArgumentException($"The source resistance must be above zero (got {Core.Quantities.QuantityFormatter.Format(sourceOhms, Core.Quantities.SiUnit.Ohm)}).");
        }

        if (!(sourceOhmsUncertainty >= 0) || !double.IsFinite(sourceOhmsUncertainty))
        {
            throw new ArgumentException("The source resistance's uncertainty must be zero or more.");
        }

        var curve = DropCurve.For(result.Range(range), result.DiodeTemperatureK, offsetInCircuit);
        var drop = curve.Drop(readingA);
        var extrapolated = Math.Abs(readingA) > curve.Range.FittedUpToA;
        if (!double.IsFinite(drop))
        {
            var nan = new Estimate(double.NaN, double.NaN);
            return new CorrectionResult(range, readingA, sourceOhms, double.NaN, nan, double.NaN, extrapolated, null, $"not valid beyond {Core.Quantities.QuantityFormatter.Format(curve.ValidUpTo(), Core.Quantities.SiUnit.Ampere)}");
        }

        var r = curve.Range;
        var specification = r.SpecificationLimit(readingA);
        var inputs = new List<Uncertainty.InputQuantity>
        {
            new("reading", readingA, 0, double.PositiveInfinity, Uncertainty.InputDistribution.Normal),
            new("reading specification (rectangular)", 0, double.IsFinite(specification) ? specification / Math.Sqrt(3) : 0, double.PositiveInfinity, Uncertainty.InputDistribution.Rectangular),
            new("reading resolution (half a count)", 0, double.IsFinite(r.ReadingResolutionA) ? r.ReadingResolutionA / Math.Sqrt(12) : 0, double.PositiveInfinity, Uncertainty.InputDistribution.Rectangular),
            new("source resistance", sourceOhms, sourceOhmsUncertainty, double.PositiveInfinity, Uncertainty.InputDistribution.Normal),
            new("burden from the fitted curve", 0, curve.DropUncertainty(readingA), r.ResistanceOhms.EffectiveDegreesOfFreedom ?? double.PositiveInfinity, Uncertainty.InputDistribution.Normal),
        };
        double Model(double[] x)
        {
            var current = x[0] + x[1] + x[2];
            return current + ((curve.Drop(current) + x[4]) / x[3]);
        }

        var budget = Uncertainty.GumBudget.Evaluate(Model, inputs, result.CoverageProbability);
        var correction = drop / sourceOhms;
        return new CorrectionResult(
            range,
            readingA,
            sourceOhms,
            drop,
            new Estimate(readingA + correction, budget.CombinedStandardUncertainty, budget.EffectiveDegreesOfFreedom, budget.CoverageFactor, budget.ExpandedUncertainty),
            correction,
            extrapolated,
            budget);
    }

    private static InsertionPrediction PredictOne(DropCurve curve, double volts, double ohms, double undisturbed, double? minimumVolts)
    {
        var r = curve.Range;
        var valid = curve.ValidUpTo();
        double G(double i) => (i * ohms) + curve.Drop(i) - volts;
        var current = Solve(G, undisturbed, valid);
        if (current is not { } i0 || !double.IsFinite(curve.Drop(i0)))
        {
            var nan = new Estimate(double.NaN, double.NaN);
            return new InsertionPrediction(r.Name, nan, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, false, true, true, double.NaN, r.ReadingResolutionA,
                $"not valid beyond {Core.Quantities.QuantityFormatter.Format(valid, Core.Quantities.SiUnit.Ampere)}");
        }

        var drop = curve.Drop(i0);
        var u = curve.DropUncertainty(i0) / Math.Abs(ohms + curve.Slope(i0));
        var limit = double.IsFinite(r.ReadingLimitA) ? Math.Min(r.ReadingLimitA, r.FullScaleA) : r.FullScaleA;
        var overload = Math.Abs(i0) > limit * (1 + 1e-9);
        var reading = overload ? double.NaN : i0;
        var left = volts - drop;
        var error = i0 - undisturbed;
        var total = Math.Abs(error) + r.SpecificationLimit(i0) + (double.IsFinite(r.ReadingResolutionA) ? r.ReadingResolutionA / 2 : double.NaN);
        var nu = r.ResistanceOhms.EffectiveDegreesOfFreedom ?? double.PositiveInfinity;
        return new InsertionPrediction(
            r.Name,
            Estimate.Expanded(i0, u, nu, 0.95),
            reading,
            error,
            undisturbed != 0 ? error / undisturbed : double.NaN,
            drop,
            left,
            minimumVolts is { } mv && left < mv,
            overload,
            Math.Abs(i0) > r.FittedUpToA,
            total,
            r.ReadingResolutionA);
    }

    /// <summary>The current where g = 0 within ±<paramref name="validUpTo"/>, or null when the curve has no such current there.</summary>
    private static double? Solve(Func<double, double> g, double undisturbed, double validUpTo)
    {
        if (undisturbed == 0)
        {
            undisturbed = 1e-12;
        }

        // g is increasing in I (source resistance plus a non-decreasing drop): widen [0, V/R] until it brackets the root, never past validity.
        var span = Math.Abs(undisturbed);
        double a = Math.Min(0, undisturbed), b = Math.Max(0, undisturbed);
        bool Brackets() => double.IsFinite(g(a)) && double.IsFinite(g(b)) && Math.Sign(g(a)) != Math.Sign(g(b));
        for (var k = 0; k < 60 && !Brackets(); k++)
        {
            a = Math.Max(a - (span * (1 << Math.Min(k, 20))), -validUpTo);
            b = Math.Min(b + (span * (1 << Math.Min(k, 20))), validUpTo);
            if (a <= -validUpTo && b >= validUpTo)
            {
                break;
            }
        }

        return Brackets() ? RootFinder.Brent(g, a, b) : null;
    }

    private static (string? Range, string Reason) Recommend(IReadOnlyList<InsertionPrediction> predictions, double? minimumVolts)
    {
        var inRange = predictions.Where(p => !p.Overload && p.Reason is null).ToList();
        if (inRange.Count == 0)
        {
            return (null, "every examined range would overload at this current");
        }

        var usable = inRange.Where(p => !p.BelowMinimum).ToList();
        if (usable.Count == 0)
        {
            return (null, $"no range leaves the circuit its minimum of {Core.Quantities.QuantityFormatter.Format(minimumVolts ?? 0, Core.Quantities.SiUnit.Volt)}");
        }

        if (usable.All(p => double.IsFinite(p.TotalErrorA)))
        {
            var bestTotal = usable.OrderBy(p => p.TotalErrorA).First();
            return (bestTotal.Range, minimumVolts is null
                ? "smallest total error (insertion + specification + half a count) among the ranges that do not overload"
                : "smallest total error (insertion + specification + half a count) among the ranges that do not overload and leave the circuit its minimum voltage");
        }

        var best = usable.OrderBy(p => Math.Abs(p.ErrorA)).First();
        return (best.Range, minimumVolts is null
            ? "smallest insertion error among the ranges that do not overload (the result carries no specification to add)"
            : "smallest insertion error among the ranges that do not overload and leave the circuit its minimum voltage (the result carries no specification to add)");
    }
}

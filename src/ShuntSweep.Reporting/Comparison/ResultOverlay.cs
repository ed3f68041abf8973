using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Reporting.Comparison;

/// <summary>One result taking part in an overlay, with the label it is shown under (a prototype revision, a serial, a run).</summary>
/// <param name="Label">What the engineer calls it.</param>
/// <param name="Result">The characterisation.</param>
public sealed record OverlayEntry(string Label, CharacterisationResult Result);

/// <summary>One quantity of a range in a result against the same quantity in the reference result, with its E<sub>n</sub> number.</summary>
/// <param name="Quantity">What is compared.</param>
/// <param name="Unit">Its SI unit symbol.</param>
/// <param name="Reference">The reference result's value.</param>
/// <param name="Value">This result's value.</param>
/// <param name="ExpandedReference">The reference value's expanded uncertainty (k = 2).</param>
/// <param name="Expanded">This value's expanded uncertainty (k = 2).</param>
public sealed record QuantityDifference(string Quantity, string Unit, double Reference, double Value, double ExpandedReference, double Expanded)
{
    /// <summary>This value minus the reference.</summary>
    public double Difference => Value - Reference;

    /// <summary>The difference as a fraction of the reference (NaN at a zero reference).</summary>
    public double Relative => Reference != 0 ? Difference / Reference : double.NaN;

    /// <summary>E<sub>n</sub> = (x − x_ref) / √(U² + U_ref²) with expanded uncertainties: |E<sub>n</sub>| ≤ 1 means the two agree within their uncertainties.</summary>
    public double En => ResultOverlay.En(Value, Expanded, Reference, ExpandedReference);
}

/// <summary>One measured point of a range compared with the reference's point at the same setpoint.</summary>
/// <param name="SetpointA">The setpoint both points were taken at.</param>
/// <param name="CurrentA">The reference point's current, at which both drops are compared.</param>
/// <param name="ReferenceDropVolts">The reference point's drop.</param>
/// <param name="DropVolts">This result's drop, moved from its own current to the reference's along its fitted slope.</param>
/// <param name="ExpandedReference">The reference drop's expanded uncertainty (k = 2).</param>
/// <param name="Expanded">This drop's expanded uncertainty (k = 2).</param>
public sealed record PointDifference(double SetpointA, double CurrentA, double ReferenceDropVolts, double DropVolts, double ExpandedReference, double Expanded)
{
    /// <summary>This drop minus the reference drop.</summary>
    public double Difference => DropVolts - ReferenceDropVolts;

    /// <summary>The point's E<sub>n</sub> number.</summary>
    public double En => ResultOverlay.En(DropVolts, Expanded, ReferenceDropVolts, ExpandedReference);
}

/// <summary>One range of one result against the reference result.</summary>
/// <param name="Range">The range.</param>
/// <param name="Label">The compared result's label.</param>
/// <param name="ReferenceModel">The model the reference chose.</param>
/// <param name="Model">The model this result chose.</param>
/// <param name="Quantities">Resistance, offset and drop at full scale against the reference.</param>
/// <param name="Points">The points taken at the reference's setpoints, compared one by one.</param>
public sealed record RangeDifference(string Range, string Label, string ReferenceModel, string Model, IReadOnlyList<QuantityDifference> Quantities, IReadOnlyList<PointDifference> Points)
{
    /// <summary>The largest |E<sub>n</sub>| over the compared points (NaN when none matched).</summary>
    public double WorstPointEn => Points.Count == 0 ? double.NaN : Points.Max(p => Math.Abs(p.En));
}

/// <summary>Compares two or more results range by range against the first: differences with E<sub>n</sub> numbers for what an engineer reads
/// beside the pass/fail gate of <see cref="ResultComparer"/>.</summary>
public static class ResultOverlay
{
    /// <summary>The coverage factor of the expanded uncertainties in E<sub>n</sub>.</summary>
    public const double CoverageFactor = 2;

    /// <summary>E<sub>n</sub> = (x − x_ref) / √(U_x² + U_ref²), the normalised error of ISO/IEC 17043 (expanded uncertainties); NaN when both are zero.</summary>
    public static double En(double x, double expandedX, double reference, double expandedReference)
    {
        var denominator = Math.Sqrt((expandedX * expandedX) + (expandedReference * expandedReference));
        return denominator > 0 ? (x - reference) / denominator : double.NaN;
    }

    /// <summary>Every range of every result after the first against the same range of the first; ranges missing from either side are left out.</summary>
    /// <exception cref="ArgumentException">When fewer than two results are given.</exception>
    public static IReadOnlyList<RangeDifference> Compare(IReadOnlyList<OverlayEntry> entries)
    {
        ArgumentNullException.ThrowIfNull(entries);
        if (entries.Count < 2)
        {
            throw new ArgumentException("An overlay needs at least two results.", nameof(entries));
        }

        var reference = entries[0].Result;
        var list = new List<RangeDifference>();
        foreach (var refRange in reference.Ranges)
        {
            foreach (var entry in entries.Skip(1))
            {
                if (entry.Result.Ranges.FirstOrDefault(r => r.Name == refRange.Name) is not { } range)
                {
                    continue;
                }

                var refCurve = TryCurve(refRange, reference.DiodeTemperatureK);
                var curve = TryCurve(range, entry.Result.DiodeTemperatureK);
                var quantities = new List<QuantityDifference>
                {
                    new("resistance", "Ω", refRange.ResistanceOhms.Value, range.ResistanceOhms.Value,
                        CoverageFactor * refRange.ResistanceOhms.StandardUncertainty, CoverageFactor * range.ResistanceOhms.StandardUncertainty),
                    new("offset", "V", refRange.OffsetVolts.Value, range.OffsetVolts.Value,
                        CoverageFactor * refRange.OffsetVolts.StandardUncertainty, CoverageFactor * range.OffsetVolts.StandardUncertainty),
                };
                if (refCurve is not null && curve is not null)
                {
                    var fs = refRange.FullScaleA;
                    quantities.Add(new("drop at full scale", "V", refCurve.Drop(fs), curve.Drop(fs),
                        CoverageFactor * refCurve.DropUncertainty(fs), CoverageFactor * curve.DropUncertainty(fs)));
                }

                list.Add(new RangeDifference(refRange.Name, entry.Label, refRange.Model, range.Model, quantities, Points(refRange, range, curve)));
            }
        }

        return list;
    }

    private static List<PointDifference> Points(RangeResult reference, RangeResult range, DropCurve? curve)
    {
        var points = new List<PointDifference>();
        var used = new HashSet<PointResult>(ReferenceEqualityComparer.Instance);
        foreach (var p in reference.Points)
        {
            // The same plan step when both ran the same sequence (a sweep point and a hold can share a setpoint), else the next unused point at that setpoint.
            var tolerance = 1e-9 * Math.Max(Math.Abs(p.SetpointA), 1e-12);
            bool Same(PointResult q) => Math.Abs(q.SetpointA - p.SetpointA) <= tolerance && !used.Contains(q);
            if ((range.Points.FirstOrDefault(q => q.Step == p.Step && Same(q)) ?? range.Points.FirstOrDefault(Same)) is not { } q)
            {
                continue;
            }

            used.Add(q);

            // The two points were set to the same current but their reference currents differ by the load's error: move this drop along its own
            // fitted slope to the reference's current, so that the difference is the UUTs' and not the loads'.
            var slope = curve?.Slope(q.CurrentA) ?? range.ResistanceOhms.Value;
            var moved = q.DropVolts + ((double.IsFinite(slope) ? slope : 0) * (p.CurrentA - q.CurrentA));
            points.Add(new PointDifference(p.SetpointA, p.CurrentA, p.DropVolts, moved,
                CoverageFactor * Finite(p.DropUncertaintyVolts), CoverageFactor * Finite(q.DropUncertaintyVolts)));
        }

        return points;
    }

    private static DropCurve? TryCurve(RangeResult range, double diodeTemperatureK)
    {
        try
        {
            return DropCurve.For(range, diodeTemperatureK);
        }
        catch (InvalidDataException)
        {
            return null;
        }
    }

    private static double Finite(double v) => double.IsFinite(v) ? v : 0;
}

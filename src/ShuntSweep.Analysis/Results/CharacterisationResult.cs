namespace ShuntSweep.Analysis.Results;

/// <summary>Everything the analysis found in one run: one entry per range, in the order the ranges were measured.</summary>
/// <param name="Ranges">The per-range characterisation.</param>
public sealed record CharacterisationResult(IReadOnlyList<RangeResult> Ranges);

/// <summary>A value with its standard uncertainty (k = 1), in the unit its field name states.</summary>
/// <param name="Value">The estimate.</param>
/// <param name="StandardUncertainty">The standard uncertainty of the estimate.</param>
public sealed record Estimate(double Value, double StandardUncertainty);

/// <summary>The characterisation of one range: the drop model chosen, its resistance and offset, and the points it was fitted to.</summary>
/// <param name="Name">The range's name.</param>
/// <param name="Jack">The jack the range is measured through.</param>
/// <param name="FullScaleA">The range's full scale in amperes (from the UUT, or the largest |setpoint| measured).</param>
/// <param name="Model">The name of the drop model chosen for the range.</param>
/// <param name="ResistanceOhms">The small-signal series resistance of the range (slope of drop against current near zero).</param>
/// <param name="OffsetVolts">The drop at zero current (thermal EMFs, amplifier offset, voltmeter zero).</param>
/// <param name="ResidualStdDevVolts">The standard deviation of the point residuals about the chosen model, in volts (unit-weight scale when weighted).</param>
/// <param name="BurdenAtFullScaleVolts">The drop the chosen model predicts at full scale.</param>
/// <param name="Points">The measured points (one per step) with their residuals.</param>
public sealed record RangeResult(
    string Name,
    string Jack,
    double FullScaleA,
    string Model,
    Estimate ResistanceOhms,
    Estimate OffsetVolts,
    double ResidualStdDevVolts,
    double BurdenAtFullScaleVolts,
    IReadOnlyList<PointResult> Points);

/// <summary>One measured point of a range: the means of its samples, their scatter, and how the chosen model fits it.</summary>
/// <param name="Step">The step index of the point in the run.</param>
/// <param name="Samples">How many samples the point has.</param>
/// <param name="SetpointA">The load setpoint.</param>
/// <param name="CurrentA">The mean reference current.</param>
/// <param name="DropVolts">The mean burden voltage.</param>
/// <param name="DropStdDevVolts">The standard deviation of the burden samples (NaN with one sample).</param>
/// <param name="DropUncertaintyVolts">The standard uncertainty of the mean drop that weights the point in the fit.</param>
/// <param name="ReadingA">The mean UUT reading (NaN when the UUT was not read or showed overload).</param>
/// <param name="ResidualVolts">The measured minus the fitted drop.</param>
/// <param name="StudentisedResidual">The externally studentised residual of the point.</param>
/// <param name="Outlier">Whether the studentised residual exceeds the outlier threshold; outliers are flagged, never dropped.</param>
public sealed record PointResult(
    int Step,
    int Samples,
    double SetpointA,
    double CurrentA,
    double DropVolts,
    double DropStdDevVolts,
    double DropUncertaintyVolts,
    double ReadingA,
    double ResidualVolts,
    double StudentisedResidual,
    bool Outlier);

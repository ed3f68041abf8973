using ShuntSweep.Analysis.Uncertainty;

namespace ShuntSweep.Analysis.Results;

/// <summary>Everything the analysis found in one run: one entry per range, in the order the ranges were measured.</summary>
/// <param name="Ranges">The per-range characterisation.</param>
/// <param name="Decomposition">Per jack: the common series part separated from each range's shunt, with the hypothesis that separated them.</param>
/// <param name="Conformity">The worst conformity statement over all ranges with UUT readings (null when the UUT was not read).</param>
/// <param name="DiodeTemperatureK">The temperature at which V_T = kT/q was taken for the clamp-diode model.</param>
/// <param name="CoverageProbability">The coverage probability of every expanded uncertainty in the file.</param>
/// <param name="RunEnd">How the run that measured the samples ended (the runner's end code, <c>Completed</c>, <c>SafetyAbort</c>, ...);
/// null for a result fitted from a journal alone.</param>
/// <param name="LeftOut">What the analysis had to leave out (ranges with too few points), in words; empty when nothing was.</param>
public sealed record CharacterisationResult(
    IReadOnlyList<RangeResult> Ranges,
    IReadOnlyList<JackDecomposition>? Decomposition = null,
    ConformitySummary? Conformity = null,
    double DiodeTemperatureK = 296.15,
    double CoverageProbability = 0.95,
    string? RunEnd = null,
    IReadOnlyList<string>? LeftOut = null)
{
    /// <summary>The verdict on the whole UUT: incomplete when the run stopped early or a range was left out (never a pass then),
    /// else fail when any range fails its specification, else pass when any range was judged.</summary>
    public RecordVerdict Verdict => Verdicts.Of(this);

    /// <summary>Each range's verdict as this result states it: a range that met its specification in a run that stopped early is incomplete, not a pass.</summary>
    public IReadOnlyDictionary<string, RecordVerdict> RangeVerdicts => Ranges.ToDictionary(r => r.Name, r => Verdicts.Of(this, r), StringComparer.Ordinal);

    /// <summary>The range called <paramref name="name"/>; throws naming the ranges present otherwise.</summary>
    public RangeResult Range(string name) =>
        Ranges.FirstOrDefault(r => r.Name == name)
        ?? throw new KeyNotFoundException($"The result has no range '{name}'; it has {string.Join(", ", Ranges.Select(r => r.Name))}.");
}

/// <summary>A value with its standard uncertainty and, where evaluated, its expanded uncertainty, in the unit its field name states.</summary>
/// <param name="Value">The estimate.</param>
/// <param name="StandardUncertainty">The standard uncertainty of the estimate (k = 1).</param>
/// <param name="EffectiveDegreesOfFreedom">ν_eff of the standard uncertainty (Welch–Satterthwaite, JCGM 100 G.4); null when infinite.</param>
/// <param name="CoverageFactor">k = t_p(ν_eff) for the file's coverage probability (JCGM 100 G.3); NaN when not evaluated.</param>
/// <param name="ExpandedUncertainty">U = k·u; NaN when not evaluated.</param>
public sealed record Estimate(
    double Value,
    double StandardUncertainty,
    double? EffectiveDegreesOfFreedom = null,
    double CoverageFactor = double.NaN,
    double ExpandedUncertainty = double.NaN)
{
    /// <summary>A value with u, ν and the Student-t expanded uncertainty at <paramref name="coverageProbability"/>.</summary>
    public static Estimate Expanded(double value, double standardUncertainty, double degreesOfFreedom, double coverageProbability)
    {
        var k = Uncertainty.GumBudget.StudentCoverageFactor(degreesOfFreedom, coverageProbability);
        return new Estimate(value, standardUncertainty, double.IsFinite(degreesOfFreedom) ? degreesOfFreedom : null, k, k * standardUncertainty);
    }

    /// <summary>U, or k·u with the normal k for <paramref name="coverageProbability"/> when the file did not carry U (older results).</summary>
    public (double U, double K) Expansion(double coverageProbability)
    {
        if (double.IsFinite(ExpandedUncertainty) && double.IsFinite(CoverageFactor))
        {
            return (ExpandedUncertainty, CoverageFactor);
        }

        var k = Uncertainty.GumBudget.StudentCoverageFactor(EffectiveDegreesOfFreedom ?? double.PositiveInfinity, coverageProbability);
        return (k * StandardUncertainty, k);
    }
}

/// <summary>The characterisation of one range: the drop model chosen, its resistance and offset, and the points it was fitted to.</summary>
/// <param name="Name">The range's name.</param>
/// <param name="Jack">The jack the range is measured through.</param>
/// <param name="FullScaleA">The range's full scale in amperes (from the UUT, or the largest |setpoint| measured).</param>
/// <param name="Model">The name of the drop model chosen for the range.</param>
/// <param name="ResistanceOhms">The small-signal series resistance of the range (slope of drop against current at zero).</param>
/// <param name="OffsetVolts">The drop at zero current (thermal EMFs, amplifier offset, voltmeter zero).</param>
/// <param name="ResidualStdDevVolts">The standard deviation of the point residuals about the chosen model, in volts.</param>
/// <param name="BurdenAtFullScaleVolts">The drop the chosen model predicts at full scale.</param>
/// <param name="Points">The measured points (one per step) with their residuals.</param>
/// <param name="Parameters">The chosen model's parameters with units and standard uncertainties.</param>
/// <param name="Correlation">The correlation matrix of <paramref name="Parameters"/>, row by row.</param>
/// <param name="ModelComparison">Every candidate model's fit statistics, the choice and the runner-up.</param>
/// <param name="Thermal">The thermal holds of the range, each fitted with one or two exponentials.</param>
/// <param name="ReadingError">The UUT's reading error at each point with its uncertainty budget and conformity.</param>
/// <param name="Conformity">The range's worst conformity statement over its points.</param>
/// <param name="FittedUpToA">The largest |current| the model was fitted to: predictions beyond it are extrapolations.</param>
/// <param name="ReadingLimitA">The smallest |current| at which the UUT reading overloaded inside the range (amplifier output swing), when seen.</param>
/// <param name="ResistanceMethod">How the headline resistance was obtained: <c>chosen model: …</c> or <c>Akaike-weighted average: …</c> with the models.</param>
/// <param name="ResistanceBudget">The uncertainty budget of the headline resistance (fit, resolution and the bench file's Type B rows).</param>
/// <param name="OffsetBudget">The uncertainty budget of the offset.</param>
/// <param name="DropResolutionVolts">The drop meter's resolution used for the floor: from the bench file, else inferred from the journal's quantisation (0: none seen).</param>
/// <param name="FullScaleSource">Where the full scale came from.</param>
/// <param name="ReadingResolutionA">The UUT's display resolution on the range (NaN without a UUT description).</param>
/// <param name="AccuracyFractionOfReading">The UUT's specification, % of reading part, as a fraction (NaN without a UUT description).</param>
/// <param name="AccuracyCounts">The UUT's specification, counts part.</param>
/// <param name="Warnings">Wiring problems and other findings a person must see (a negative resistance: reversed leads).</param>
/// <param name="Burden">The burden judged against the specified burden and limit curve (null when the specification states neither).</param>
public sealed record RangeResult(
    string Name,
    string Jack,
    double FullScaleA,
    string Model,
    Estimate ResistanceOhms,
    Estimate OffsetVolts,
    double ResidualStdDevVolts,
    double BurdenAtFullScaleVolts,
    IReadOnlyList<PointResult> Points,
    IReadOnlyList<ParameterResult>? Parameters = null,
    IReadOnlyList<IReadOnlyList<double>>? Correlation = null,
    ModelComparison? ModelComparison = null,
    IReadOnlyList<ThermalHoldResult>? Thermal = null,
    IReadOnlyList<ReadingErrorPoint>? ReadingError = null,
    ConformitySummary? Conformity = null,
    double FittedUpToA = double.NaN,
    double ReadingLimitA = double.NaN,
    string ResistanceMethod = "",
    GumBudget? ResistanceBudget = null,
    GumBudget? OffsetBudget = null,
    double DropResolutionVolts = double.NaN,
    string FullScaleSource = "",
    double ReadingResolutionA = double.NaN,
    double AccuracyFractionOfReading = double.NaN,
    int AccuracyCounts = 0,
    IReadOnlyList<string>? Warnings = null,
    BurdenCheck? Burden = null)
{
    /// <summary>The UUT's specification half-width at <paramref name="readingA"/>: fraction·|reading| + counts·resolution; NaN when unknown.</summary>
    public double SpecificationLimit(double readingA) =>
        (AccuracyFractionOfReading * Math.Abs(readingA)) + (AccuracyCounts * (double.IsFinite(ReadingResolutionA) ? ReadingResolutionA : 0));
    /// <summary>How many of the range's points did not settle within their maximum wait (all of them are in the fit, flagged).</summary>
    public int UnsettledPoints => Points.Count(p => p.Unsettled);
}

/// <summary>The measured burden judged against the specification: the model's drop at full scale against the specified maximum, and every
/// measured point against the optional limit curve. The burden is an upper limit only (a smaller drop is always better).</summary>
/// <param name="SpecifiedVolts">The specified maximum burden at full scale (NaN when the specification gives only a curve).</param>
/// <param name="AtFullScaleVolts">The drop the chosen model predicts at full scale.</param>
/// <param name="ExpandedUncertaintyVolts">U of that prediction at the result's coverage probability, from the fit's covariance.</param>
/// <param name="Extrapolated">Whether full scale lies beyond the largest measured current (the prediction extrapolates the model).</param>
/// <param name="AtFullScale">The simple-acceptance verdict at full scale (null without a specified burden).</param>
/// <param name="AtFullScaleGuardBanded">The guard-banded verdict (w = U) at full scale (null without a specified burden).</param>
/// <param name="CurvePoints">How many measured points lay within the limit curve's current span and were judged against it.</param>
/// <param name="CurvePointsAbove">How many of them had a mean drop above the curve.</param>
/// <param name="Curve">The worst simple-acceptance verdict over the curve's points (null without a curve or when no point lay in its span).</param>
/// <param name="WorstCurveStep">The step whose drop came nearest to (or furthest over) the curve, relative to the limit there.</param>
public sealed record BurdenCheck(
    double SpecifiedVolts,
    double AtFullScaleVolts,
    double ExpandedUncertaintyVolts,
    bool Extrapolated,
    ConformityVerdict? AtFullScale,
    ConformityVerdict? AtFullScaleGuardBanded,
    int CurvePoints,
    int CurvePointsAbove,
    ConformityVerdict? Curve,
    int? WorstCurveStep)
{
    /// <summary>Whether the burden fails anywhere it was judged (simple acceptance).</summary>
    public bool Fails => AtFullScale == ConformityVerdict.Fail || Curve == ConformityVerdict.Fail;
}

/// <summary>One fitted model parameter.</summary>
/// <param name="Name">Its name in the model.</param>
/// <param name="Unit">Its SI unit.</param>
/// <param name="Value">The estimate.</param>
/// <param name="StandardUncertainty">Its standard uncertainty.</param>
/// <param name="Meaning">What it stands for physically.</param>
public sealed record ParameterResult(string Name, string Unit, double Value, double StandardUncertainty, string Meaning);

/// <summary>One measured point of a range: the means of its samples, their scatter, and how the chosen model fits it.</summary>
/// <param name="Step">The step index of the point in the run.</param>
/// <param name="Samples">How many samples the point has.</param>
/// <param name="SetpointA">The load setpoint.</param>
/// <param name="CurrentA">The mean reference current.</param>
/// <param name="DropVolts">The mean burden voltage (for a thermal hold: its settled value).</param>
/// <param name="DropStdDevVolts">The standard deviation of the burden samples (NaN with one sample).</param>
/// <param name="DropUncertaintyVolts">The standard uncertainty of the mean drop that weights the point in the fit.</param>
/// <param name="ReadingA">The mean UUT reading (NaN when the UUT was not read or showed overload).</param>
/// <param name="ResidualVolts">The measured minus the fitted drop.</param>
/// <param name="StudentisedResidual">The externally studentised residual of the point.</param>
/// <param name="Outlier">Whether the studentised residual exceeds the outlier threshold; outliers are flagged, never dropped.</param>
/// <param name="Unsettled">Whether the drop had not settled when the point's maximum wait ran out (the run's <c>not-settled</c> event);
/// such a point is kept in the fit, flagged, with the scatter its samples show.</param>
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
    bool Outlier,
    bool Unsettled = false);

/// <summary>How the candidate drop models compared on one range.</summary>
/// <param name="Chosen">The chosen model.</param>
/// <param name="RunnerUp">The next best model by AICc (null when only one fitted).</param>
/// <param name="Rule">The rule that made the choice, in words.</param>
/// <param name="Candidates">Every candidate, fitted or not.</param>
public sealed record ModelComparison(string Chosen, string? RunnerUp, string Rule, IReadOnlyList<ModelCandidate> Candidates);

/// <summary>One candidate model's fit statistics.</summary>
/// <param name="Model">The model's name.</param>
/// <param name="ParameterCount">Its number of parameters.</param>
/// <param name="Fitted">Whether it could be fitted (and its parameters are physically valid).</param>
/// <param name="Reason">Why it was not fitted.</param>
/// <param name="ChiSquare">The weighted residual sum of squares.</param>
/// <param name="ResidualStdDevVolts">The unweighted residual standard deviation.</param>
/// <param name="Aicc">The corrected Akaike information criterion (lower is better).</param>
/// <param name="Bic">The Bayesian information criterion (lower is better).</param>
/// <param name="NestedOver">The simpler model it was F-tested against.</param>
/// <param name="FTestPValue">The p-value of that F-test (small: the extra parameters are needed).</param>
/// <param name="Parameters">The fitted parameter values in the model's order (null when not fitted), so that any candidate's curve can be drawn.</param>
public sealed record ModelCandidate(
    string Model,
    int ParameterCount,
    bool Fitted,
    string? Reason,
    double ChiSquare,
    double ResidualStdDevVolts,
    double Aicc,
    double Bic,
    string? NestedOver,
    double FTestPValue,
    IReadOnlyList<double>? Parameters = null);

/// <summary>A thermal hold fitted with one or two exponentials: V(t) = V∞ + Σ Aₖ·exp(−t/τₖ).</summary>
/// <param name="Step">The hold's step index.</param>
/// <param name="Samples">The number of samples in the hold.</param>
/// <param name="CurrentA">The hold current.</param>
/// <param name="DurationSeconds">The time from its first to its last sample.</param>
/// <param name="Model">one-exponential or two-exponential.</param>
/// <param name="SettledDropVolts">V∞, the settled drop.</param>
/// <param name="Terms">The exponential terms, fastest first.</param>
/// <param name="ResidualStdDevVolts">The residual standard deviation of the samples about the fit.</param>
public sealed record ThermalHoldResult(
    int Step,
    int Samples,
    double CurrentA,
    double DurationSeconds,
    string Model,
    Estimate SettledDropVolts,
    IReadOnlyList<ThermalTerm> Terms,
    double ResidualStdDevVolts);

/// <summary>One exponential term of a thermal hold.</summary>
/// <param name="AmplitudeVolts">Aₖ: negative when the drop rises as the element heats.</param>
/// <param name="TimeConstantSeconds">τₖ = R_th·C_th of the element.</param>
/// <param name="AttributedTo">Which element the term is attributed to.</param>
public sealed record ThermalTerm(Estimate AmplitudeVolts, Estimate TimeConstantSeconds, string AttributedTo);

/// <summary>The UUT's reading error at one point against its accuracy specification.</summary>
/// <param name="Step">The point's step.</param>
/// <param name="ReferenceA">The reference current.</param>
/// <param name="ReadingA">The UUT's mean reading.</param>
/// <param name="ErrorA">Reading minus reference.</param>
/// <param name="Budget">The GUM uncertainty budget of the error.</param>
/// <param name="MonteCarlo">The JCGM 101 Monte Carlo cross-check of the budget (null when switched off).</param>
/// <param name="Statement">The conformity statement against ±(% of reading + counts).</param>
/// <param name="DecidedOn"><c>gum</c>, or <c>monte-carlo</c> when the Monte Carlo check did not validate the GUM interval and its own
/// interval was used for the statement (JCGM 101 §8).</param>
public sealed record ReadingErrorPoint(
    int Step,
    double ReferenceA,
    double ReadingA,
    double ErrorA,
    GumBudget Budget,
    MonteCarloCheck? MonteCarlo,
    ConformityStatement Statement,
    string DecidedOn = "gum");

/// <summary>The worst conformity over a set of points (a range, or the whole UUT).</summary>
/// <param name="SimpleAcceptance">The worst verdict under simple acceptance.</param>
/// <param name="GuardBanded">The worst verdict with the guard band w = U.</param>
/// <param name="MinimumTestUncertaintyRatio">The smallest TUR over the points.</param>
/// <param name="Points">The number of points judged.</param>
public sealed record ConformitySummary(ConformityVerdict SimpleAcceptance, ConformityVerdict GuardBanded, double MinimumTestUncertaintyRatio, int Points);

/// <summary>The series parts of one jack separated from its ranges' shunts.</summary>
/// <param name="Jack">The jack.</param>
/// <param name="Ranges">The ranges of the jack that were used.</param>
/// <param name="Separations">Each hypothesis that separated the common series part, with its consistency.</param>
public sealed record JackDecomposition(string Jack, IReadOnlyList<string> Ranges, IReadOnlyList<Separation> Separations);

/// <summary>One way of separating the jack's common series part (fuse, contacts, leads) from the shunts, and how well the data agree with it.</summary>
/// <param name="Hypothesis">The hypothesis, in words.</param>
/// <param name="CommonSeriesOhms">The common series resistance of the jack.</param>
/// <param name="ShuntOhms">Each range's shunt, by range name.</param>
/// <param name="ChiSquare">χ² of the hypothesis against the per-range fits.</param>
/// <param name="DegreesOfFreedom">Its degrees of freedom (0: exactly determined, no check possible).</param>
/// <param name="PValue">P(χ²_ν ≥ χ²): small values reject the hypothesis.</param>
/// <param name="Consistent">Whether p ≥ 0.05; null when the separation is exactly determined and no check is possible.</param>
/// <param name="Extra">Further quantities of the separation (heating coefficient, shunt scale), by name.</param>
/// <param name="Method">What separated the parts, as a stable name: <c>shunt-tap</c>, <c>nominal-shunts</c>, <c>shunt-ratio</c>,
/// <c>shared-heating</c> or <c>thermal-step</c> (empty in results written before it was recorded).</param>
public sealed record Separation(
    string Hypothesis,
    Estimate CommonSeriesOhms,
    IReadOnlyDictionary<string, Estimate> ShuntOhms,
    double ChiSquare,
    int DegreesOfFreedom,
    double PValue,
    bool? Consistent,
    IReadOnlyDictionary<string, Estimate>? Extra = null,
    string Method = "");

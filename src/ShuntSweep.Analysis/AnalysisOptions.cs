using ShuntSweep.Core.Bench;

namespace ShuntSweep.Analysis;

/// <summary>Settings of the analysis; the defaults suit a bench with a few samples per point.</summary>
public sealed record AnalysisOptions
{
    /// <summary>The |studentised residual| above which a point is flagged as an outlier. The default value is 3.5.</summary>
    public double OutlierThreshold { get; init; } = 3.5;

    /// <summary>Degrees of freedom given to the range's smooth scatter model s²(I) = a + b·I² when a point's own scatter is shrunk towards it for weighting. The default value is 50.</summary>
    /// <remarks>A point with a few samples has an unreliable standard deviation; leaning on the scatter model keeps one lucky (near-zero)
    /// scatter from dominating the fit and keeps the stated uncertainties honest. Zero uses each point's own scatter alone.</remarks>
    public double ScatterModelDegreesOfFreedom { get; init; } = 50;

    /// <summary>The significance level a curved drop model must reach in the F-test against the straight line before it can be chosen. The default value is 0.01.</summary>
    public double ModelSignificance { get; init; } = 0.01;

    /// <summary>The coverage probability of expanded uncertainties. The default value is 0.95.</summary>
    public double CoverageProbability { get; init; } = 0.95;

    /// <summary>A step with at least this many samples is examined as a thermal hold. The default value is 30.</summary>
    public int ThermalHoldMinimumSamples { get; init; } = 30;

    /// <summary>The temperature of the clamp diodes for V_T = kT/q, in kelvin, when the bench records no ambient. The default value is 296.15 (23 °C).</summary>
    public double DiodeTemperatureKelvin { get; init; } = 296.15;

    /// <summary>The Type B inputs from the bench file (instrument specifications, thermal EMF, leads, ambient); none by default, and
    /// then no instrument term enters the budget except the drop meter's resolution inferred from the journal.</summary>
    public BenchAllowances Allowances { get; init; } = BenchAllowances.None;

    /// <summary>The diode temperature actually used: the bench's recorded ambient when there is one, else <see cref="DiodeTemperatureKelvin"/>.</summary>
    public double DiodeKelvin => Allowances.AmbientCelsius is { } c ? c + 273.15 : DiodeTemperatureKelvin;

    /// <summary>Monte Carlo trials per point for the JCGM 101 cross-check; 0 skips it. The default value is 10 000.</summary>
    public int MonteCarloTrials { get; init; } = 10_000;

    /// <summary>The seed of the Monte Carlo generator, so results are reproducible. The default value is 1.</summary>
    public int Seed { get; init; } = 1;

    /// <summary>The temperature coefficient assumed for the fuse element, 1/K, to turn the heating coefficient into a thermal resistance.
    /// The default value is 0.0038 (silver near 20 °C, handbook).</summary>
    public double FuseTemperatureCoefficient { get; init; } = 0.0038;

    /// <summary>The steps whose drop had not settled when their maximum wait ran out (from the run's <c>not-settled</c> events): their points are
    /// flagged in the result. The default value is none.</summary>
    public IReadOnlySet<int> UnsettledSteps { get; init; } = new HashSet<int>();
}

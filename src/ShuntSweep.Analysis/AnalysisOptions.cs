namespace ShuntSweep.Analysis;

/// <summary>Settings of the analysis; the defaults suit a bench with a few samples per point.</summary>
public sealed record AnalysisOptions
{
    /// <summary>The |studentised residual| above which a point is flagged as an outlier. The default value is 3.5.</summary>
    public double OutlierThreshold { get; init; } = 3.5;

    /// <summary>Degrees of freedom given to the pooled scatter when a point's own scatter is shrunk towards it for weighting. The default value is 4.</summary>
    /// <remarks>A point with few samples has an unreliable standard deviation; shrinking it towards the range's pooled
    /// scatter keeps one lucky (near-zero) scatter from dominating the fit. Zero uses each point's own scatter.</remarks>
    public double PooledScatterDegreesOfFreedom { get; init; } = 4;

    /// <summary>The coverage probability of expanded uncertainties. The default value is 0.95.</summary>
    public double CoverageProbability { get; init; } = 0.95;
}

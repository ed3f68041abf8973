namespace ShuntSweep.Analysis.Fitting;

/// <summary>The outcome of a weighted linear least-squares fit: parameters, their covariance and the residual statistics.</summary>
/// <param name="Parameters">The fitted coefficients, one per design-matrix column.</param>
/// <param name="Covariance">The parameter covariance matrix (row-major, p×p), scaled by the residual variance.</param>
/// <param name="ResidualStdDev">The residual standard deviation sqrt(χ²/ν) in the units of a unit-weight observation.</param>
/// <param name="ChiSquare">The weighted residual sum of squares.</param>
/// <param name="DegreesOfFreedom">Observations minus parameters.</param>
/// <param name="Residuals">The unweighted residuals y − ŷ.</param>
/// <param name="Leverages">The diagonal of the hat matrix, for studentised residuals.</param>
internal sealed record LinearFit(
    double[] Parameters,
    double[,] Covariance,
    double ResidualStdDev,
    double ChiSquare,
    int DegreesOfFreedom,
    double[] Residuals,
    double[] Leverages)
{
    /// <summary>The standard uncertainty of parameter <paramref name="index"/>.</summary>
    public double StandardUncertainty(int index) => Math.Sqrt(Covariance[index, index]);
}

namespace ShuntSweep.Analysis.Fitting;

/// <summary>The outcome of a Levenberg–Marquardt fit.</summary>
/// <param name="Parameters">The fitted parameters.</param>
/// <param name="Covariance">s²·(JᵀWJ)⁻¹ at the solution, from the QR factor of the weighted Jacobian.</param>
/// <param name="ResidualStdDev">sqrt(χ²/ν).</param>
/// <param name="ChiSquare">The weighted residual sum of squares.</param>
/// <param name="DegreesOfFreedom">Observations minus parameters.</param>
/// <param name="Residuals">The unweighted residuals y − f.</param>
/// <param name="Leverages">The hat-matrix diagonal of the linearised problem.</param>
/// <param name="Iterations">The number of accepted steps.</param>
internal sealed record NonlinearFit(
    double[] Parameters,
    double[,] Covariance,
    double ResidualStdDev,
    double ChiSquare,
    int DegreesOfFreedom,
    double[] Residuals,
    double[] Leverages,
    int Iterations)
{
    /// <summary>The standard uncertainty of parameter <paramref name="index"/>.</summary>
    public double StandardUncertainty(int index) => Math.Sqrt(Covariance[index, index]);
}

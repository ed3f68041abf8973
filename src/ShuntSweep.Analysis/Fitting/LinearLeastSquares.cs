namespace ShuntSweep.Analysis.Fitting;

/// <summary>Weighted linear least squares by Householder QR of the weighted design matrix.</summary>
internal static class LinearLeastSquares
{
    /// <summary>Fits y ≈ Σ βⱼ·basisⱼ(x) with weights w (1/σ², or null for equal weights).</summary>
    /// <param name="x">The abscissae.</param>
    /// <param name="y">The observations.</param>
    /// <param name="weights">Statistical weights, 1/u² of each observation; null means all equal.</param>
    /// <param name="basis">The number of basis functions.</param>
    /// <param name="evaluate">Writes basisⱼ(x) for j in 0..basis−1 into the span.</param>
    public static LinearFit Fit(ReadOnlySpan<double> x, ReadOnlySpan<double> y, ReadOnlySpan<double> weights, int basis, BasisEvaluator evaluate)
    {
        ArgumentNullException.ThrowIfNull(evaluate);
        var n = x.Length;
        if (y.Length != n || (!weights.IsEmpty && weights.Length != n))
        {
            throw new ArgumentException("x, y and weights must have the same length.");
        }

        if (n <= basis)
        {
            throw new ArgumentException($"A fit of {basis} parameters needs more than {basis} observations; got {n}.");
        }

        var a = new double[n * basis];
        var b = new double[n];
        Span<double> row = stackalloc double[basis];
        for (var i = 0; i < n; i++)
        {
            var sw = weights.IsEmpty ? 1.0 : Math.Sqrt(weights[i]);
            evaluate(x[i], row);
            for (var j = 0; j < basis; j++)
            {
                a[(j * n) + i] = row[j] * sw;
            }

            b[i] = y[i] * sw;
        }

        var qr = new HouseholderQr(a, n, basis);
        if (qr.IsRankDeficient())
        {
            throw new ArgumentException("The design is rank deficient: the currents do not separate the model's parameters (too few distinct points?).");
        }

        var beta = qr.Solve(b);
        var residuals = new double[n];
        var chi2 = 0.0;
        for (var i = 0; i < n; i++)
        {
            evaluate(x[i], row);
            var fit = 0.0;
            for (var j = 0; j < basis; j++)
            {
                fit += beta[j] * row[j];
            }

            residuals[i] = y[i] - fit;
            var w = weights.IsEmpty ? 1.0 : weights[i];
            chi2 += w * residuals[i] * residuals[i];
        }

        var dof = n - basis;
        var s2 = chi2 / dof;
        var cov = qr.InverseRtR();
        for (var i = 0; i < basis; i++)
        {
            for (var j = 0; j < basis; j++)
            {
                cov[i, j] *= s2;
            }
        }

        return new LinearFit(beta, cov, Math.Sqrt(s2), chi2, dof, residuals, qr.Leverages());
    }

    /// <summary>Fits a polynomial of the given degree, β₀ + β₁x + … + β_d·x^d.</summary>
    public static LinearFit Polynomial(ReadOnlySpan<double> x, ReadOnlySpan<double> y, ReadOnlySpan<double> weights, int degree) =>
        Fit(x, y, weights, degree + 1, static (xi, row) =>
        {
            var p = 1.0;
            for (var j = 0; j < row.Length; j++)
            {
                row[j] = p;
                p *= xi;
            }
        });
}

/// <summary>Writes the values of every basis function at <paramref name="x"/> into <paramref name="row"/>.</summary>
internal delegate void BasisEvaluator(double x, Span<double> row);

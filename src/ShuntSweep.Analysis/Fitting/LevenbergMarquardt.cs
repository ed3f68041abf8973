namespace ShuntSweep.Analysis.Fitting;

/// <summary>Levenberg–Marquardt weighted nonlinear least squares; every step and the final covariance come from a QR factorisation.</summary>
/// <remarks>The damped step solves min ‖J·δ − r‖² + λ‖D·δ‖² as the stacked least-squares problem [R; √λ·D] (R from the Householder QR of J),
/// so the normal equations are never formed. D holds the running maximum of the Jacobian column norms (Marquardt scaling).</remarks>
internal static class LevenbergMarquardt
{
    /// <summary>Fits <paramref name="model"/> to (x, y) with weights w (empty for equal weights) from <paramref name="start"/>.</summary>
    /// <remarks><c>admissible</c> rejects parameter vectors outside the model's validity (a rejected step counts as a failed step).</remarks>
    /// <exception cref="FitFailedException">When no admissible start, no convergence, or a singular Jacobian at the solution.</exception>
    public static NonlinearFit Fit(
        IModelFunction model,
        ReadOnlySpan<double> x,
        ReadOnlySpan<double> y,
        ReadOnlySpan<double> weights,
        ReadOnlySpan<double> start,
        Func<double[], bool>? admissible = null,
        int maxIterations = 1000)
    {
        ArgumentNullException.ThrowIfNull(model);
        var n = x.Length;
        var m = model.ParameterCount;
        if (start.Length != m)
        {
            throw new ArgumentException($"The start has {start.Length} values; the model has {m} parameters.");
        }

        if (n <= m)
        {
            throw new FitFailedException($"{n} observations cannot determine {m} parameters.");
        }

        var sw = new double[n];
        for (var i = 0; i < n; i++)
        {
            sw[i] = weights.IsEmpty ? 1.0 : Math.Sqrt(weights[i]);
        }

        var p = start.ToArray();
        var jac = new double[n * m];
        var r = new double[n];
        var chi2 = Evaluate(model, x, y, sw, p, r, jac);
        if (!double.IsFinite(chi2) || (admissible is not null && !admissible(p)))
        {
            throw new FitFailedException("The model cannot be evaluated at its starting values.");
        }

        var d = new double[m];
        var lambda = 1e-3;
        var trial = new double[m];
        var rTrial = new double[n];
        var jTrial = new double[n * m];
        var work = new double[n * m];
        var qtr = new double[n];
        var stacked = new double[2 * m * m];
        var rhs = new double[2 * m];
        var accepted = 0;
        var smallSteps = 0;
        for (var iter = 0; iter < maxIterations; iter++)
        {
            for (var j = 0; j < m; j++)
            {
                var s = 0.0;
                for (var i = 0; i < n; i++)
                {
                    s += jac[(j * n) + i] * jac[(j * n) + i];
                }

                d[j] = Math.Max(d[j], Math.Sqrt(s));
                if (d[j] == 0)
                {
                    d[j] = 1;
                }
            }

            // One QR of J per iteration: ‖J·δ − r‖² = ‖R·δ − (Qᵀr)₁‖² + const, so each damping trial is only a 2m × m problem.
            Array.Copy(jac, work, jac.Length);
            var qr = new HouseholderQr(work, n, m);
            Array.Copy(r, qtr, n);
            qr.ApplyQt(qtr);
            var upper = qr.UpperTriangle();
            var improved = false;
            while (lambda < 1e16)
            {
                var rows = 2 * m;
                Array.Clear(stacked);
                for (var j = 0; j < m; j++)
                {
                    Array.Copy(upper, j * m, stacked, j * rows, m);
                    stacked[(j * rows) + m + j] = Math.Sqrt(lambda) * d[j];
                }

                Array.Copy(qtr, rhs, m);
                Array.Clear(rhs, m, m);
                var delta = new HouseholderQr(stacked, rows, m).Solve(rhs);
                var stepNorm = 0.0;
                var paramNorm = 0.0;
                for (var j = 0; j < m; j++)
                {
                    trial[j] = p[j] + delta[j];
                    stepNorm += (d[j] * delta[j]) * (d[j] * delta[j]);
                    paramNorm += (d[j] * p[j]) * (d[j] * p[j]);
                }

                var chiTrial = admissible is null || admissible(trial) ? Evaluate(model, x, y, sw, trial, rTrial, jTrial) : double.NaN;
                if (double.IsFinite(chiTrial) && chiTrial <= chi2)
                {
                    var relReduction = (chi2 - chiTrial) / Math.Max(chi2, double.Epsilon);
                    var relStep = Math.Sqrt(stepNorm) / (Math.Sqrt(paramNorm) + 1e-300);
                    (p, trial) = (trial, p);
                    (r, rTrial) = (rTrial, r);
                    (jac, jTrial) = (jTrial, jac);
                    chi2 = chiTrial;
                    lambda = Math.Max(lambda / 10, 1e-15);
                    accepted++;
                    improved = true;
                    smallSteps = (relReduction < 1e-12 && relStep < 1e-8) || relStep < 1e-12 ? smallSteps + 1 : 0;
                    break;
                }

                lambda *= 10;
            }

            if (!improved || smallSteps >= 2 || chi2 == 0)
            {
                break;
            }
        }

        if (lambda >= 1e16 && accepted == 0)
        {
            throw new FitFailedException("Levenberg–Marquardt made no progress from the starting values.");
        }

        return Finish(n, sw, p, r, jac, chi2, accepted);
    }

    private static NonlinearFit Finish(int n, double[] sw, double[] p, double[] r, double[] jac, double chi2, int accepted)
    {
        var m = p.Length;
        var qr = new HouseholderQr((double[])jac.Clone(), n, m);
        if (qr.IsRankDeficient(1e-12))
        {
            throw new FitFailedException("The Jacobian is singular at the solution: the data do not determine every parameter.");
        }

        var dof = n - m;
        var s2 = chi2 / dof;
        var cov = qr.InverseRtR();
        for (var i = 0; i < m; i++)
        {
            for (var j = 0; j < m; j++)
            {
                cov[i, j] *= s2;
            }
        }

        var residuals = new double[n];
        for (var i = 0; i < n; i++)
        {
            residuals[i] = r[i] / sw[i];
        }

        return new NonlinearFit(p, cov, Math.Sqrt(s2), chi2, dof, residuals, qr.Leverages(), accepted);
    }

    private static double Evaluate(IModelFunction model, ReadOnlySpan<double> x, ReadOnlySpan<double> y, double[] sw, double[] p, double[] r, double[] jac)
    {
        var n = x.Length;
        var m = p.Length;
        Span<double> g = stackalloc double[m];
        var chi2 = 0.0;
        for (var i = 0; i < n; i++)
        {
            var f = model.Evaluate(x[i], p, g);
            if (!double.IsFinite(f))
            {
                return double.NaN;
            }

            r[i] = (y[i] - f) * sw[i];
            chi2 += r[i] * r[i];
            for (var j = 0; j < m; j++)
            {
                jac[(j * n) + i] = g[j] * sw[i];
            }
        }

        return chi2;
    }
}

/// <summary>Thrown when a nonlinear fit cannot produce a solution; the message says why.</summary>
public sealed class FitFailedException : Exception
{
    /// <summary>Creates the exception with its reason.</summary>
    public FitFailedException(string message)
        : base(message)
    {
    }

    /// <summary>Creates the exception.</summary>
    public FitFailedException()
    {
    }

    /// <summary>Creates the exception with its reason and cause.</summary>
    public FitFailedException(string message, Exception inner)
        : base(message, inner)
    {
    }
}

using MathNet.Numerics.Distributions;
using ShuntSweep.Analysis.Models;

namespace ShuntSweep.Analysis.Fitting;

/// <summary>A drop model fitted to a range's points, or the reason it could not be.</summary>
internal sealed record CandidateFit(
    IDropModel Model,
    double[] Parameters,
    double[,] Covariance,
    double ChiSquare,
    int DegreesOfFreedom,
    double[] Residuals,
    double[] Leverages,
    string? FailureReason)
{
    /// <summary>Whether the fit succeeded and its parameters are physically valid.</summary>
    public bool Succeeded => FailureReason is null;

    /// <summary>The number of points.</summary>
    public int Points => Residuals.Length;

    /// <summary>AICc = n·ln(χ²/n) + 2K + 2K(K+1)/(n−K−1), K counting the residual scale as a parameter.</summary>
    public double Aicc
    {
        get
        {
            var n = Points;
            var k = Parameters.Length + 1;
            return n - k - 1 <= 0 || !Succeeded ? double.PositiveInfinity : (n * Math.Log(ChiSquare / n)) + (2 * k) + (2.0 * k * (k + 1) / (n - k - 1));
        }
    }

    /// <summary>BIC = n·ln(χ²/n) + K·ln n.</summary>
    public double Bic => Succeeded ? (Points * Math.Log(ChiSquare / Points)) + ((Parameters.Length + 1) * Math.Log(Points)) : double.PositiveInfinity;

    /// <summary>True when two parameters are so correlated (|ρ| > 0.9999) that the data determine only a combination of them; such a fit's
    /// own uncertainties are dominated by that ridge and say nothing reliable about any one quantity.</summary>
    public bool IsDegenerate
    {
        get
        {
            var m = Parameters.Length;
            for (var i = 0; i < m; i++)
            {
                for (var j = i + 1; j < m; j++)
                {
                    var d = Math.Sqrt(Covariance[i, i] * Covariance[j, j]);
                    if (d > 0 && Math.Abs(Covariance[i, j] / d) > 0.9999)
                    {
                        return true;
                    }
                }
            }

            return false;
        }
    }

    /// <summary>The standard uncertainty of the small-signal resistance, propagated from the covariance by a numerical gradient.</summary>
    public double ResistanceUncertainty() => Math.Sqrt(Propagate(p => Model.SmallSignalResistance(p)));

    /// <summary>The variance of g(p) by the law of propagation with a central-difference gradient.</summary>
    public double Propagate(Func<double[], double> g) => Propagation.Variance(g, Parameters, Covariance);
}

/// <summary>The headline resistance of a range and how it was obtained.</summary>
/// <param name="Ohms">The small-signal resistance.</param>
/// <param name="StandardUncertainty">Its Type A standard uncertainty from the fit(s).</param>
/// <param name="DegreesOfFreedom">The degrees of freedom of that uncertainty.</param>
/// <param name="Method"><c>chosen model</c> or <c>Akaike-weighted average</c>.</param>
/// <param name="Models">The models it rests on.</param>
internal sealed record ResistanceChoice(double Ohms, double StandardUncertainty, double DegreesOfFreedom, string Method, IReadOnlyList<string> Models);

/// <summary>Fits drop models to points, by QR for linear models and Levenberg–Marquardt for the rest, and compares them.</summary>
internal static class DropFitter
{
    /// <summary>Fits <paramref name="model"/>; a failure is returned with its reason, never thrown.</summary>
    public static CandidateFit Fit(IDropModel model, DropData data)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(data);
        var start = model.Start(data);
        if (start is null)
        {
            return Failed(model, data, "the points show nothing this model explains");
        }

        try
        {
            if (model.IsLinear)
            {
                var lin = LinearLeastSquares.Fit(data.Current, data.Drop, data.Weight, model.ParameterCount, (x, row) => model.Evaluate(x, start, row));
                return new CandidateFit(model, lin.Parameters, lin.Covariance, lin.ChiSquare, lin.DegreesOfFreedom, lin.Residuals, lin.Leverages, null);
            }

            var imax = data.MaxAbsCurrent;
            var fit = LevenbergMarquardt.Fit(model, data.Current, data.Drop, data.Weight, start, p => model.IsValid(p, imax));
            if (!model.IsValid(fit.Parameters, imax))
            {
                return Failed(model, data, "the fitted parameters are outside the model's validity");
            }

            return new CandidateFit(model, fit.Parameters, fit.Covariance, fit.ChiSquare, fit.DegreesOfFreedom, fit.Residuals, fit.Leverages, null);
        }
        catch (Exception e) when (e is FitFailedException or ArgumentException)
        {
            return Failed(model, data, e.Message);
        }
    }

    /// <summary>The p-value of the F-test of <paramref name="complex"/> against the nested <paramref name="simple"/>.</summary>
    public static double NestedFTest(CandidateFit simple, CandidateFit complex)
    {
        ArgumentNullException.ThrowIfNull(simple);
        ArgumentNullException.ThrowIfNull(complex);
        var extra = complex.Parameters.Length - simple.Parameters.Length;
        if (!simple.Succeeded || !complex.Succeeded || extra <= 0 || complex.DegreesOfFreedom <= 0)
        {
            return double.NaN;
        }

        var f = (simple.ChiSquare - complex.ChiSquare) / extra / (complex.ChiSquare / complex.DegreesOfFreedom);
        return f <= 0 ? 1.0 : 1.0 - FisherSnedecor.CDF(extra, complex.DegreesOfFreedom, f);
    }

    /// <summary>Chooses among successful fits: a model that nests over a simpler one must beat it in the F-test at
    /// <paramref name="significance"/>; among the eligible, the lowest AICc, then the fewest parameters within 2 AICc units of it.</summary>
    /// <remarks>The F-test gate keeps noise from promoting a curved model: a curve chosen by chance biases the resistance it reports.</remarks>
    public static (CandidateFit Chosen, CandidateFit? RunnerUp) Choose(IReadOnlyList<CandidateFit> fits, double significance)
    {
        ArgumentNullException.ThrowIfNull(fits);
        var baseFit = BaseFit(fits);
        var ok = fits.Where(f => f.Succeeded && double.IsFinite(f.Aicc)).ToList();
        var eligible = ok.Where(f => f.Model.NestsOver is null || baseFit is null || NestedFTest(baseFit, f) < significance).ToList();
        if (eligible.Count == 0)
        {
            eligible = ok.Count > 0 ? ok : fits.Where(f => f.Succeeded).ToList();
            if (eligible.Count == 0)
            {
                throw new FitFailedException("No drop model could be fitted: " + string.Join("; ", fits.Select(f => $"{f.Model.Name}: {f.FailureReason}")));
            }
        }

        var best = eligible.Min(f => f.Aicc);
        var chosen = eligible.Where(f => !double.IsFinite(best) || f.Aicc <= best + 2).OrderBy(f => f.Parameters.Length).ThenBy(f => f.Aicc).First();
        var runnerUp = ok.Where(f => f != chosen).OrderBy(f => f.Aicc).FirstOrDefault();
        return (chosen, runnerUp);
    }

    /// <summary>Keeps one fit per physical hypothesis: the first in the registry's order that succeeded; the others are marked as the
    /// same hypothesis, so a law and its approximation never both compete (or both enter an average) with equal evidence.</summary>
    public static IReadOnlyList<CandidateFit> DistinctHypotheses(IReadOnlyList<CandidateFit> fits)
    {
        ArgumentNullException.ThrowIfNull(fits);
        var kept = new Dictionary<string, CandidateFit>(StringComparer.Ordinal);
        foreach (var f in fits.Where(f => f.Succeeded))
        {
            kept.TryAdd(f.Model.Hypothesis, f);
        }

        return fits.Select(f => f.Succeeded && kept[f.Model.Hypothesis] != f
            ? f with { FailureReason = $"the same hypothesis as {kept[f.Model.Hypothesis].Model.Name}, which is the candidate for it" }
            : f).ToList();
    }

    /// <summary>The headline small-signal resistance: the chosen model's own when the choice is clear (no other surviving hypothesis
    /// within 2 AICc units of it), else the Akaike-weighted average over the surviving hypotheses with Burnham and Anderson's
    /// unconditional uncertainty u² = Σ wₘ·(uₘ² + (Rₘ − R̄)²).</summary>
    /// <remarks>Survivors are the successful, non-degenerate fits, one per hypothesis, that the evidence does not reject: the F-test
    /// admits them, or their AICc is lower than the chosen model's (a faint heating the F-test at 1 % cannot confirm yet the
    /// information criterion prefers; leaving it out makes the straight line's slope miss the cold resistance). Curves that are
    /// both F-rejected and worse by AICc are left out: averaging them in inflates an ohmic range's uncertainty (measured by the
    /// coverage runs in the benchmark project). Degrees of freedom are those of the chosen fit.</remarks>
    public static ResistanceChoice HeadlineResistance(IReadOnlyList<CandidateFit> fits, CandidateFit chosen, double significance)
    {
        ArgumentNullException.ThrowIfNull(fits);
        ArgumentNullException.ThrowIfNull(chosen);
        var value = chosen.Model.SmallSignalResistance(chosen.Parameters);
        var own = new ResistanceChoice(value, chosen.ResistanceUncertainty(), chosen.DegreesOfFreedom, "chosen model", [chosen.Model.Name]);
        if (!double.IsFinite(chosen.Aicc))
        {
            return own;
        }

        var baseFit = BaseFit(fits);
        var survivors = fits.Where(f => f == chosen || (f.Succeeded && double.IsFinite(f.Aicc) && !f.IsDegenerate
            && (f.Model.NestsOver is null || baseFit is null || NestedFTest(baseFit, f) < significance || f.Aicc < chosen.Aicc))).ToList();
        if (!survivors.Any(f => f != chosen && f.Aicc < chosen.Aicc + 2))
        {
            return own;
        }

        var best = survivors.Min(f => f.Aicc);
        var weights = survivors.Select(f => Math.Exp(-(f.Aicc - best) / 2)).ToArray();
        var values = survivors.Select(f => f.Model.SmallSignalResistance(f.Parameters)).ToArray();
        var us = survivors.Select(f => f.ResistanceUncertainty()).ToArray();
        var ok = Enumerable.Range(0, survivors.Count).Where(m => double.IsFinite(values[m]) && double.IsFinite(us[m])).ToList();
        var total = ok.Sum(m => weights[m]);
        if (!(total > 0) || ok.Count < 2)
        {
            return own;
        }

        var averaged = ok.Sum(m => weights[m] * values[m]) / total;
        var u = Math.Sqrt(ok.Sum(m => weights[m] / total * ((us[m] * us[m]) + ((values[m] - averaged) * (values[m] - averaged)))));
        return new ResistanceChoice(averaged, u, chosen.DegreesOfFreedom, "Akaike-weighted average", ok.Select(m => survivors[m].Model.Name).ToList());
    }

    /// <summary>The two-parameter straight line every curved model is F-tested against (ohmic, or the amplified shunt in its place).</summary>
    public static CandidateFit? BaseFit(IReadOnlyList<CandidateFit> fits)
    {
        ArgumentNullException.ThrowIfNull(fits);
        return fits.FirstOrDefault(f => f.Succeeded && f.Model.IsLinear && f.Parameters.Length == 2);
    }

    private static CandidateFit Failed(IDropModel model, DropData data, string reason) =>
        new(model, new double[model.ParameterCount], new double[model.ParameterCount, model.ParameterCount], double.NaN, data.Current.Length - model.ParameterCount, new double[data.Current.Length], new double[data.Current.Length], reason);
}

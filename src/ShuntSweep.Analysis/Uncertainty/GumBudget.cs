using MathNet.Numerics.Distributions;

namespace ShuntSweep.Analysis.Uncertainty;

/// <summary>One line of an uncertainty budget.</summary>
/// <param name="Name">The input.</param>
/// <param name="Value">Its estimate.</param>
/// <param name="StandardUncertainty">u(xᵢ).</param>
/// <param name="Sensitivity">cᵢ = ∂f/∂xᵢ at the estimates.</param>
/// <param name="Contribution">uᵢ(y) = |cᵢ|·u(xᵢ).</param>
/// <param name="DegreesOfFreedom">νᵢ (null when infinite).</param>
/// <param name="Distribution">The distribution assigned.</param>
public sealed record BudgetLine(string Name, double Value, double StandardUncertainty, double Sensitivity, double Contribution, double? DegreesOfFreedom, InputDistribution Distribution);

/// <summary>A GUM uncertainty budget (JCGM 100:2008): law of propagation for uncorrelated inputs, Welch–Satterthwaite, t coverage factor.</summary>
/// <param name="Value">y = f(x₁, …, x_N).</param>
/// <param name="CombinedStandardUncertainty">u_c(y).</param>
/// <param name="EffectiveDegreesOfFreedom">ν_eff (null when infinite).</param>
/// <param name="CoverageFactor">k = t_p(ν_eff).</param>
/// <param name="ExpandedUncertainty">U = k·u_c(y).</param>
/// <param name="CoverageProbability">p.</param>
/// <param name="Lines">The budget lines.</param>
public sealed record GumBudget(
    double Value,
    double CombinedStandardUncertainty,
    double? EffectiveDegreesOfFreedom,
    double CoverageFactor,
    double ExpandedUncertainty,
    double CoverageProbability,
    IReadOnlyList<BudgetLine> Lines)
{
    /// <summary>Evaluates the budget of y = f(x) with sensitivity coefficients from central differences of f.</summary>
    public static GumBudget Evaluate(Func<double[], double> f, IReadOnlyList<InputQuantity> inputs, double coverageProbability = 0.95)
    {
        ArgumentNullException.ThrowIfNull(f);
        ArgumentNullException.ThrowIfNull(inputs);
        var x = inputs.Select(i => i.Value).ToArray();
        var y = f(x);
        var lines = new List<BudgetLine>();
        for (var i = 0; i < inputs.Count; i++)
        {
            var inp = inputs[i];
            var h = inp.StandardUncertainty > 0 ? inp.StandardUncertainty * 1e-3 : Math.Max(Math.Abs(inp.Value) * 1e-8, 1e-12);
            var saved = x[i];
            x[i] = saved + h;
            var up = f(x);
            x[i] = saved - h;
            var down = f(x);
            x[i] = saved;
            var c = (up - down) / (2 * h);
            lines.Add(new BudgetLine(inp.Name, inp.Value, inp.StandardUncertainty, c, Math.Abs(c) * inp.StandardUncertainty, double.IsFinite(inp.DegreesOfFreedom) ? inp.DegreesOfFreedom : null, inp.Distribution));
        }

        var uc = Math.Sqrt(lines.Sum(l => l.Contribution * l.Contribution));
        var nu = WelchSatterthwaite(uc, lines.Select(l => (l.Contribution, l.DegreesOfFreedom ?? double.PositiveInfinity)));
        var k = StudentCoverageFactor(nu, coverageProbability);
        return new GumBudget(y, uc, double.IsFinite(nu) ? nu : null, k, k * uc, coverageProbability, lines);
    }

    /// <summary>ν_eff = u_c⁴ / Σ uᵢ⁴/νᵢ (JCGM 100:2008 G.4.1); infinite when every νᵢ is infinite.</summary>
    public static double WelchSatterthwaite(double combined, IEnumerable<(double Contribution, double DegreesOfFreedom)> contributions)
    {
        ArgumentNullException.ThrowIfNull(contributions);
        var denominator = 0.0;
        foreach (var (u, nu) in contributions)
        {
            if (double.IsFinite(nu) && u > 0)
            {
                denominator += Math.Pow(u, 4) / nu;
            }
        }

        return denominator > 0 ? Math.Pow(combined, 4) / denominator : double.PositiveInfinity;
    }

    /// <summary>The two-sided coverage factor t_p(ν): the interval ±t encloses fraction p of the t distribution (normal when ν is infinite).</summary>
    public static double StudentCoverageFactor(double degreesOfFreedom, double coverageProbability)
    {
        var q = 0.5 + (coverageProbability / 2);
        return double.IsFinite(degreesOfFreedom) && degreesOfFreedom < 1e7
            ? StudentT.InvCDF(0, 1, degreesOfFreedom, q)
            : Normal.InvCDF(0, 1, q);
    }
}

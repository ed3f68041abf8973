using MathNet.Numerics.Distributions;

namespace ShuntSweep.Analysis.Uncertainty;

/// <summary>A statement of conformity with a tolerance (ILAC-G8:09/2019 decision rules).</summary>
public enum ConformityVerdict
{
    /// <summary>Inside the acceptance zone.</summary>
    Pass,

    /// <summary>Inside the tolerance but within the guard band of its limit.</summary>
    ConditionalPass,

    /// <summary>Outside the tolerance but within the guard band beyond its limit.</summary>
    ConditionalFail,

    /// <summary>Outside the rejection limit.</summary>
    Fail,
}

/// <summary>The conformity of one measured error with a symmetric tolerance ±L, given its expanded uncertainty U.</summary>
/// <param name="ToleranceLimit">L, the half-width of the specification.</param>
/// <param name="ExpandedUncertainty">U at the stated coverage probability.</param>
/// <param name="SimpleAcceptance">Binary statement with the simple acceptance rule (guard band w = 0, shared risk).</param>
/// <param name="GuardBanded">Non-binary statement with guard band w = U.</param>
/// <param name="TestUncertaintyRatio">TUR = (2·L)/(2·U): tolerance span over the span of the expanded uncertainty.</param>
/// <param name="ProbabilityOfConformance">P(|true error| ≤ L) for a normal (or t) distribution about the measured error.</param>
public sealed record ConformityStatement(
    double ToleranceLimit,
    double ExpandedUncertainty,
    ConformityVerdict SimpleAcceptance,
    ConformityVerdict GuardBanded,
    double TestUncertaintyRatio,
    double ProbabilityOfConformance)
{
    /// <summary>Judges the measured <paramref name="error"/> against ±<paramref name="limit"/>.</summary>
    public static ConformityStatement Judge(double error, double limit, GumBudget budget)
    {
        ArgumentNullException.ThrowIfNull(budget);
        var u = budget.ExpandedUncertainty;
        var a = Math.Abs(error);
        var simple = a <= limit ? ConformityVerdict.Pass : ConformityVerdict.Fail;
        var guarded = a <= limit - u ? ConformityVerdict.Pass
            : a <= limit ? ConformityVerdict.ConditionalPass
            : a <= limit + u ? ConformityVerdict.ConditionalFail
            : ConformityVerdict.Fail;
        var tur = u > 0 ? limit / u : double.PositiveInfinity;
        var uc = budget.CombinedStandardUncertainty;
        double pc;
        if (uc > 0)
        {
            var nu = budget.EffectiveDegreesOfFreedom ?? double.PositiveInfinity;
            Func<double, double> cdf = double.IsFinite(nu) ? z => StudentT.CDF(0, 1, nu, z) : z => Normal.CDF(0, 1, z);
            pc = cdf((limit - error) / uc) - cdf((-limit - error) / uc);
        }
        else
        {
            pc = a <= limit ? 1 : 0;
        }

        return new ConformityStatement(limit, u, simple, guarded, tur, pc);
    }
}

namespace ShuntSweep.Analysis.Uncertainty;

/// <summary>The probability distribution assigned to an input quantity.</summary>
public enum InputDistribution
{
    /// <summary>Gaussian with the given standard uncertainty.</summary>
    Normal,

    /// <summary>Uniform over ±√3·u (a rectangular limit, Type B).</summary>
    Rectangular,

    /// <summary>Scaled and shifted t with ν degrees of freedom (a Type A mean of ν + 1 observations, JCGM 101 6.4.9).</summary>
    StudentT,
}

/// <summary>One input of a measurement model: its estimate, standard uncertainty, degrees of freedom and distribution.</summary>
/// <param name="Name">What the input is, for the budget table.</param>
/// <param name="Value">The estimate xᵢ.</param>
/// <param name="StandardUncertainty">u(xᵢ).</param>
/// <param name="DegreesOfFreedom">νᵢ; infinity for a Type B input taken as exactly known.</param>
/// <param name="Distribution">The distribution used by the Monte Carlo cross-check.</param>
public sealed record InputQuantity(string Name, double Value, double StandardUncertainty, double DegreesOfFreedom, InputDistribution Distribution);

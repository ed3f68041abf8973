namespace ShuntSweep.Analysis.Models;

/// <summary>The exact SI defining constants the models need (CODATA 2018, exact since 2019).</summary>
internal static class PhysicalConstants
{
    /// <summary>The Boltzmann constant k, J/K (exact).</summary>
    public const double Boltzmann = 1.380649e-23;

    /// <summary>The elementary charge e, C (exact).</summary>
    public const double ElementaryCharge = 1.602176634e-19;

    /// <summary>The thermal voltage kT/q in volts at <paramref name="kelvin"/>.</summary>
    public static double ThermalVoltage(double kelvin) => Boltzmann * kelvin / ElementaryCharge;
}

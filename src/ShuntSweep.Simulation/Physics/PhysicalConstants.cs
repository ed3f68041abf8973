namespace ShuntSweep.Simulation.Physics;

/// <summary>Exact SI defining constants (CODATA 2018; exact since the 2019 SI redefinition) and the thermal voltage built from them.</summary>
public static class PhysicalConstants
{
    /// <summary>The Boltzmann constant k in J/K (exact).</summary>
    public const double Boltzmann = 1.380649e-23;

    /// <summary>The elementary charge e in C (exact).</summary>
    public const double ElementaryCharge = 1.602176634e-19;

    /// <summary>0 °C in kelvins.</summary>
    public const double ZeroCelsius = 273.15;

    /// <summary>The thermal voltage V_T = k·T/e at <paramref name="kelvins"/>.</summary>
    public static double ThermalVoltage(double kelvins) => Boltzmann * kelvins / ElementaryCharge;
}

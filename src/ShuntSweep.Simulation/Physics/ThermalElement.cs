namespace ShuntSweep.Simulation.Physics;

/// <summary>A resistor that heats itself: <c>R(T) = R0·(1 + α·(T − T_amb))</c> with a first-order thermal RC to ambient.</summary>
/// <remarks>The thermal ODE <c>C_th·dΔT/dt = P − ΔT/R_th</c> (τ = R_th·C_th) is integrated with the exponential integrator, which is exact
/// for constant power over the step and stable for any step; the caller re-evaluates the power between steps.</remarks>
internal sealed class ThermalElement(double coldResistance, double alpha, double thermalResistance, double timeConstant)
{
    /// <summary>The resistance at ambient temperature, in ohms.</summary>
    public double ColdResistance { get; } = coldResistance;

    /// <summary>The temperature coefficient of resistance, per kelvin.</summary>
    public double Alpha { get; } = alpha;

    /// <summary>The thermal resistance to ambient, in K/W.</summary>
    public double ThermalResistance { get; } = thermalResistance;

    /// <summary>The thermal time constant τ = R_th·C_th, in seconds.</summary>
    public double TimeConstant { get; } = timeConstant;

    /// <summary>The temperature rise above ambient, in kelvins.</summary>
    public double Rise { get; private set; }

    /// <summary>The resistance at the present temperature.</summary>
    public double Resistance => ColdResistance * (1 + (Alpha * Rise));

    /// <summary>Advances the temperature by <paramref name="seconds"/> under a constant dissipated <paramref name="watts"/>.</summary>
    public void Advance(double watts, double seconds)
    {
        var final = ThermalResistance * watts;
        if (TimeConstant <= 0)
        {
            Rise = final;
            return;
        }

        Rise = final + ((Rise - final) * Math.Exp(-seconds / TimeConstant));
    }

    /// <summary>The rise the element would settle at if it dissipated <paramref name="watts"/> for ever.</summary>
    public double SteadyRise(double watts) => ThermalResistance * watts;

    /// <summary>Returns the element to ambient temperature.</summary>
    public void Cool() => Rise = 0;
}

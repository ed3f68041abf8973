namespace ShuntSweep.Core.Quantities;

/// <summary>The SI units a quantity in a ShuntSweep file may carry.</summary>
public enum SiUnit
{
    /// <summary>A plain number.</summary>
    None,

    /// <summary>Ampere, A.</summary>
    Ampere,

    /// <summary>Volt, V.</summary>
    Volt,

    /// <summary>Ohm, Ω (also written <c>ohm</c>).</summary>
    Ohm,

    /// <summary>Second, s (also <c>min</c> and <c>h</c>).</summary>
    Second,

    /// <summary>Watt, W.</summary>
    Watt,

    /// <summary>Hertz, Hz.</summary>
    Hertz,

    /// <summary>Kelvin, K (temperature differences and thermal resistance numerators).</summary>
    Kelvin,

    /// <summary>Degree Celsius, °C (temperatures).</summary>
    Celsius,
}

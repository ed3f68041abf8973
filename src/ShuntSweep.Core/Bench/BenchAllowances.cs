namespace ShuntSweep.Core.Bench;

/// <summary>A measuring instrument's accuracy specification ±(fraction of reading + floor) and its resolution, in the coherent SI unit.</summary>
/// <param name="FractionOfReading">The reading-proportional part of the limit (30 ppm is 3e-5).</param>
/// <param name="Floor">The fixed part of the limit (range or counts term), in volts or amperes.</param>
/// <param name="Resolution">The smallest step the instrument shows; 0 when not stated.</param>
public sealed record MeterSpecification(double FractionOfReading, double Floor, double Resolution)
{
    /// <summary>The specification's half-width at <paramref name="reading"/>.</summary>
    public double Limit(double reading) => (FractionOfReading * Math.Abs(reading)) + Floor;
}

/// <summary>The Type B inputs a bench file states for the uncertainty budget; each limit is the half-width of a rectangular
/// distribution taken as exactly known (ν = ∞, JCGM 100 4.3.7 and G.4.3).</summary>
/// <param name="DropMeter">The voltmeter across the jacks: accuracy and resolution; null when not stated.</param>
/// <param name="Reference">The reference ammeter: accuracy and resolution; null when not stated (its row is then left out and said so).</param>
/// <param name="ThermalEmf">The allowance for thermal EMFs in the drop circuit, volts.</param>
/// <param name="Leads">The allowance for lead and contact resistance not removed by four-wire sensing, ohms.</param>
/// <param name="AmbientCelsius">The ambient temperature of the run, °C; null when not recorded.</param>
public sealed record BenchAllowances(
    MeterSpecification? DropMeter = null,
    MeterSpecification? Reference = null,
    double ThermalEmf = 0,
    double Leads = 0,
    double? AmbientCelsius = null)
{
    /// <summary>No Type B input stated.</summary>
    public static BenchAllowances None { get; } = new();
}

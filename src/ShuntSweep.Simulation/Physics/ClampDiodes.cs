namespace ShuntSweep.Simulation.Physics;

/// <summary>An antiparallel pair of diode strings across a shunt: <c>I = 2·Is·sinh(V/(m·n·V_T))</c> for m diodes in series per direction (Shockley).</summary>
internal sealed class ClampDiodes(double saturationCurrent, double ideality, int seriesCount, double kelvins)
{
    /// <summary>The saturation current Is of one diode, in amperes.</summary>
    public double SaturationCurrent { get; } = saturationCurrent;

    /// <summary>The ideality factor n.</summary>
    public double Ideality { get; } = ideality;

    /// <summary>How many diodes are in series in each direction.</summary>
    public int SeriesCount { get; } = seriesCount;

    /// <summary>The thermal voltage at the diodes' temperature, from the exact CODATA k and e.</summary>
    public double ThermalVoltage { get; } = PhysicalConstants.ThermalVoltage(kelvins);

    /// <summary>The current the pair conducts with <paramref name="volts"/> across it.</summary>
    public double CurrentAt(double volts)
    {
        var x = volts / (SeriesCount * Ideality * ThermalVoltage);
        return 2 * SaturationCurrent * Math.Sinh(Math.Clamp(x, -700, 700));
    }
}

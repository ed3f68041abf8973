using ShuntSweep.Simulation.Physics;

namespace ShuntSweep.Simulation.FrontEnds;

/// <summary>A passive shunt, possibly made of sections shared with other ranges (a ring shunt); the meter converts the shunt voltage
/// with the shunt's calibrated (cold) value, so self-heating of a manganin-like shunt shows as a small reading error.</summary>
internal sealed class ShuntFrontEnd(IReadOnlyList<ThermalElement> sections) : IFrontEnd
{
    /// <summary>The sections in series that form this range's shunt.</summary>
    public IReadOnlyList<ThermalElement> Sections { get; } = sections;

    /// <inheritdoc />
    public IReadOnlyList<ThermalElement> Parts => Sections;

    /// <inheritdoc />
    public double ColdResistance => Sections.Sum(s => s.ColdResistance);

    /// <summary>The shunt's resistance at its present temperature.</summary>
    public double Resistance => Sections.Sum(s => s.Resistance);

    /// <inheritdoc />
    public double ShortestTimeConstant => Sections.Where(s => s.ThermalResistance > 0).Select(s => s.TimeConstant).DefaultIfEmpty(double.PositiveInfinity).Min();

    /// <inheritdoc />
    public double CurrentAt(double volts) => volts / Resistance;

    /// <inheritdoc />
    public double Sensed(double volts) => volts / ColdResistance;

    /// <inheritdoc />
    public void Advance(double volts, double seconds)
    {
        var current = CurrentAt(volts);
        foreach (var s in Sections)
        {
            s.Advance(current * current * s.Resistance, seconds);
        }
    }

    /// <inheritdoc />
    public bool IsSettled(double volts)
    {
        var current = CurrentAt(volts);
        return Sections.All(s => Math.Abs(s.Rise - s.SteadyRise(current * current * s.Resistance)) < 1e-6);
    }
}

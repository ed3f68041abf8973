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

    // The sums and the minimum are plain loops: they run in every step of the circuit's root finder, where LINQ's enumerators and
    // delegates cost more than the arithmetic. Same order of summation, so the same values to the last bit.

    /// <inheritdoc />
    public double ColdResistance
    {
        get
        {
            var sum = 0.0;
            for (var i = 0; i < Sections.Count; i++)
            {
                sum += Sections[i].ColdResistance;
            }

            return sum;
        }
    }

    /// <summary>The shunt's resistance at its present temperature.</summary>
    public double Resistance
    {
        get
        {
            var sum = 0.0;
            for (var i = 0; i < Sections.Count; i++)
            {
                sum += Sections[i].Resistance;
            }

            return sum;
        }
    }

    /// <inheritdoc />
    public double ShortestTimeConstant
    {
        get
        {
            // Infinite when no section heats; NaN if any time constant is NaN (as Enumerable.Min).
            var shortest = double.PositiveInfinity;
            for (var i = 0; i < Sections.Count; i++)
            {
                if (Sections[i].ThermalResistance > 0)
                {
                    var tau = Sections[i].TimeConstant;
                    if (double.IsNaN(tau))
                    {
                        return double.NaN;
                    }

                    shortest = Math.Min(shortest, tau);
                }
            }

            return shortest;
        }
    }

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
        for (var i = 0; i < Sections.Count; i++)
        {
            var s = Sections[i];
            if (!(Math.Abs(s.Rise - s.SteadyRise(current * current * s.Resistance)) < 1e-6))
            {
                return false;
            }
        }

        return true;
    }
}

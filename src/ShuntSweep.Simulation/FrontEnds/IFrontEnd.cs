namespace ShuntSweep.Simulation.FrontEnds;

/// <summary>What a UUT range puts between the fuse and the common jack, and how the meter senses the current through it.</summary>
/// <remarks>Voltages are across the range's terminals (the shunt node), currents through it; <see cref="CurrentAt"/> must increase monotonically
/// with the voltage so that the bench circuit can be solved by bracketing.</remarks>
internal interface IFrontEnd
{
    /// <summary>The resistance the range shows at zero current and ambient temperature, in ohms.</summary>
    double ColdResistance { get; }

    /// <summary>The current through the range with <paramref name="volts"/> across it.</summary>
    double CurrentAt(double volts);

    /// <summary>The current the meter's converter sees with <paramref name="volts"/> across it; ±infinity when the front end saturates.</summary>
    double Sensed(double volts);

    /// <summary>Lets the range's parts heat for <paramref name="seconds"/> with <paramref name="volts"/> across it.</summary>
    void Advance(double volts, double seconds);

    /// <summary>The self-heating parts of the range (shared with other ranges in a ring shunt).</summary>
    IReadOnlyList<Physics.ThermalElement> Parts { get; }

    /// <summary>The shortest thermal time constant of the range's parts (infinity when nothing heats).</summary>
    double ShortestTimeConstant { get; }

    /// <summary>True when every part is within a hair of the temperature it would settle at with <paramref name="volts"/> across it.</summary>
    bool IsSettled(double volts);
}

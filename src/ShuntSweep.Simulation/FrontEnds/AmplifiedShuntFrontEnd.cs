namespace ShuntSweep.Simulation.FrontEnds;

/// <summary>A low-value shunt followed by an amplifier of gain G: the drop stays ohmic (and G times smaller than a plain shunt's),
/// the reading is taken after the amplifier, so its input offset adds a constant and its output swing limits the reading (overload).</summary>
internal sealed class AmplifiedShuntFrontEnd(ShuntFrontEnd shunt, double gain, double inputOffset, double outputSwing) : IFrontEnd
{
    /// <summary>The amplifier's voltage gain.</summary>
    public double Gain { get; } = gain;

    /// <summary>The amplifier's input offset voltage, in volts.</summary>
    public double InputOffset { get; } = inputOffset;

    /// <summary>The largest output magnitude the amplifier reaches, in volts.</summary>
    public double OutputSwing { get; } = outputSwing;

    /// <inheritdoc />
    public IReadOnlyList<Physics.ThermalElement> Parts => shunt.Parts;

    /// <inheritdoc />
    public double ColdResistance => shunt.ColdResistance;

    /// <inheritdoc />
    public double ShortestTimeConstant => shunt.ShortestTimeConstant;

    /// <inheritdoc />
    public double CurrentAt(double volts) => shunt.CurrentAt(volts);

    /// <inheritdoc />
    public double Sensed(double volts)
    {
        var output = Gain * (volts + InputOffset);
        return Math.Abs(output) > OutputSwing
            ? (output > 0 ? double.PositiveInfinity : double.NegativeInfinity)
            : output / (Gain * shunt.ColdResistance);
    }

    /// <inheritdoc />
    public void Advance(double volts, double seconds) => shunt.Advance(volts, seconds);

    /// <inheritdoc />
    public bool IsSettled(double volts) => shunt.IsSettled(volts);
}

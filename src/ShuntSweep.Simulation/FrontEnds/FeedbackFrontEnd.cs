namespace ShuntSweep.Simulation.FrontEnds;

/// <summary>A feedback (transimpedance) ammeter: the input sits at <c>offset + I·R_f/A_OL</c>, a tiny drop, until the output saturates at
/// <c>|I·R_f| = V_swing</c>; beyond that the feedback is lost and the drop rises with slope R_f, a steep knee.</summary>
internal sealed class FeedbackFrontEnd(double feedbackResistance, double openLoopGain, double outputSwing, double inputOffset) : IFrontEnd
{
    /// <summary>The feedback resistance R_f, in ohms.</summary>
    public double FeedbackResistance { get; } = feedbackResistance;

    /// <summary>The amplifier's open-loop gain A_OL.</summary>
    public double OpenLoopGain { get; } = openLoopGain;

    /// <summary>The amplifier's output swing, in volts.</summary>
    public double OutputSwing { get; } = outputSwing;

    /// <summary>The amplifier's input offset, in volts.</summary>
    public double InputOffset { get; } = inputOffset;

    /// <inheritdoc />
    public IReadOnlyList<Physics.ThermalElement> Parts => [];

    /// <inheritdoc />
    public double ColdResistance => FeedbackResistance / OpenLoopGain;

    /// <inheritdoc />
    public double ShortestTimeConstant => double.PositiveInfinity;

    /// <summary>The input voltage at <paramref name="amperes"/> (the forward form of <see cref="CurrentAt"/>).</summary>
    public double VoltageAt(double amperes)
    {
        var magnitude = Math.Abs(amperes) * FeedbackResistance;
        var drop = magnitude <= OutputSwing
            ? magnitude / OpenLoopGain
            : (OutputSwing / OpenLoopGain) + (magnitude - OutputSwing);
        return InputOffset + (Math.Sign(amperes) * drop);
    }

    /// <inheritdoc />
    public double CurrentAt(double volts)
    {
        var u = volts - InputOffset;
        var knee = OutputSwing / OpenLoopGain;
        var magnitude = Math.Abs(u) <= knee
            ? Math.Abs(u) * OpenLoopGain / FeedbackResistance
            : (Math.Abs(u) - knee + OutputSwing) / FeedbackResistance;
        return Math.Sign(u) * magnitude;
    }

    /// <inheritdoc />
    public double Sensed(double volts)
    {
        var current = CurrentAt(volts);
        return Math.Abs(current * FeedbackResistance) > OutputSwing * (1 + 1e-12)
            ? (current > 0 ? double.PositiveInfinity : double.NegativeInfinity)
            : current;
    }

    /// <inheritdoc />
    public void Advance(double volts, double seconds)
    {
    }

    /// <inheritdoc />
    public bool IsSettled(double volts) => true;
}

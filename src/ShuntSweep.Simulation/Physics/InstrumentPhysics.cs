namespace ShuntSweep.Simulation.Physics;

/// <summary>The simulated supply's own physics.</summary>
/// <param name="Identity">The <c>*IDN?</c> answer.</param>
/// <param name="OutputResistance">The output resistance in constant-voltage mode, in ohms.</param>
/// <param name="MaxVoltage">The highest settable voltage, in volts.</param>
/// <param name="MaxCurrent">The highest settable current limit, in amperes.</param>
/// <param name="ReadbackTime">How long a <c>MEASure?</c> averages, in seconds.</param>
/// <param name="VoltageNoise">The readback noise of the voltage (rms), in volts.</param>
/// <param name="CurrentNoise">The readback noise of the current (rms), in amperes.</param>
internal sealed record SupplyPhysics(string Identity, double OutputResistance, double MaxVoltage, double MaxCurrent, double ReadbackTime, double VoltageNoise, double CurrentNoise);

/// <summary>The simulated constant-current load's own physics.</summary>
/// <param name="Identity">The <c>*IDN?</c> answer.</param>
/// <param name="MinimumVoltage">Below this input voltage the load cannot hold its set current: its current falls in proportion (dropout).</param>
/// <param name="MaxCurrent">The highest settable current, in amperes.</param>
/// <param name="ReadbackTime">How long a <c>MEASure?</c> averages, in seconds.</param>
/// <param name="VoltageNoise">The readback noise of the voltage (rms), in volts.</param>
/// <param name="CurrentNoise">The readback noise of the current (rms), in amperes.</param>
internal sealed record LoadPhysics(string Identity, double MinimumVoltage, double MaxCurrent, double ReadbackTime, double VoltageNoise, double CurrentNoise);

/// <summary>The simulated DC voltmeter's physics.</summary>
/// <param name="Identity">The <c>*IDN?</c> answer.</param>
/// <param name="InputResistance">The input resistance on ranges above 10 V (and on all ranges unless <paramref name="HighImpedance"/> is set), in ohms.</param>
/// <param name="HighImpedance">The input resistance on the ranges up to 10 V when the meter offers a high-impedance input there; null otherwise.</param>
/// <param name="NoiseAt1Plc">The reading noise (rms) at 1 NPLC on the 1 V range, in volts; it scales with 1/√NPLC and with the range.</param>
/// <param name="NoiseFloor">Noise that no integration removes (rms), in volts.</param>
/// <param name="OffsetAutoZeroOn">The reading offset with auto-zero on, in volts.</param>
/// <param name="OffsetAutoZeroOff">The reading offset with auto-zero off, in volts.</param>
/// <param name="Overhead">The fixed time a triggered measurement takes besides integration, in seconds.</param>
/// <param name="Counts">The counts of a range at its full scale (resolution = range / counts).</param>
/// <param name="LineFrequency">The power-line frequency that NPLC refers to, in hertz.</param>
internal sealed record VoltmeterPhysics(
    string Identity,
    double InputResistance,
    double? HighImpedance,
    double NoiseAt1Plc,
    double NoiseFloor,
    double OffsetAutoZeroOn,
    double OffsetAutoZeroOff,
    double Overhead,
    double Counts,
    double LineFrequency)
{
    /// <summary>The DC ranges, in volts; readings beyond 120 % of the range are overload.</summary>
    public static readonly double[] Ranges = [0.1, 1, 10, 100, 1000];

    /// <summary>The input resistance on <paramref name="range"/>, in ohms.</summary>
    public double InputResistanceOn(double range) => HighImpedance is { } high && range <= 10 ? high : InputResistance;
}

/// <summary>The simulated reference ammeter's physics: a calibrated shunt in series with the loop.</summary>
/// <param name="Identity">The <c>*IDN?</c> answer.</param>
/// <param name="Shunt">The burden resistance it puts in the loop, in ohms.</param>
/// <param name="NoiseAt1Plc">The reading noise (rms) at 1 NPLC as a fraction of the range.</param>
/// <param name="GainError">The fixed gain error (its calibration error) as a fraction.</param>
/// <param name="Overhead">The fixed time a triggered measurement takes besides integration, in seconds.</param>
/// <param name="LineFrequency">The power-line frequency that NPLC refers to, in hertz.</param>
internal sealed record ReferencePhysics(string Identity, double Shunt, double NoiseAt1Plc, double GainError, double Overhead, double LineFrequency)
{
    /// <summary>The current ranges, in amperes; readings beyond 120 % of the range are overload.</summary>
    public static readonly double[] Ranges = [1e-4, 1e-3, 1e-2, 0.1, 1, 3, 10];
}

using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>The programmable supply that powers the measurement loop.</summary>
public interface ISupply : IInstrument
{
    /// <summary>Sets the output voltage and the current limit (compliance).</summary>
    Task ConfigureAsync(Voltage voltage, Current currentLimit, CancellationToken cancellationToken = default);

    /// <summary>Sets the current limit alone (protecting the jack the loop runs through), checked by read-back where the instrument can be asked.</summary>
    Task SetCurrentLimitAsync(Current limit, CancellationToken cancellationToken = default);

    /// <summary>Reads the current limit in force; null when the instrument cannot be asked.</summary>
    Task<Current?> ReadCurrentLimitAsync(CancellationToken cancellationToken = default);

    /// <summary>Sets the over-voltage protection level, checked by read-back; false when the instrument has none.</summary>
    Task<bool> SetOverVoltageProtectionAsync(Voltage level, CancellationToken cancellationToken = default);

    /// <summary>Turns the output on or off.</summary>
    Task SetOutputAsync(bool enabled, CancellationToken cancellationToken = default);

    /// <summary>Asks whether the output is on.</summary>
    Task<bool> IsOutputOnAsync(CancellationToken cancellationToken = default);

    /// <summary>Measures the output voltage.</summary>
    Task<Voltage> MeasureVoltageAsync(CancellationToken cancellationToken = default);

    /// <summary>Measures the output current.</summary>
    Task<Current> MeasureCurrentAsync(CancellationToken cancellationToken = default);
}

/// <summary>The electronic load in constant-current mode that sets the loop current.</summary>
public interface IElectronicLoad : IInstrument
{
    /// <summary>Selects constant-current mode at <paramref name="level"/>.</summary>
    Task SetConstantCurrentAsync(Current level, CancellationToken cancellationToken = default);

    /// <summary>Turns the input on or off.</summary>
    Task SetInputAsync(bool enabled, CancellationToken cancellationToken = default);

    /// <summary>Asks whether the input is on.</summary>
    Task<bool> IsInputOnAsync(CancellationToken cancellationToken = default);

    /// <summary>Measures the voltage across the load's input.</summary>
    Task<Voltage> MeasureVoltageAsync(CancellationToken cancellationToken = default);

    /// <summary>Measures the current through the load.</summary>
    Task<Current> MeasureCurrentAsync(CancellationToken cancellationToken = default);

    /// <summary>Asks whether the load holds its set current (false in dropout or with an open loop).</summary>
    Task<bool> IsRegulatingAsync(CancellationToken cancellationToken = default);
}

/// <summary>Settings of a DC voltmeter.</summary>
/// <param name="Range">The DC voltage range; null selects autorange.</param>
/// <param name="Nplc">The integration time in power-line cycles.</param>
/// <param name="AutoZero">Whether the meter re-measures its zero for every reading.</param>
/// <param name="SamplesPerTrigger">How many readings one arm takes.</param>
public sealed record VoltmeterSettings(Voltage? Range, double Nplc, bool AutoZero, int SamplesPerTrigger);

/// <summary>The voltmeter across the UUT's jacks (the burden voltage), or across a reference shunt.</summary>
public interface IVoltmeter : ITriggeredMeter
{
    /// <summary>Configures DC voltage measurement.</summary>
    Task ConfigureAsync(VoltmeterSettings settings, CancellationToken cancellationToken = default);
}

/// <summary>The UUT's own reading, however it is obtained (SCPI, a serial stream, or the operator).</summary>
public interface IUutMeter : ITriggeredMeter
{
    /// <summary>Selects <paramref name="range"/> on the UUT, where the UUT can be told remotely.</summary>
    Task SelectRangeAsync(RangeSpec range, CancellationToken cancellationToken = default);
}

/// <summary>The reference ammeter whose reading is taken as the true loop current.</summary>
public interface IReferenceAmmeter : ITriggeredMeter
{
    /// <summary>Selects a range able to carry <paramref name="maximum"/>.</summary>
    Task ConfigureAsync(Current maximum, double nplc, CancellationToken cancellationToken = default);

    /// <summary>The shunt a voltmeter reads across when the reference is V / R (its value and standard uncertainty, for the uncertainty budget); null for an ammeter.</summary>
    ReferenceShunt? Shunt => null;
}

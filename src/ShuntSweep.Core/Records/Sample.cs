using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Core.Records;

/// <summary>One sample of a characterisation: what was set and what every instrument read at that moment.</summary>
/// <param name="Range">The UUT range in use.</param>
/// <param name="Jack">The UUT jack in use.</param>
/// <param name="Step">The 0-based index of the step (point) in the run plan.</param>
/// <param name="SampleIndex">The 0-based index of the sample within its point.</param>
/// <param name="Setpoint">The current the load was set to.</param>
/// <param name="Reference">The reference current (the reference ammeter, or the load's own reading where there is none).</param>
/// <param name="UutReading">The UUT's reading; NaN when the UUT is not read or shows overload.</param>
/// <param name="Burden">The voltage across the UUT's jacks.</param>
/// <param name="SupplyVoltage">The supply's measured output voltage.</param>
/// <param name="LoadVoltage">The load's measured input voltage.</param>
/// <param name="Elapsed">Time since the start of the run.</param>
/// <param name="ShuntTap">The voltage across the range's shunt read by a tap voltmeter inside the UUT; null when the bench has none.</param>
public sealed record Sample(
    string Range,
    string Jack,
    int Step,
    int SampleIndex,
    Current Setpoint,
    Current Reference,
    double UutReading,
    Voltage Burden,
    Voltage SupplyVoltage,
    Voltage LoadVoltage,
    TimeSpan Elapsed,
    Voltage? ShuntTap = null);

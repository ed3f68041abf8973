namespace ShuntSweep.Simulation.Physics;

/// <summary>The solved state of the bench loop at one instant (SI units).</summary>
/// <param name="LoopCurrent">The current through supply, wiring, reference and load (the UUT's current plus the voltmeter's).</param>
/// <param name="UutCurrent">The current through the UUT's jacks.</param>
/// <param name="JackVoltage">The voltage across the UUT's jacks (the burden voltage the voltmeter sees).</param>
/// <param name="ShuntVoltage">The voltage across the selected range's front end.</param>
/// <param name="SensedCurrent">The current the UUT's converter senses (±infinity when its front end saturates).</param>
/// <param name="SupplyVoltage">The voltage at the supply's terminals.</param>
/// <param name="LoadVoltage">The voltage at the load's input.</param>
/// <param name="Regulating">True when the load holds its set current.</param>
/// <param name="SupplyLimited">True when the supply is in its current limit.</param>
internal readonly record struct OperatingPoint(
    double LoopCurrent,
    double UutCurrent,
    double JackVoltage,
    double ShuntVoltage,
    double SensedCurrent,
    double SupplyVoltage,
    double LoadVoltage,
    bool Regulating,
    bool SupplyLimited);

using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Core.Bench;

/// <summary>The job an instrument does on the bench.</summary>
public enum InstrumentRole
{
    /// <summary>The programmable supply that powers the loop.</summary>
    Supply,

    /// <summary>The electronic load in constant-current mode that sets the loop current.</summary>
    Load,

    /// <summary>The voltmeter across the UUT's jacks that reads the burden voltage.</summary>
    DropMeter,

    /// <summary>The UUT's own reading.</summary>
    UutMeter,

    /// <summary>The reference ammeter (or a voltmeter across a reference shunt).</summary>
    Reference,

    /// <summary>An optional second voltmeter wired by the UUT's designers across the selected range's shunt, inside the UUT;
    /// it splits the drop into the shunt's part and the jack's series part (fuse, contacts) without any hypothesis.</summary>
    ShuntTap,
}

/// <summary>One instrument of the bench: its role, where it is, and its driver settings (read by the instrument layer).</summary>
/// <param name="Role">What the instrument does.</param>
/// <param name="Resource">Its VISA-syntax resource string, for example <c>TCPIP::192.0.2.10::5025::SOCKET</c> or <c>SIM::supply</c>.</param>
/// <param name="Settings">The whole mapping of the instrument, for the instrument layer to read strictly.</param>
/// <param name="Calibration">The instrument's calibration certificate and due date, when the bench file records them.</param>
public sealed record InstrumentEntry(InstrumentRole Role, string Resource, MappingReader Settings, InstrumentCalibration? Calibration = null);

/// <summary>The electrical limits and settings of the supply side of the loop.</summary>
/// <param name="Voltage">The voltage the supply is set to during a sweep.</param>
/// <param name="CurrentLimit">The supply's current limit (compliance) during a sweep.</param>
/// <param name="MaxPower">The supply's rated power.</param>
public sealed record SupplySettings(Voltage Voltage, Current CurrentLimit, Power MaxPower);

/// <summary>The limits of the constant-current load.</summary>
/// <param name="MinimumVoltage">The lowest voltage across the load at which it still regulates (dropout).</param>
/// <param name="MaxCurrent">The load's rated current.</param>
/// <param name="MaxPower">The load's rated power.</param>
public sealed record LoadSettings(Voltage MinimumVoltage, Current MaxCurrent, Power MaxPower);

/// <summary>A bench: instruments by role, the loop's electrical settings, the UUT on it, and (for a simulated bench) the simulation section.</summary>
/// <param name="Name">A name for reports and the archive.</param>
/// <param name="File">The file the bench came from.</param>
/// <param name="Uut">The UUT described in (or referenced by) the bench file.</param>
/// <param name="Supply">The supply's settings.</param>
/// <param name="Load">The load's limits.</param>
/// <param name="Wiring">The estimated resistance of the loop wiring, leads and contacts outside the UUT.</param>
/// <param name="Instruments">The instruments by role.</param>
/// <param name="Simulation">The <c>simulation</c> mapping, read by the simulator; null for a real bench.</param>
/// <param name="Allowances">The Type B inputs of the uncertainty budget (<c>uncertainty</c> and <c>ambient</c> keys); none when absent.</param>
public sealed record BenchDescription(
    string Name,
    string File,
    UutDescription Uut,
    SupplySettings Supply,
    LoadSettings Load,
    Resistance Wiring,
    IReadOnlyDictionary<InstrumentRole, InstrumentEntry> Instruments,
    MappingReader? Simulation,
    BenchAllowances? Allowances = null)
{
    /// <summary>True when every instrument is in-process simulated (resource <c>SIM::…</c>).</summary>
    public bool IsSimulated => Instruments.Values.All(i => i.Resource.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase));

    /// <summary>How many days before an instrument's calibration due date a run warns. The default value is 30.</summary>
    public int CalibrationWarningDays { get; init; } = 30;
}

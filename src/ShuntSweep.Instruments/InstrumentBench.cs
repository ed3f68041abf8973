using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments.Drivers;

namespace ShuntSweep.Instruments;

/// <summary>The connected bench: one driver per role and the clock they run on.</summary>
/// <remarks>Disposing closes every connection; it does not switch outputs off (the runner does that first, and confirms it).</remarks>
public sealed class InstrumentBench(
    IBenchClock clock,
    ISupply supply,
    IElectronicLoad load,
    IVoltmeter dropMeter,
    IUutMeter? uutMeter,
    IReferenceAmmeter? reference,
    IReadOnlyList<IAsyncDisposable> connections,
    IReadOnlyList<ConnectedInstrument>? instruments = null,
    IVoltmeter? shuntTap = null,
    TimeProvider? ioTime = null) : IAsyncDisposable
{
    /// <summary>The clock of the bench (virtual for an in-process simulation).</summary>
    public IBenchClock Clock { get; } = clock;

    /// <summary>The time source of I/O deadlines: the wall clock, also when the bench itself runs on virtual time, because instruments answer in real time.</summary>
    public TimeProvider IoTime { get; } = ioTime ?? TimeProvider.System;

    /// <summary>The supply.</summary>
    public ISupply Supply { get; } = supply;

    /// <summary>The constant-current load.</summary>
    public IElectronicLoad Load { get; } = load;

    /// <summary>The voltmeter across the UUT's jacks.</summary>
    public IVoltmeter DropMeter { get; } = dropMeter;

    /// <summary>The UUT's reading, when the bench can take it.</summary>
    public IUutMeter? UutMeter { get; } = uutMeter;

    /// <summary>The reference ammeter, when the bench has one.</summary>
    public IReferenceAmmeter? Reference { get; } = reference;

    /// <summary>The tap voltmeter across the selected range's shunt inside the UUT, when the bench has one.</summary>
    public IVoltmeter? ShuntTap { get; } = shuntTap;

    /// <summary>Who answered at each role when the bench was connected (identity, profile, errors left in the queue), for the run manifest.</summary>
    public IReadOnlyList<ConnectedInstrument> Instruments { get; } = instruments ?? [];

    /// <inheritdoc />
    public async ValueTask DisposeAsync()
    {
        foreach (var c in connections)
        {
            await c.DisposeAsync();
        }
    }
}

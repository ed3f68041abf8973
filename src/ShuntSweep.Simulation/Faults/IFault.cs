using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Faults;

/// <summary>A fault declared in the bench file's <c>simulation.faults</c>: it may act on the physics at a set time, on a command as it arrives,
/// or on the reply on its way back. New kinds implement this and are named in <see cref="FaultReader"/>.</summary>
internal interface IFault
{
    /// <summary>The instrument whose connection the fault watches (<c>supply</c>, <c>load</c>, <c>dmm</c>, <c>uut</c>, <c>ref</c>), or null for a bench-wide fault.</summary>
    string? Instrument { get; }

    /// <summary>Called once when the bench is built: a fault set to a time schedules itself on the circuit here.</summary>
    void Attach(BenchCircuit circuit);

    /// <summary>Called when a command line has arrived on the watched instrument, before it is executed.</summary>
    void OnCommand(FaultContext context);

    /// <summary>Called with each reply of the watched instrument (terminator included); returns what goes on the wire instead.</summary>
    ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken);
}

/// <summary>What a fault may touch on one connection of one instrument.</summary>
internal sealed class FaultContext(string instrument, ScpiInstrument scpi, BenchCircuit circuit, IBenchClock clock, SeededRandom random)
{
    /// <summary>The instrument's name.</summary>
    public string Instrument { get; } = instrument;

    /// <summary>The instrument's SCPI front (its error queue, its reset).</summary>
    public ScpiInstrument Scpi { get; } = scpi;

    /// <summary>The bench circuit.</summary>
    public BenchCircuit Circuit { get; } = circuit;

    /// <summary>The bench clock.</summary>
    public IBenchClock Clock { get; } = clock;

    /// <summary>The fault stream's seeded generator.</summary>
    public SeededRandom Random { get; } = random;

    /// <summary>How many command lines the instrument has received (this one included).</summary>
    public int Commands { get; set; }

    /// <summary>Set by a fault to close the connection instead of executing the command.</summary>
    public bool DropConnection { get; set; }

    /// <summary>Set by a fault to stop the instrument for good: from this command on it executes nothing and answers nothing, on every connection, while its outputs stay as they were (a hung firmware).</summary>
    public bool Hang { get; set; }

    /// <summary>Set by a fault to take the instrument off the network for good: this connection closes and new ones are closed at once, while its outputs stay as they were (a pulled cable).</summary>
    public bool Unplug { get; set; }
}

/// <summary>When a fault fires: after the watched instrument has received N command lines, or at a time after the start of the simulation.</summary>
/// <param name="AfterCommands">Fires on the N-th command line (1-based), when set.</param>
/// <param name="At">Fires at this time after the start, when set.</param>
internal sealed record FaultTrigger(int? AfterCommands, TimeSpan? At)
{
    /// <summary>True when the trigger condition holds for <paramref name="context"/>.</summary>
    public bool Holds(FaultContext context) =>
        (AfterCommands is { } n && context.Commands >= n)
        || (At is { } t && context.Clock.Now() >= context.Circuit.Start + t)
        || (AfterCommands is null && At is null);
}

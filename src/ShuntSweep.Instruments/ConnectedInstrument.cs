using ShuntSweep.Core.Bench;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments;

/// <summary>What was found when an instrument was connected: who it is, which profile drives it, and what was left in its error queue.</summary>
/// <param name="Role">The instrument's role on the bench.</param>
/// <param name="Resource">Its resource string.</param>
/// <param name="Identity">Its answer to <c>*IDN?</c>.</param>
/// <param name="Profile">The name of the profile that drives it.</param>
/// <param name="StartupErrors">Errors found in its queue on connection (left from before; recorded, not fatal).</param>
public sealed record ConnectedInstrument(
    InstrumentRole Role,
    string Resource,
    InstrumentIdentity Identity,
    string Profile,
    IReadOnlyList<InstrumentError> StartupErrors);

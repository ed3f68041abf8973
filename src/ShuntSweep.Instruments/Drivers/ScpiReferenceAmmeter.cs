using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A reference ammeter: a meter in DC current mode driven by the commands of its profile.</summary>
internal sealed class ScpiReferenceAmmeter(MessageSession session, InstrumentProfile profile, MeterTiming timing, InstrumentResilience? resilience = null)
    : ScpiTriggeredMeter(session, profile, "reference", timing, resilience), IReferenceAmmeter
{
    public async Task ConfigureAsync(Current maximum, double nplc, CancellationToken cancellationToken = default)
    {
        var commands = new List<string>(Profile.Commands("reference.configure", maximum.Abs().Amperes));
        if (Profile.Supports("reference.setNplc"))
        {
            commands.AddRange(Profile.Commands("reference.setNplc", nplc, Timing.LineFrequency));
        }

        await ApplyAsync("configuration", commands, $"configuring current measurement up to {maximum} at {nplc} NPLC", null, safeOff: false, cancellationToken);
        SetIntegration(nplc, 1);
    }
}

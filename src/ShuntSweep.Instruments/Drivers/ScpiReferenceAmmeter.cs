using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A reference ammeter: a meter in DC current mode driven by the commands of its profile.</summary>
internal sealed class ScpiReferenceAmmeter(MessageSession session, InstrumentProfile profile, MeterTiming timing)
    : ScpiTriggeredMeter(session, profile, "reference", timing), IReferenceAmmeter
{
    public async Task ConfigureAsync(Current maximum, double nplc, CancellationToken cancellationToken = default)
    {
        var commands = new List<string>(Profile.Commands("reference.configure", maximum.Abs().Amperes));
        if (Profile.Supports("reference.setNplc"))
        {
            commands.AddRange(Profile.Commands("reference.setNplc", nplc));
        }

        await SendCheckedAsync(commands, $"configuring current measurement up to {maximum} at {nplc} NPLC", cancellationToken);
        SetIntegration(nplc, 1);
    }
}

using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A DC voltmeter driven by the commands of its profile.</summary>
internal sealed class ScpiVoltmeter(MessageSession session, InstrumentProfile profile, MeterTiming timing, InstrumentResilience? resilience = null)
    : ScpiTriggeredMeter(session, profile, "voltmeter", timing, resilience), IVoltmeter
{
    public async Task ConfigureAsync(VoltmeterSettings settings, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var commands = new List<string>();
        commands.AddRange(Profile.CommandsOrAuto("voltmeter.configure", settings.Range?.Volts));
        commands.AddRange(Profile.Commands("voltmeter.setNplc", settings.Nplc, Timing.LineFrequency));
        if (Profile.Supports("voltmeter.setAutoZero"))
        {
            commands.AddRange(Profile.Commands("voltmeter.setAutoZero", settings.AutoZero));
        }

        if (Profile.Supports("voltmeter.setSamples"))
        {
            commands.AddRange(Profile.Commands("voltmeter.setSamples", settings.SamplesPerTrigger));
        }
        else if (settings.SamplesPerTrigger != 1)
        {
            throw new NotSupportedException($"the profile '{Profile.Name}' has no voltmeter.setSamples, so the meter takes one reading per arm, not {settings.SamplesPerTrigger}.");
        }

        commands.AddRange(Profile.Commands("voltmeter.setTrigger"));
        await ApplyAsync("configuration", commands, $"configuring {settings}", null, safeOff: false, cancellationToken);
        SetIntegration(settings.Nplc, settings.SamplesPerTrigger);
    }
}

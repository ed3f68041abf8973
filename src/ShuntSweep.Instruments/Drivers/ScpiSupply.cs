using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A programmable supply driven by the commands of its profile.</summary>
internal sealed class ScpiSupply(MessageSession session, InstrumentProfile profile) : ScpiInstrument(session, profile), ISupply
{
    public Task ConfigureAsync(Voltage voltage, Current currentLimit, CancellationToken cancellationToken = default) =>
        SendCheckedAsync(
            [.. Profile.Commands("supply.setCurrentLimit", currentLimit.Amperes), .. Profile.Commands("supply.setVoltage", voltage.Volts)],
            $"setting {voltage} with a {currentLimit} limit",
            cancellationToken);

    public Task SetOutputAsync(bool enabled, CancellationToken cancellationToken = default) =>
        SendCheckedAsync(Profile.Commands("supply.setOutput", enabled), enabled ? "turning the output on" : "turning the output off", cancellationToken);

    public Task<bool> IsOutputOnAsync(CancellationToken cancellationToken = default) =>
        QueryBooleanAsync("supply.queryOutput", cancellationToken);

    public async Task<Voltage> MeasureVoltageAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("supply.measureVoltage", null, cancellationToken), "measuring the output voltage"));

    public async Task<Current> MeasureCurrentAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("supply.measureCurrent", null, cancellationToken), "measuring the output current"));
}

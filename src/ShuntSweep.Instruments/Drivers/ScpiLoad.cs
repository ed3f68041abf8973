using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>An electronic load in constant-current mode driven by the commands of its profile.</summary>
internal sealed class ScpiLoad(MessageSession session, InstrumentProfile profile) : ScpiInstrument(session, profile), IElectronicLoad
{
    private readonly int _regulationLostMask = profile.Supports("load.regulationLostMask")
        ? int.Parse(profile.Commands("load.regulationLostMask")[0], System.Globalization.CultureInfo.InvariantCulture)
        : 0;

    public Task SetConstantCurrentAsync(Current level, CancellationToken cancellationToken = default) =>
        SendCheckedAsync(
            [.. Profile.Commands("load.setMode"), .. Profile.Commands("load.setCurrent", level.Amperes)],
            $"setting constant current {level}",
            cancellationToken);

    public Task SetInputAsync(bool enabled, CancellationToken cancellationToken = default) =>
        SendCheckedAsync(Profile.Commands("load.setInput", enabled), enabled ? "turning the input on" : "turning the input off", cancellationToken);

    public Task<bool> IsInputOnAsync(CancellationToken cancellationToken = default) =>
        QueryBooleanAsync("load.queryInput", cancellationToken);

    public async Task<Voltage> MeasureVoltageAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("load.measureVoltage", null, cancellationToken), "measuring the input voltage"));

    public async Task<Current> MeasureCurrentAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("load.measureCurrent", null, cancellationToken), "measuring the input current"));

    public async Task<bool> IsRegulatingAsync(CancellationToken cancellationToken = default) =>
        (await QueryIntegerAsync("load.queryRegulation", cancellationToken) & _regulationLostMask) == 0;
}

using System.Globalization;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>An electronic load in constant-current mode driven by the commands of its profile.</summary>
internal sealed class ScpiLoad(MessageSession session, InstrumentProfile profile, InstrumentResilience? resilience = null)
    : ScpiInstrument(session, profile, resilience), IElectronicLoad
{
    private readonly int _regulationLostMask = profile.Supports("load.regulationLostMask")
        ? int.Parse(profile.Commands("load.regulationLostMask")[0], NumberStyles.None, CultureInfo.InvariantCulture)
        : 0;

    private bool _modeSet;

    public async Task SetConstantCurrentAsync(Current level, CancellationToken cancellationToken = default)
    {
        if (!_modeSet && Profile.Supports("load.setMode"))
        {
            await ApplyAsync("mode", Profile.Commands("load.setMode"), "selecting constant-current mode", null, safeOff: false, cancellationToken);
            _modeSet = true;
        }

        await ApplyAsync(
            "current",
            Profile.Commands("load.setCurrent", level.Amperes),
            $"setting constant current {level}",
            VerifyNumber("load.queryCurrent", level.Amperes, "load.setCurrent"),
            safeOff: false,
            cancellationToken);
    }

    public Task SetInputAsync(bool enabled, CancellationToken cancellationToken = default) =>
        ApplyAsync(
            null,
            Profile.Commands("load.setInput", enabled),
            enabled ? "turning the input on" : "turning the input off",
            VerifyBoolean("load.queryInput", enabled),
            safeOff: !enabled,
            cancellationToken);

    public Task<bool> IsInputOnAsync(CancellationToken cancellationToken = default) =>
        QueryBooleanAsync("load.queryInput", cancellationToken);

    public async Task<Voltage> MeasureVoltageAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("load.measureVoltage", null, cancellationToken), "measuring the input voltage"));

    public async Task<Current> MeasureCurrentAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("load.measureCurrent", null, cancellationToken), "measuring the input current"));

    public async Task<bool> IsRegulatingAsync(CancellationToken cancellationToken = default) =>
        (await QueryIntegerAsync("load.queryRegulation", cancellationToken) & _regulationLostMask) == 0;
}

using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A programmable supply driven by the commands of its profile.</summary>
internal sealed class ScpiSupply(MessageSession session, InstrumentProfile profile, InstrumentResilience? resilience = null)
    : ScpiInstrument(session, profile, resilience), ISupply
{
    public async Task ConfigureAsync(Voltage voltage, Current currentLimit, CancellationToken cancellationToken = default)
    {
        // The limit first, so that the new voltage never drives the loop with the old, possibly higher, limit.
        await SetCurrentLimitAsync(currentLimit, cancellationToken);
        await ApplyAsync(
            "voltage",
            Profile.Commands("supply.setVoltage", voltage.Volts),
            $"setting the voltage to {voltage}",
            VerifyNumber("supply.queryVoltage", voltage.Volts, "supply.setVoltage"),
            safeOff: false,
            cancellationToken);
    }

    /// <remarks>A profile whose number format has fewer decimals than the limit sends the limit rounded down, never up.</remarks>
    public Task SetCurrentLimitAsync(Current limit, CancellationToken cancellationToken = default)
    {
        var amperes = Profile.Supports("supply.setCurrentLimit") ? Profile.Operation("supply.setCurrentLimit").TowardZero(limit.Amperes) : limit.Amperes;
        return ApplyAsync(
            "current limit",
            Profile.Commands("supply.setCurrentLimit", amperes),
            $"setting the current limit to {limit}",
            VerifyNumber("supply.queryCurrentLimit", amperes, "supply.setCurrentLimit"),
            safeOff: false,
            cancellationToken);
    }

    public async Task<Current?> ReadCurrentLimitAsync(CancellationToken cancellationToken = default) =>
        Profile.Supports("supply.queryCurrentLimit")
            ? new Current(Finite(await QueryNumberAsync("supply.queryCurrentLimit", null, cancellationToken), "reading the current limit"))
            : null;

    public async Task<bool> SetOverVoltageProtectionAsync(Voltage level, CancellationToken cancellationToken = default)
    {
        if (!Profile.Supports("supply.setOverVoltage"))
        {
            return false;
        }

        await ApplyAsync(
            "over-voltage protection",
            Profile.Commands("supply.setOverVoltage", Profile.Operation("supply.setOverVoltage").TowardZero(level.Volts)),
            $"setting the over-voltage protection to {level}",
            VerifyNumber("supply.queryOverVoltage", Profile.Operation("supply.setOverVoltage").TowardZero(level.Volts), "supply.setOverVoltage"),
            safeOff: false,
            cancellationToken);
        return true;
    }

    public Task SetOutputAsync(bool enabled, CancellationToken cancellationToken = default) =>
        ApplyAsync(
            null,
            Profile.Commands("supply.setOutput", enabled),
            enabled ? "turning the output on" : "turning the output off",
            VerifyBoolean("supply.queryOutput", enabled),
            safeOff: !enabled,
            cancellationToken);

    public Task<bool> IsOutputOnAsync(CancellationToken cancellationToken = default) =>
        QueryBooleanAsync("supply.queryOutput", cancellationToken);

    public async Task<Voltage> MeasureVoltageAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("supply.measureVoltage", null, cancellationToken), "measuring the output voltage"));

    public async Task<Current> MeasureCurrentAsync(CancellationToken cancellationToken = default) =>
        new(Finite(await QueryNumberAsync("supply.measureCurrent", null, cancellationToken), "measuring the output current"));
}

using ShuntSweep.Core.Uut;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A UUT with a SCPI remote interface: the range is selected by its full scale, readings are armed and fetched.</summary>
internal sealed class ScpiUutMeter : ScpiTriggeredMeter, IUutMeter
{
    private readonly double _nplc;

    public ScpiUutMeter(MessageSession session, InstrumentProfile profile, MeterTiming timing, double nplc, InstrumentResilience? resilience = null)
        : base(session, profile, "uut", timing, resilience)
    {
        _nplc = nplc;
        SetIntegration(nplc, 1);
    }

    /// <summary>Sets the UUT's integration time from the bench file, where its profile can.</summary>
    public Task ApplyNplcAsync(CancellationToken cancellationToken) =>
        Profile.Supports("uut.setNplc")
            ? ApplyAsync("nplc", Profile.Commands("uut.setNplc", _nplc, Timing.LineFrequency), $"setting {_nplc} NPLC", null, safeOff: false, cancellationToken)
            : Task.CompletedTask;

    public Task SelectRangeAsync(RangeSpec range, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(range);
        return ApplyAsync("range", Profile.CommandsForRange("uut.selectRange", range.Name, range.FullScale.Amperes), $"selecting the range {range.Name}", null, safeOff: false, cancellationToken);
    }
}

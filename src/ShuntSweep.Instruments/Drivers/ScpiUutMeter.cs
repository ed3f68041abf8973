using ShuntSweep.Core.Uut;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A UUT with a SCPI remote interface: the range is selected by its full scale, readings are armed and fetched.</summary>
internal sealed class ScpiUutMeter : ScpiTriggeredMeter, IUutMeter
{
    public ScpiUutMeter(MessageSession session, InstrumentProfile profile, MeterTiming timing, double nplc)
        : base(session, profile, "uut", timing) => SetIntegration(nplc, 1);

    public Task SelectRangeAsync(RangeSpec range, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(range);
        return SendCheckedAsync(Profile.Commands("uut.selectRange", range.FullScale.Amperes), $"selecting the range {range.Name}", cancellationToken);
    }
}

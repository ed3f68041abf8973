using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A meter measured by arm (INITiate) then fetch (FETCh?), whose fetch timeout follows its integration time.</summary>
internal abstract class ScpiTriggeredMeter(MessageSession session, InstrumentProfile profile, string section, MeterTiming timing, InstrumentResilience? resilience)
    : ScpiInstrument(session, profile, resilience), ITriggeredMeter
{
    private double _nplc = 1;
    private int _samples = 1;

    public MeterTiming Timing { get; } = timing;

    public TimeSpan MeasurementTime => Timing.MeasurementTime(_nplc, _samples);

    /// <summary>Sends the arm command without reading the error queue, so that arming several meters takes one write each.</summary>
    public Task ArmAsync(CancellationToken cancellationToken = default) =>
        OnceAsync(
            async ct =>
            {
                foreach (var c in Profile.Commands($"{section}.arm"))
                {
                    await Session.WriteAsync(c, ct);
                }

                return true;
            },
            cancellationToken);

    /// <summary>Fetches the armed readings; the timeout is the session's plus margin × the measurement time, so long integrations do not time out.</summary>
    public Task<IReadOnlyList<double>> FetchAsync(CancellationToken cancellationToken = default)
    {
        var query = Profile.Query($"{section}.fetch");
        var timeout = Timing.FetchTimeout(Session.Options.Timeout, MeasurementTime);
        return OnceAsync<IReadOnlyList<double>>(
            async ct =>
            {
                var values = Parse(query, await Session.QueryAsync(query, timeout, ct), a => Profile.ParseNumbers($"{section}.fetch", a));
                return values.Length == _samples
                    ? values
                    : throw new InstrumentProtocolException(Resource, $"'{query}' returned {values.Length} readings; {_samples} were configured.");
            },
            cancellationToken);
    }

    /// <summary>Records the integration the meter was just configured with, for <see cref="MeasurementTime"/>.</summary>
    protected void SetIntegration(double nplc, int samples)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(nplc);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(samples);
        _nplc = nplc;
        _samples = samples;
    }
}

using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A meter measured by arm (INITiate) then fetch (FETCh?), whose fetch timeout follows its integration time.</summary>
internal abstract class ScpiTriggeredMeter(MessageSession session, InstrumentProfile profile, string section, MeterTiming timing)
    : ScpiInstrument(session, profile), ITriggeredMeter
{
    private double _nplc = 1;
    private int _samples = 1;

    public MeterTiming Timing { get; } = timing;

    public TimeSpan MeasurementTime => Timing.MeasurementTime(_nplc, _samples);

    public Task ArmAsync(CancellationToken cancellationToken = default) => SendAsync(Profile.Commands($"{section}.arm"), cancellationToken);

    public async Task<IReadOnlyList<double>> FetchAsync(CancellationToken cancellationToken = default)
    {
        var query = Profile.Query($"{section}.fetch");
        var answer = await Session.QueryAsync(query, Timing.FetchTimeout(Session.Options.Timeout, MeasurementTime), cancellationToken);
        var values = Parse(query, answer, static a => ScpiResponse.ParseNumbers(a));
        return values.Length == _samples
            ? values
            : throw new InstrumentProtocolException(Resource, $"'{query}' returned {values.Length} readings; {_samples} were configured.");
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

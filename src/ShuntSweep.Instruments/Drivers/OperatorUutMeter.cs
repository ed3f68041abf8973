using ShuntSweep.Core.Uut;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A UUT read by the operator: arming does nothing, fetching asks the person to type what the display shows.</summary>
internal sealed class OperatorUutMeter(string resource, IReadingEntry entry) : IUutMeter
{
    private RangeSpec? _range;

    public string Resource { get; } = resource;

    public TimeSpan MeasurementTime => TimeSpan.Zero;

    public Task<InstrumentIdentity> IdentifyAsync(CancellationToken cancellationToken = default) =>
        Task.FromResult(new InstrumentIdentity("operator", "typed reading", "-", "-"));

    /// <summary>Remembers the range for the prompt; the operator has selected it on the UUT by hand.</summary>
    public Task SelectRangeAsync(RangeSpec range, CancellationToken cancellationToken = default)
    {
        _range = range;
        return Task.CompletedTask;
    }

    public Task ArmAsync(CancellationToken cancellationToken = default) => Task.CompletedTask;

    public async Task<IReadOnlyList<double>> FetchAsync(CancellationToken cancellationToken = default) =>
        [await entry.AskReadingAsync(_range is null ? "UUT reading" : $"UUT reading on the {_range.Name} range", cancellationToken)];
}

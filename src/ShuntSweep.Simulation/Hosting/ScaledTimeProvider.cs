namespace ShuntSweep.Simulation.Hosting;

/// <summary>A time source that runs <c>speed</c> times faster than another (the system clock for <c>sim serve --speed</c>), timers included.</summary>
/// <remarks>Its time starts at the inner source's present; a speed of 1 is real time. Thread-safe.</remarks>
public sealed class ScaledTimeProvider : TimeProvider
{
    private readonly TimeProvider _inner;
    private readonly double _speed;
    private readonly DateTimeOffset _origin;
    private readonly long _start;

    /// <summary>Creates the scaled source over <paramref name="inner"/>.</summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="speed"/> is not a positive finite number.</exception>
    public ScaledTimeProvider(TimeProvider inner, double speed)
    {
        ArgumentNullException.ThrowIfNull(inner);
        if (!double.IsFinite(speed) || speed <= 0)
        {
            throw new ArgumentOutOfRangeException(nameof(speed), speed, "The speed must be a positive number (1 = real time).");
        }

        _inner = inner;
        _speed = speed;
        _origin = inner.GetUtcNow();
        _start = inner.GetTimestamp();
    }

    /// <inheritdoc />
    public override DateTimeOffset GetUtcNow() => _origin + TimeSpan.FromTicks((long)(_inner.GetElapsedTime(_start).Ticks * _speed));

    /// <inheritdoc />
    public override long TimestampFrequency => TimeSpan.TicksPerSecond;

    /// <inheritdoc />
    public override long GetTimestamp() => GetUtcNow().UtcTicks;

    /// <inheritdoc />
    public override TimeZoneInfo LocalTimeZone => _inner.LocalTimeZone;

    /// <inheritdoc />
    public override ITimer CreateTimer(TimerCallback callback, object? state, TimeSpan dueTime, TimeSpan period) =>
        new ScaledTimer(_inner.CreateTimer(callback, state, Scale(dueTime), Scale(period)), this);

    private TimeSpan Scale(TimeSpan span) =>
        span == Timeout.InfiniteTimeSpan || span <= TimeSpan.Zero ? span : TimeSpan.FromTicks(Math.Max(1, (long)(span.Ticks / _speed)));

    private sealed class ScaledTimer(ITimer inner, ScaledTimeProvider owner) : ITimer
    {
        public bool Change(TimeSpan dueTime, TimeSpan period) => inner.Change(owner.Scale(dueTime), owner.Scale(period));

        public void Dispose() => inner.Dispose();

        public ValueTask DisposeAsync() => inner.DisposeAsync();
    }
}

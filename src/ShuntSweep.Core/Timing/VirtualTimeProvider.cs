namespace ShuntSweep.Core.Timing;

/// <summary>A <see cref="TimeProvider"/> whose time moves only when told to, and only forward; timers fire as it passes them.</summary>
/// <remarks>Thread-safe. Used for simulated runs and tests so that they are fast and deterministic.</remarks>
public sealed class VirtualTimeProvider : TimeProvider
{
    /// <summary>The default start instant of a virtual run: 2026-01-01T00:00:00Z.</summary>
    public static readonly DateTimeOffset DefaultStart = new(2026, 1, 1, 0, 0, 0, TimeSpan.Zero);

    private readonly Lock _gate = new();
    private readonly List<VirtualTimer> _timers = [];
    private DateTimeOffset _now;

    /// <summary>Creates a virtual clock starting at <paramref name="start"/> (default <see cref="DefaultStart"/>).</summary>
    public VirtualTimeProvider(DateTimeOffset? start = null) => _now = start ?? DefaultStart;

    /// <inheritdoc />
    public override DateTimeOffset GetUtcNow()
    {
        lock (_gate)
        {
            return _now;
        }
    }

    /// <inheritdoc />
    public override long TimestampFrequency => TimeSpan.TicksPerSecond;

    /// <inheritdoc />
    public override long GetTimestamp() => GetUtcNow().UtcTicks;

    /// <inheritdoc />
    public override TimeZoneInfo LocalTimeZone => TimeZoneInfo.Utc;

    /// <summary>Moves time forward by <paramref name="delta"/>.</summary>
    public void Advance(TimeSpan delta)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(delta, TimeSpan.Zero);
        AdvanceTo(GetUtcNow() + delta);
    }

    /// <summary>Moves time forward to <paramref name="instant"/>; an instant in the past changes nothing.</summary>
    public void AdvanceTo(DateTimeOffset instant)
    {
        while (true)
        {
            VirtualTimer? due;
            lock (_gate)
            {
                due = _timers.Where(t => t.Due <= instant).MinBy(t => t.Due);
                if (due is null)
                {
                    if (instant > _now)
                    {
                        _now = instant;
                    }

                    return;
                }

                if (due.Due > _now)
                {
                    _now = due.Due;
                }

                if (due.Period is { } p && p > TimeSpan.Zero)
                {
                    due.Due += p;
                }
                else
                {
                    _timers.Remove(due);
                }
            }

            due.Fire();
        }
    }

    /// <inheritdoc />
    public override ITimer CreateTimer(TimerCallback callback, object? state, TimeSpan dueTime, TimeSpan period)
    {
        var timer = new VirtualTimer(this, callback, state);
        timer.Change(dueTime, period);
        return timer;
    }

    private sealed class VirtualTimer(VirtualTimeProvider owner, TimerCallback callback, object? state) : ITimer
    {
        public DateTimeOffset Due { get; set; }

        public TimeSpan? Period { get; private set; }

        public void Fire() => callback(state);

        public bool Change(TimeSpan dueTime, TimeSpan period)
        {
            lock (owner._gate)
            {
                owner._timers.Remove(this);
                if (dueTime == Timeout.InfiniteTimeSpan)
                {
                    return true;
                }

                Due = owner._now + dueTime;
                Period = period == Timeout.InfiniteTimeSpan ? null : period;
                owner._timers.Add(this);
            }

            if (dueTime == TimeSpan.Zero)
            {
                owner.AdvanceTo(owner.GetUtcNow());
            }

            return true;
        }

        public void Dispose()
        {
            lock (owner._gate)
            {
                owner._timers.Remove(this);
            }
        }

        public ValueTask DisposeAsync()
        {
            Dispose();
            return ValueTask.CompletedTask;
        }
    }
}

namespace ShuntSweep.Core.Timing;

/// <summary>The one place where the bench waits: dwell, settling and integration all pass through here so that simulated runs cost no wall time.</summary>
/// <remarks>Implementations are thread-safe. Waiting until a past instant returns at once.</remarks>
public interface IBenchClock
{
    /// <summary>The time source that stamps samples and events.</summary>
    TimeProvider Time { get; }

    /// <summary>Waits until <paramref name="deadline"/> on this clock.</summary>
    ValueTask WaitUntilAsync(DateTimeOffset deadline, CancellationToken cancellationToken = default);
}

/// <summary>Extension helpers for <see cref="IBenchClock"/>.</summary>
public static class BenchClockExtensions
{
    /// <summary>Waits for <paramref name="duration"/> from now.</summary>
    public static ValueTask WaitAsync(this IBenchClock clock, TimeSpan duration, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(clock);
        return clock.WaitUntilAsync(clock.Time.GetUtcNow() + duration, cancellationToken);
    }

    /// <summary>The current instant of the clock.</summary>
    public static DateTimeOffset Now(this IBenchClock clock)
    {
        ArgumentNullException.ThrowIfNull(clock);
        return clock.Time.GetUtcNow();
    }
}

/// <summary>Waits in real time on a <see cref="TimeProvider"/> (the system clock on a real bench).</summary>
public sealed class RealBenchClock(TimeProvider time) : IBenchClock
{
    /// <inheritdoc />
    public TimeProvider Time { get; } = time;

    /// <inheritdoc />
    public async ValueTask WaitUntilAsync(DateTimeOffset deadline, CancellationToken cancellationToken = default)
    {
        var wait = deadline - Time.GetUtcNow();
        if (wait > TimeSpan.Zero)
        {
            await Task.Delay(wait, Time, cancellationToken);
        }
    }
}

/// <summary>Waits in virtual time: waiting moves the clock forward at once, so a simulated hour of dwell takes no wall time.</summary>
/// <remarks>Concurrent waits until the same deadline advance the clock once, which is why a point read by three instruments together costs the longest integration, not the sum.</remarks>
public sealed class VirtualBenchClock(VirtualTimeProvider time) : IBenchClock
{
    /// <summary>The virtual time source.</summary>
    public VirtualTimeProvider Virtual { get; } = time;

    /// <inheritdoc />
    public TimeProvider Time => Virtual;

    /// <inheritdoc />
    public ValueTask WaitUntilAsync(DateTimeOffset deadline, CancellationToken cancellationToken = default)
    {
        cancellationToken.ThrowIfCancellationRequested();
        Virtual.AdvanceTo(deadline);
        return ValueTask.CompletedTask;
    }
}

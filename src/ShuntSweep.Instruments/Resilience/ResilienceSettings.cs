using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Instruments.Resilience;

/// <summary>How hard the drivers try before giving up on an instrument (bench file key <c>resilience</c> of each instrument).</summary>
/// <param name="Retries">Further attempts of an operation that is safe to repeat after a timeout or a lost connection; the default value is 2.</param>
/// <param name="RetryDelay">The pause before the first retry (doubling after each); the default value is 200 ms.</param>
/// <param name="OperationTimeout">The most one operation may take, retries included; the default value is 60 s.</param>
/// <param name="BreakerFailureRatio">The share of failed operations within <paramref name="BreakerWindow"/> that opens the circuit; the default value is 0.5.</param>
/// <param name="BreakerMinimumThroughput">How many operations the window must hold before the ratio counts (at least 2); the default value is 4.</param>
/// <param name="BreakerWindow">The sampling window of the breaker; the default value is 30 s.</param>
/// <param name="BreakerPause">How long the circuit stays open, refusing operations so that the run aborts; the default value is 30 s.</param>
public sealed record ResilienceSettings(
    int Retries = 2,
    TimeSpan? RetryDelay = null,
    TimeSpan? OperationTimeout = null,
    double BreakerFailureRatio = 0.5,
    int BreakerMinimumThroughput = 4,
    TimeSpan? BreakerWindow = null,
    TimeSpan? BreakerPause = null)
{
    /// <summary>The defaults.</summary>
    public static ResilienceSettings Default { get; } = new();

    /// <summary>The retry delay.</summary>
    public TimeSpan Delay => RetryDelay ?? TimeSpan.FromMilliseconds(200);

    /// <summary>The operation timeout.</summary>
    public TimeSpan Timeout => OperationTimeout ?? TimeSpan.FromSeconds(60);

    /// <summary>The breaker's window.</summary>
    public TimeSpan Window => BreakerWindow ?? TimeSpan.FromSeconds(30);

    /// <summary>The breaker's open time.</summary>
    public TimeSpan Pause => BreakerPause ?? TimeSpan.FromSeconds(30);

    /// <summary>Reads the optional <c>resilience</c> mapping strictly.</summary>
    public static ResilienceSettings Read(MappingReader? map)
    {
        if (map is null)
        {
            return Default;
        }

        var retries = map.IntOr("retries", 2, 0, 10);
        var delay = map.QuantityOr("retryDelay", SiUnit.Second, 0.2, Allowed.Between(0, 3600, SiUnit.Second));
        var timeout = map.QuantityOr("operationTimeout", SiUnit.Second, 60, Allowed.UpTo(86400, SiUnit.Second));
        var breaker = map.Mapping("breaker");
        var ratio = breaker?.Optional("failureRatio")?.AsQuantity(SiUnit.None) ?? 0.5;
        var minimum = breaker?.IntOr("minimumThroughput", 4, 2, 1000) ?? 4;
        var window = breaker?.QuantityOr("window", SiUnit.Second, 30, Allowed.Between(0.5, 86400, SiUnit.Second)) ?? 30;
        var pause = breaker?.QuantityOr("pause", SiUnit.Second, 30, Allowed.Between(0.5, 86400, SiUnit.Second)) ?? 30;
        breaker?.Finish();
        map.Finish();
        if (delay < 0 || timeout <= 0 || ratio is <= 0 or > 1 || window < 0.5 || pause < 0.5)
        {
            throw map.Error($"{map.What}: need retryDelay ≥ 0, operationTimeout > 0, breaker.failureRatio in (0, 1], breaker.window and breaker.pause ≥ 0.5 s.");
        }

        return new ResilienceSettings(retries, TimeSpan.FromSeconds(delay), TimeSpan.FromSeconds(timeout), ratio, minimum, TimeSpan.FromSeconds(window), TimeSpan.FromSeconds(pause));
    }
}

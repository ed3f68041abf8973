using Polly;
using Polly.CircuitBreaker;
using Polly.Retry;
using Polly.Timeout;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Resilience;

/// <summary>How an operation may be repeated when it fails on the way (timeout, lost connection).</summary>
internal enum Repetition
{
    /// <summary>Safe to repeat: a query, or a setting that is re-verified by query before it is sent again.</summary>
    Repeatable,

    /// <summary>Must not be repeated (arm, fetch, a setting with no query to verify it).</summary>
    Once,

    /// <summary>Switching an output off: repeated, and never refused by an open circuit.</summary>
    SafeOff,
}

/// <summary>The Polly pipelines of one instrument: a timeout per operation, retries of what is safe to repeat, and one circuit breaker.</summary>
/// <remarks>
/// Only timeouts and lost connections are retried (the session reconnects on the next attempt); an error reported by the
/// instrument is an answer and is never retried. Every operation passes one shared breaker: once it opens, operations fail at
/// once with a clear message so that the run aborts, except switching outputs off, which skips the breaker.
/// </remarks>
internal sealed class InstrumentResilience
{
    private readonly ResiliencePipeline _retrying;
    private readonly ResiliencePipeline _single;
    private readonly ResiliencePipeline _breaker;

    private InstrumentResilience(string resource, ResiliencePipeline retrying, ResiliencePipeline single, ResiliencePipeline breaker)
    {
        Resource = resource;
        _retrying = retrying;
        _single = single;
        _breaker = breaker;
    }

    public string Resource { get; }

    /// <summary>No resilience: each operation runs once, with no breaker.</summary>
    public static InstrumentResilience Direct(string resource) =>
        new(resource, ResiliencePipeline.Empty, ResiliencePipeline.Empty, ResiliencePipeline.Empty);

    public static InstrumentResilience Create(string resource, ResilienceSettings settings, TimeProvider time)
    {
        ArgumentNullException.ThrowIfNull(settings);
        var transient = new PredicateBuilder().Handle<InstrumentTimeoutException>().Handle<InstrumentConnectionException>();

        var retrying = new ResiliencePipelineBuilder { TimeProvider = time, Name = resource }
            .AddTimeout(new TimeoutStrategyOptions { Timeout = settings.Timeout });
        if (settings.Retries > 0)
        {
            retrying.AddRetry(new RetryStrategyOptions
            {
                ShouldHandle = transient,
                MaxRetryAttempts = settings.Retries,
                Delay = settings.Delay,
                BackoffType = DelayBackoffType.Exponential,
                UseJitter = false,
            });
        }

        var single = new ResiliencePipelineBuilder { TimeProvider = time, Name = resource }
            .AddTimeout(new TimeoutStrategyOptions { Timeout = settings.Timeout });

        var breaker = new ResiliencePipelineBuilder { TimeProvider = time, Name = resource }
                .AddCircuitBreaker(new CircuitBreakerStrategyOptions
                {
                    ShouldHandle = transient,
                    FailureRatio = settings.BreakerFailureRatio,
                    MinimumThroughput = settings.BreakerMinimumThroughput,
                    SamplingDuration = settings.Window,
                    BreakDuration = settings.Pause,
                })
                .Build();

        return new InstrumentResilience(resource, retrying.Build(), single.Build(), breaker);
    }

    /// <summary>Runs <paramref name="operation"/> under the pipeline its <paramref name="repetition"/> allows; Polly's own exceptions become instrument exceptions.</summary>
    public async Task<T> RunAsync<T>(Repetition repetition, Func<int, CancellationToken, Task<T>> operation, CancellationToken cancellationToken)
    {
        var attempt = 0;
        try
        {
            // The callbacks hand their tasks straight on (Polly catches what they throw as it would a faulted task): no state machine per
            // layer on an exchange that completes at once, as every exchange with the in-process simulator does.
            return repetition switch
            {
                Repetition.Repeatable => await _retrying.ExecuteAsync(
                    ct => _breaker.ExecuteAsync(ct2 => new ValueTask<T>(operation(attempt++, ct2)), ct), cancellationToken),
                Repetition.Once => await _single.ExecuteAsync(
                    ct => _breaker.ExecuteAsync(ct2 => new ValueTask<T>(operation(attempt++, ct2)), ct), cancellationToken),
                _ => await _retrying.ExecuteAsync(ct => new ValueTask<T>(operation(attempt++, ct)), cancellationToken),
            };
        }
        catch (BrokenCircuitException ex)
        {
            throw new InstrumentConnectionException(Resource, $"the instrument failed repeatedly and is no longer used (circuit open); the run must stop. {ex.Message}", ex);
        }
        catch (TimeoutRejectedException ex)
        {
            throw new InstrumentTimeoutException(Resource, $"the operation did not finish within {QuantityFormatter.Format(ex.Timeout.TotalSeconds, SiUnit.Second)}, retries included.", ex.Timeout);
        }
    }
}

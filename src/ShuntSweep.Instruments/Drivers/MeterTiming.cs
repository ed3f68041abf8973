namespace ShuntSweep.Instruments.Drivers;

/// <summary>How long an integrating meter takes per arm, and how long a fetch may take, from NPLC, samples and the power-line frequency.</summary>
/// <param name="LineFrequency">The mains frequency the NPLC counts in, Hz; the default value is 50 Hz.</param>
/// <param name="Overhead">Fixed time per arm on top of the integration (autozero, ranging, transfer); the default value is 10 ms.</param>
/// <param name="Margin">How many times the expected measurement time a fetch may take before it times out; the default value is 2.</param>
public sealed record MeterTiming(double LineFrequency = 50, TimeSpan? Overhead = null, double Margin = 2)
{
    /// <summary>The default timing: 50 Hz mains, 10 ms overhead, margin 2.</summary>
    public static MeterTiming Default { get; } = new();

    /// <summary>The fixed overhead per arm.</summary>
    public TimeSpan OverheadTime => Overhead ?? TimeSpan.FromMilliseconds(10);

    /// <summary>The time of one arm: samples × NPLC / line frequency + overhead.</summary>
    public TimeSpan MeasurementTime(double nplc, int samples) =>
        TimeSpan.FromSeconds(samples * nplc / LineFrequency) + OverheadTime;

    /// <summary>The timeout of a fetch: the base timeout plus margin × the measurement time.</summary>
    public TimeSpan FetchTimeout(TimeSpan baseTimeout, TimeSpan measurementTime) => baseTimeout + (Margin * measurementTime);
}

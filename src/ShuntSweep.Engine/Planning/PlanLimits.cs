namespace ShuntSweep.Engine.Planning;

/// <summary>How large a plan may be: bounds that keep a mistyped or generated sequence from allocating gigabytes or running for years.</summary>
/// <remarks>The sequence reader refuses a file that exceeds them while it reads (before a long list is expanded); the planner checks the totals again.</remarks>
public static class PlanLimits
{
    /// <summary>The most points (sweep points, holds and ramps) in one plan: 100 000.</summary>
    public const int MaxPoints = 100_000;

    /// <summary>The most samples one plan records: 5 000 000 journal rows (about half a gigabyte of journal).</summary>
    public const long MaxSamples = 5_000_000;

    /// <summary>The longest planned duration of a run, and of one hold or ramp: 7 days.</summary>
    public static readonly TimeSpan MaxDuration = TimeSpan.FromDays(7);

    /// <summary><see cref="MaxDuration"/> in words.</summary>
    public const string MaxDurationText = "7 days";

    /// <summary>The longest dwell or settling wait of one point: 1 hour.</summary>
    public static readonly TimeSpan MaxWait = TimeSpan.FromHours(1);

    /// <summary><see cref="MaxWait"/> in words.</summary>
    public const string MaxWaitText = "1 h";

    /// <summary>The highest sampling rate of a hold: 1 kHz, beyond what a bench voltmeter integrating over a fraction of a line cycle delivers.</summary>
    public const double MaxHoldRateHz = 1000;
}

namespace ShuntSweep.Reporting;

/// <summary>How a run ended, in words a person reads: the event log records the runner's end code (<c>SafetyAbort</c>), reports and the
/// command line say what it means.</summary>
public static class RunEndWords
{
    /// <summary>The end code given to a run whose event log has no end-of-run record (a crash or power loss cut it off).</summary>
    public const string CutOff = "CutOff";

    /// <summary>The plain words for the end code <paramref name="code"/>, or the code itself when it is not one the runner writes.</summary>
    public static string Describe(string? code) => code switch
    {
        "Completed" => "completed",
        "SafetyAbort" => "stopped for safety",
        "InstrumentFailure" => "stopped: an instrument failed",
        "Interrupted" => "interrupted",
        CutOff => "cut off (no end-of-run record)",
        null or "" => "unknown",
        _ => code,
    };

    /// <summary>A stable lower-case token for the end code, for JSON and scripts (<c>completed</c>, <c>safety-stop</c>, <c>instrument-failure</c>,
    /// <c>interrupted</c>).</summary>
    public static string Token(string? code) => code switch
    {
        "Completed" => "completed",
        "SafetyAbort" => "safety-stop",
        "InstrumentFailure" => "instrument-failure",
        "Interrupted" => "interrupted",
        CutOff => "cut-off",
        _ => "unknown",
    };
}

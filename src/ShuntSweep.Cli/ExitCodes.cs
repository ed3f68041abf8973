namespace ShuntSweep.Cli;

/// <summary>The process exit codes of <c>shuntsweep</c>, documented in the README.</summary>
internal static class ExitCodes
{
    /// <summary>Everything ran and passed.</summary>
    public const int Success = 0;

    /// <summary>A compare or conformity check failed (the command ran, the result is outside its limits).</summary>
    public const int CheckFailed = 1;

    /// <summary>A file or option is invalid (the message gives file, line and column).</summary>
    public const int InvalidInput = 2;

    /// <summary>The planner refused the sequence on this bench; no output was touched.</summary>
    public const int UnsafePlan = 3;

    /// <summary>A safety condition aborted the run; outputs were turned off.</summary>
    public const int SafetyAbort = 4;

    /// <summary>An instrument failed or did not answer; outputs were turned off where possible.</summary>
    public const int InstrumentFailure = 5;

    /// <summary>The run completed but its report or archive entry could not be written; the journal and result are safe in the run directory.</summary>
    public const int RecordFailed = 6;

    /// <summary>The run was interrupted (Ctrl-C or SIGTERM); outputs were turned off and the run can be resumed.</summary>
    public const int Interrupted = 130;
}

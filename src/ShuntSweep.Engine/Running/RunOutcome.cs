namespace ShuntSweep.Engine.Running;

/// <summary>How a run ended; each kind has its own process exit code.</summary>
public enum RunEnd
{
    /// <summary>Every step ran.</summary>
    Completed,

    /// <summary>A safety condition stopped the run (drop too high, load out of regulation, open circuit, UUT overload, operator abort).</summary>
    SafetyAbort,

    /// <summary>An instrument stopped answering or answered with an error.</summary>
    InstrumentFailure,

    /// <summary>The run was cancelled (Ctrl-C, SIGTERM).</summary>
    Interrupted,
}

/// <summary>The end of a run: how it ended, why, how far it got, and whether the outputs were confirmed off.</summary>
/// <param name="End">How the run ended.</param>
/// <param name="Message">The cause in the operator's words.</param>
/// <param name="StepsDone">How many plan steps completed.</param>
/// <param name="OutputsConfirmedOff">True when the load input and supply output were read back as off.</param>
public sealed record RunOutcome(RunEnd End, string Message, int StepsDone, bool OutputsConfirmedOff);

/// <summary>A safety condition that ends a run.</summary>
public sealed class SafetyAbortException(string message) : Exception(message);

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
/// <param name="Off">What switching each output-bearing instrument off achieved.</param>
public sealed record RunOutcome(RunEnd End, string Message, int StepsDone, IReadOnlyList<OffCheck> Off)
{
    /// <summary>True when the load input and the supply output were both read back as off.</summary>
    public bool OutputsConfirmedOff => Off.Count > 0 && Off.All(c => c.Confirmed);
}

/// <summary>How a run is conducted beyond its plan.</summary>
/// <param name="ConfirmBeforeOutputs">Ask the operator before outputs first turn on (a real bench).</param>
/// <param name="Downtime">For a resumed run, how long the bench stood between the interruption and the resume; journalled with the resume.</param>
/// <param name="ConcurrentQueries">Ask independent instruments at the same time where the order does not matter (a bench of separate connections); off keeps every exchange in one order, as virtual time needs.</param>
public sealed record RunnerOptions(bool ConfirmBeforeOutputs = false, TimeSpan? Downtime = null, bool ConcurrentQueries = false);

/// <summary>A safety condition that ends a run.</summary>
public sealed class SafetyAbortException(string message) : Exception(message);

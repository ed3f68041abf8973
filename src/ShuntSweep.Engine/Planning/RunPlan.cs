using ShuntSweep.Core.Quantities;
using ShuntSweep.Engine.Sequences;

namespace ShuntSweep.Engine.Planning;

/// <summary>One concrete step of a run, in the order the runner executes it; its index is the journal's <c>step</c>.</summary>
/// <param name="Index">The 0-based position of the step in the plan.</param>
/// <param name="Line">The line of the sequence item the step came from (0 for steps the planner added).</param>
public abstract record PlanStep(int Index, int Line);

/// <summary>A step that carries current through a range.</summary>
public abstract record CurrentStep(int Index, int Line, string Range, string Jack) : PlanStep(Index, Line);

/// <summary>Set one current, settle, take samples.</summary>
public sealed record MeasureStep(int Index, int Line, string Range, string Jack, Current Setpoint, PointSettings Settings)
    : CurrentStep(Index, Line, Range, Jack);

/// <summary>Hold one current for a time, sampling at a fixed interval.</summary>
public sealed record HoldStep(int Index, int Line, string Range, string Jack, Current Setpoint, TimeSpan Duration, TimeSpan Interval, PointSettings Settings)
    : CurrentStep(Index, Line, Range, Jack);

/// <summary>Move the set current in equal steps over a time, without recording.</summary>
public sealed record RampStep(int Index, int Line, string Range, string Jack, Current From, Current To, TimeSpan Duration, int Steps)
    : CurrentStep(Index, Line, Range, Jack);

/// <summary>Ask the operator to do something and wait for the answer.</summary>
/// <param name="Index">The step's index.</param>
/// <param name="Line">The sequence line, or 0 when the planner added the prompt.</param>
/// <param name="Id">A stable name for answer files.</param>
/// <param name="Text">The instruction.</param>
/// <param name="OutputsOff">Whether outputs are turned off first.</param>
/// <param name="Jack">For a re-wiring prompt, the jack the lead goes to; the simulated operator acts on it.</param>
/// <param name="Range">For a range prompt, the range to select.</param>
public sealed record PromptStep(int Index, int Line, string Id, string Text, bool OutputsOff, string? Jack, string? Range) : PlanStep(Index, Line);

/// <summary>Something that makes a plan unsafe or impossible, with where it came from.</summary>
/// <param name="Step">The plan step concerned.</param>
/// <param name="Line">The sequence line.</param>
/// <param name="Message">What is wrong, in the operator's words.</param>
public sealed record PlanViolation(int Step, int Line, string Message);

/// <summary>How long a plan is expected to take on its bench, and how much of that rests on the settling waits.</summary>
/// <param name="Total">The expected duration: the instruments' reading and command times, dwells, holds and ramps, and the settling waits
/// (those learned from an earlier run, else the fewest readings the settling rule can decide on).</param>
/// <param name="AdaptivePoints">Points that wait for the drop to settle.</param>
/// <param name="LearnedPoints">Of those, the points whose wait was taken from an earlier run of the sequence.</param>
/// <param name="LongestExtra">How much longer the run would take at most if every adaptive point not learned waited its maxWait.</param>
public sealed record RunEstimate(TimeSpan Total, int AdaptivePoints, int LearnedPoints, TimeSpan LongestExtra);

/// <summary>The expanded, checked plan of a run.</summary>
/// <param name="Steps">The steps in order.</param>
/// <param name="Estimate">The expected duration on the bench, from the bench file's instrument timing.</param>
/// <param name="Violations">Everything that makes the plan unsafe; a plan with any is refused.</param>
public sealed record RunPlan(IReadOnlyList<PlanStep> Steps, RunEstimate Estimate, IReadOnlyList<PlanViolation> Violations)
{
    /// <summary>The expected duration on the bench.</summary>
    public TimeSpan EstimatedDuration => Estimate.Total;

    /// <summary>True when the plan may run.</summary>
    public bool IsSafe => Violations.Count == 0;

    /// <summary>The number of recorded samples the plan will produce.</summary>
    public long SampleCount => Steps.Sum(s => s switch
    {
        MeasureStep m => (long)m.Settings.Samples,
        HoldStep h => HoldSamples(h),
        _ => 0L,
    });

    /// <summary>The number of samples a hold records.</summary>
    public static int HoldSamples(HoldStep hold)
    {
        ArgumentNullException.ThrowIfNull(hold);
        return Math.Max(1, (int)Math.Floor((hold.Duration.Ticks / (double)hold.Interval.Ticks) + 1e-9));
    }
}

using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Engine.Sequences;

/// <summary>A characterisation procedure as written in a sequence file: what to sweep, hold and ask, in order, with its limits.</summary>
/// <param name="Title">The title shown in reports.</param>
/// <param name="File">The file the sequence came from.</param>
/// <param name="Limits">The safety limits that apply to every step.</param>
/// <param name="Items">The steps in the order they run.</param>
public sealed record Sequence(string Title, string File, SafetyLimits Limits, IReadOnlyList<SequenceItem> Items)
{
    /// <summary>The bench file the sequence is written for (its <c>bench:</c> key, relative to the sequence file), used when no bench is given.</summary>
    public string? Bench { get; init; }

    /// <summary>The procedure's identifier as the lab controls it (the sequence's <c>id:</c> key, for example <c>WI-CUR-018</c>), for the calibration record.</summary>
    public string? Id { get; init; }

    /// <summary>The procedure's version (the sequence's <c>version:</c> key), for the calibration record.</summary>
    public string? Version { get; init; }
}

/// <summary>The safety limits a sequence runs under.</summary>
/// <param name="MaxDrop">The largest burden voltage allowed before the run aborts; null means the worst case is taken from the UUT specification.</param>
/// <param name="FuseDerating">The fraction of a jack's fuse rating no setpoint may exceed.</param>
/// <param name="MaxFractionOfFullScale">The largest setpoint as a fraction of the range's full scale.</param>
public sealed record SafetyLimits(Voltage? MaxDrop, double FuseDerating, double MaxFractionOfFullScale);

/// <summary>Which instruments are read together at every sample.</summary>
[Flags]
public enum Readings
{
    /// <summary>Nothing besides the set current.</summary>
    None = 0,

    /// <summary>The voltmeter across the UUT's jacks.</summary>
    Drop = 1,

    /// <summary>The UUT's own reading.</summary>
    Uut = 2,

    /// <summary>The reference ammeter.</summary>
    Reference = 4,
}

/// <summary>How a point decides it has settled before sampling.</summary>
/// <param name="Dwell">The fixed wait after the current is set.</param>
/// <param name="AgreeCount">For adaptive settling, how many consecutive drop readings must agree (and the window of the drift extrapolation,
/// so at least about 6·max(N, 3) readings are taken); 0 means fixed dwell only.</param>
/// <param name="Tolerance">For adaptive settling, the relative spread within which readings agree.</param>
/// <param name="MaxWait">For adaptive settling, the longest wait before sampling anyway (and logging that it did not settle).</param>
public sealed record Settling(TimeSpan Dwell, int AgreeCount, double Tolerance, TimeSpan MaxWait)
{
    /// <summary>True when the rule waits for agreeing readings rather than a fixed time only.</summary>
    public bool IsAdaptive => AgreeCount > 0;
}

/// <summary>Measurement settings shared by the points of a sweep or hold.</summary>
/// <param name="Settling">The settling rule.</param>
/// <param name="Samples">Samples per point.</param>
/// <param name="Nplc">Integration time of the meters in power-line cycles.</param>
/// <param name="Read">The instruments read together.</param>
public sealed record PointSettings(Settling Settling, int Samples, double Nplc, Readings Read);

/// <summary>One item of a sequence.</summary>
public abstract record SequenceItem(int Line)
{
    /// <summary>The column of the item in its file.</summary>
    public int Column { get; init; }
}

/// <summary>A sweep of currents through one range.</summary>
/// <param name="Line">The line of the item in its file.</param>
/// <param name="Range">The UUT range.</param>
/// <param name="Currents">The set currents, each absolute or as a fraction of full scale.</param>
/// <param name="Settings">The measurement settings.</param>
public sealed record SweepItem(int Line, string Range, IReadOnlyList<CurrentValue> Currents, PointSettings Settings) : SequenceItem(Line);

/// <summary>A thermal hold: one current held for a time while sampling at a rate.</summary>
public sealed record HoldItem(int Line, string Range, CurrentValue Current, TimeSpan Duration, TimeSpan Interval, PointSettings Settings) : SequenceItem(Line);

/// <summary>A ramp of the set current in equal steps over a time, without recording (to approach a hold gently, say).</summary>
public sealed record RampItem(int Line, string Range, CurrentValue From, CurrentValue To, TimeSpan Duration, int Steps) : SequenceItem(Line);

/// <summary>An instruction to the operator, who must confirm it before the run goes on.</summary>
/// <param name="Line">The line of the item in its file.</param>
/// <param name="Id">A stable name for the prompt, used by answer files.</param>
/// <param name="Text">What the operator must do.</param>
/// <param name="OutputsOff">Whether the outputs are turned off before the prompt (always for re-wiring).</param>
public sealed record PromptItem(int Line, string Id, string Text, bool OutputsOff) : SequenceItem(Line);

/// <summary>A current written either as an absolute value or as a fraction of the range's full scale.</summary>
/// <param name="Value">Amperes, or a fraction when <paramref name="IsFraction"/> is true.</param>
/// <param name="IsFraction">True for values written in % of full scale.</param>
public readonly record struct CurrentValue(double Value, bool IsFraction)
{
    /// <summary>The current for a range of full scale <paramref name="fullScale"/>.</summary>
    public Current Resolve(Current fullScale) => new(IsFraction ? Value * fullScale.Amperes : Value);
}

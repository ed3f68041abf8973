using ShuntSweep.Analysis.Uncertainty;

namespace ShuntSweep.Analysis.Results;

/// <summary>The verdict a calibration record states, for one range or for the whole UUT.</summary>
public enum RecordVerdict
{
    /// <summary>Judged against its specification and nothing failed.</summary>
    Pass,

    /// <summary>The accuracy or the burden is outside its specification somewhere.</summary>
    Fail,

    /// <summary>Nothing specified to judge against (no accuracy readings, no specified burden).</summary>
    NotJudged,

    /// <summary>The run stopped early or a range could not be analysed: no pass can be stated.</summary>
    Incomplete,
}

/// <summary>Derives the verdicts of a result and says them in words and as stable tokens.</summary>
public static class Verdicts
{
    /// <summary>The runner's end code of a run that went through every step.</summary>
    public const string Completed = "Completed";

    /// <summary>The verdict of one range: its accuracy (simple acceptance) and its burden both count.</summary>
    public static RecordVerdict Of(RangeResult range)
    {
        ArgumentNullException.ThrowIfNull(range);
        var judged = range.Conformity is not null || range.Burden is { AtFullScale: not null } or { Curve: not null };
        if (!judged)
        {
            return RecordVerdict.NotJudged;
        }

        return range.Conformity?.SimpleAcceptance == ConformityVerdict.Fail || range.Burden?.Fails == true ? RecordVerdict.Fail : RecordVerdict.Pass;
    }

    /// <summary>The verdict of <paramref name="range"/> as part of <paramref name="result"/>: what failed stays a failure, but no pass is stated in an
    /// incomplete result.</summary>
    public static RecordVerdict Of(CharacterisationResult result, RangeResult range)
    {
        var own = Of(range);
        return own == RecordVerdict.Pass && IsIncomplete(result) ? RecordVerdict.Incomplete : own;
    }

    /// <summary>The verdict of a whole result: incomplete beats fail beats pass beats not judged.</summary>
    public static RecordVerdict Of(CharacterisationResult result)
    {
        ArgumentNullException.ThrowIfNull(result);
        if (IsIncomplete(result))
        {
            return RecordVerdict.Incomplete;
        }

        var ranges = result.Ranges.Select(r => Of(r)).ToList();
        return ranges.Contains(RecordVerdict.Fail) ? RecordVerdict.Fail
            : ranges.Contains(RecordVerdict.Pass) ? RecordVerdict.Pass
            : RecordVerdict.NotJudged;
    }

    /// <summary>Whether the run behind the result stopped before its last step or lost a range in the analysis.</summary>
    public static bool IsIncomplete(CharacterisationResult result)
    {
        ArgumentNullException.ThrowIfNull(result);
        return (result.RunEnd is { } end && end != Completed) || result.LeftOut is { Count: > 0 };
    }

    /// <summary>The verdict in words with its symbol, as screens and reports print it (never colour alone).</summary>
    public static string Words(RecordVerdict verdict) => verdict switch
    {
        RecordVerdict.Pass => "✓ meets specification",
        RecordVerdict.Fail => "✗ outside specification",
        RecordVerdict.Incomplete => "◐ incomplete: no verdict",
        _ => "– not judged",
    };

    /// <summary>A stable lower-case token for JSON, the archive and scripts: <c>pass</c>, <c>fail</c>, <c>not-judged</c>, <c>incomplete</c>.</summary>
    public static string Token(RecordVerdict verdict) => verdict switch
    {
        RecordVerdict.Pass => "pass",
        RecordVerdict.Fail => "fail",
        RecordVerdict.Incomplete => "incomplete",
        _ => "not-judged",
    };
}

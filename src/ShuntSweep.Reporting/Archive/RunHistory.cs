namespace ShuntSweep.Reporting.Archive;

/// <summary>One archived run, as <c>history</c> lists it.</summary>
/// <param name="RunId">The archive's key for the run (stable: the same run recorded twice has the same id).</param>
/// <param name="Start">When the run started.</param>
/// <param name="Manufacturer">The UUT's manufacturer.</param>
/// <param name="Model">The UUT's model.</param>
/// <param name="Serial">The UUT's serial number.</param>
/// <param name="AssetId">The UUT's asset id, when it has one.</param>
/// <param name="BenchName">The bench the run used.</param>
/// <param name="Simulated">Whether the bench was simulated.</param>
/// <param name="RunEnd">How the run ended (from its event log), when known.</param>
/// <param name="Verdict">The run's verdict token (<c>pass</c>, <c>fail</c>, <c>not-judged</c>, <c>incomplete</c>); older archives hold the worst
/// simple-acceptance verdict (<c>Pass</c>, <c>Fail</c>).</param>
/// <param name="Condition">Whether the run recorded the UUT <c>as-found</c> or <c>as-left</c>, when the operator said so.</param>
public sealed record ArchivedRun(
    string RunId,
    DateTimeOffset Start,
    string Manufacturer,
    string Model,
    string Serial,
    string? AssetId,
    string BenchName,
    bool Simulated,
    string? RunEnd,
    string? Verdict,
    string? Condition = null);

/// <summary>One range's resistance in one archived run.</summary>
/// <param name="RunId">The run.</param>
/// <param name="Start">When the run started.</param>
/// <param name="Model">The drop model chosen in that run.</param>
/// <param name="ResistanceOhms">The small-signal resistance.</param>
/// <param name="StandardUncertaintyOhms">Its standard uncertainty.</param>
public sealed record RangeReading(string RunId, DateTimeOffset Start, string Model, double ResistanceOhms, double StandardUncertaintyOhms);

/// <summary>A range's resistance over the archived runs of one UUT, oldest first.</summary>
/// <param name="Range">The range's name.</param>
/// <param name="Jack">The jack of the range.</param>
/// <param name="Readings">One reading per run that measured the range.</param>
public sealed record RangeHistory(string Range, string Jack, IReadOnlyList<RangeReading> Readings);

/// <summary>What the archive holds for one serial number.</summary>
/// <param name="Serial">The serial number asked for.</param>
/// <param name="Runs">Its runs, oldest first (ties broken by run id).</param>
/// <param name="Ranges">Each range's resistance over time, in the order the ranges were first measured.</param>
public sealed record RunHistory(string Serial, IReadOnlyList<ArchivedRun> Runs, IReadOnlyList<RangeHistory> Ranges)
{
    /// <summary>Each as-left run with the as-found run it follows: the latest as-found run before it that no earlier as-left run has taken.</summary>
    /// <remarks>An adjustment is judged by the pair: what the unit was on arrival, and what it is when it leaves.</remarks>
    public IReadOnlyList<(ArchivedRun AsFound, ArchivedRun AsLeft)> AsFoundAsLeftPairs()
    {
        var pairs = new List<(ArchivedRun, ArchivedRun)>();
        var open = new Stack<ArchivedRun>();
        foreach (var run in Runs)
        {
            if (run.Condition == "as-found")
            {
                open.Clear();
                open.Push(run);
            }
            else if (run.Condition == "as-left" && open.TryPop(out var found))
            {
                pairs.Add((found, run));
            }
        }

        return pairs;
    }
}

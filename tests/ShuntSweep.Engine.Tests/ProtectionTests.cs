using System.Text.Json;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using Xunit;

namespace ShuntSweep.Engine.Tests;

/// <summary>The supply as the second line of defence: its current limit per jack, its over-voltage protection, and what they do when the load fails.</summary>
public sealed class ProtectionTests
{
    [Fact]
    public void CurrentLimit_IsTheLargestPlannedCurrentPlusTheMargin_CappedByTheDeratedFuseAndTheBench()
    {
        var bench = BenchReader.Load(SimulatedRun.BenchFile);
        var sequence = SequenceReader.Parse(SimulatedRun.Sequence, "protection.yaml");
        var plan = Planner.Plan(sequence, bench);
        var jacks = SupplyProtection.ForJacks(plan, sequence, bench).ToDictionary(p => p.Jack);

        // mA jack: 60 mA planned + 10 % = 66 mA, well below 80 % of the 500 mA fuse.
        Assert.Equal(0.066, jacks["mA"].CurrentLimit.Amperes, 12);
        // 10A jack: 8 A planned + 10 % = 8.8 A, capped at 80 % of the 10 A fuse = 8 A (never below the planned maximum).
        Assert.Equal(8.0, jacks["10A"].CurrentLimit.Amperes, 12);
        Assert.All(jacks.Values, j => Assert.True(j.CurrentLimit >= j.LargestPlanned));
        Assert.Equal(5.5, SupplyProtection.OverVoltage(bench).Volts, 12);
    }

    [Fact]
    public async Task Run_SetsTheSuppliesCurrentLimitPerJack_AndReadsItBack_BeforeOutputsTurnOn()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults());
        var events = EventLog.Read(Path.Combine(run.Directory, RunJournal.EventsFile)).ToList();
        var limits = events.Where(e => e.GetProperty("event").GetString() == "current-limit").ToList();
        Assert.Equal(["mA", "10A"], limits.Select(e => e.GetProperty("jack").GetString()));
        Assert.All(limits, e => Assert.Equal(e.GetProperty("limitA").GetDouble(), e.GetProperty("readBackA").GetDouble(), 9));
        var ovp = events.Single(e => e.GetProperty("event").GetString() == "over-voltage-protection");
        Assert.Equal(5.5, ovp.GetProperty("levelV").GetDouble(), 9);

        // Each jack's limit is in force before the first point on that jack is taken.
        var firstLimit = events.FindIndex(e => e.GetProperty("event").GetString() == "current-limit");
        var firstPoint = events.FindIndex(e => e.GetProperty("event").GetString() == "step-done");
        Assert.True(firstLimit < firstPoint);
    }

    [Fact]
    public async Task LoadThatIgnoresItsSetpoint_OnTheMilliampJack_IsHeldByTheSuppliesLimit_AndTheFuseSurvives()
    {
        // The load sinks its full 12 A whatever it is told; only the supply's 66 mA limit stands between the loop and the 500 mA fuse.
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults("{ kind: loadRunaway, at: 2 s }"));
        Assert.Equal(RunEnd.SafetyAbort, run.Outcome.End);
        Assert.Contains("does not follow its setpoint", run.Outcome.Message, StringComparison.Ordinal);
        Assert.Contains("66 mA current limit", run.Outcome.Message, StringComparison.Ordinal);
        Assert.False(run.MilliampFuseOpen);
        Assert.True(run.Outcome.OutputsConfirmedOff && run.SupplyOff && run.LoadOff);
        var journal = run.Journal.Samples.Where(s => s.Jack == "mA").ToList();
        Assert.All(journal, s => Assert.True(s.Reference.Amperes <= 0.066 * 1.001, $"{s.Reference} through the mA jack"));
    }
}

/// <summary>The run directory's event log and its one-writer lock.</summary>
public sealed class RunDirectoryTests
{
    [Fact]
    public void EventLog_LeavesOutALastLineTornByAKill()
    {
        var dir = Testing.Some.TempDirectory();
        File.WriteAllText(Path.Combine(dir, RunJournal.EventsFile), "{\"time\":\"2026-01-01T00:00:00Z\",\"event\":\"step-done\",\"step\":3,\"journalBytes\":120}\n{\"time\":\"2026-01-01T00:00:01Z\",\"ev");
        Assert.Equal(3, EventLog.LastStepDone(dir)!.Step);
    }

    [Fact]
    public void EventLog_DamagedInTheMiddle_IsACleanErrorWithItsLine()
    {
        var dir = Testing.Some.TempDirectory();
        File.WriteAllText(Path.Combine(dir, RunJournal.EventsFile), "{\"time\":\"2026-01-01T00:00:00Z\",\"event\":\"run-start\"}\n{\"time\":\"2026-01-01T00:00:01Z\",\"eve{\"time\"\n{\"time\":\"2026-01-01T00:00:02Z\",\"event\":\"step-done\",\"step\":0,\"journalBytes\":9}\n");
        var error = Assert.Throws<InvalidDataException>(() => EventLog.LastStepDone(dir));
        Assert.Contains("events.jsonl:2:", error.Message, StringComparison.Ordinal);
        Assert.IsType<JsonException>(error.InnerException, exactMatch: false);
    }

    [Fact]
    public void Lock_RefusesASecondHolder_NamingTheFirst()
    {
        var dir = Testing.Some.TempDirectory();
        using var first = RunDirectoryLock.Acquire(dir);
        var refused = Assert.Throws<RunDirectoryBusyException>(() => RunDirectoryLock.Acquire(dir));
        Assert.Equal(Environment.ProcessId, refused.Owner);
        Assert.Contains($"process id {Environment.ProcessId}", refused.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Lock_LeftByAProcessThatDied_IsTakenOver()
    {
        var dir = Testing.Some.TempDirectory();
        File.WriteAllText(Path.Combine(dir, RunDirectoryLock.FileName), string.Empty);
        File.WriteAllText(Path.Combine(dir, RunDirectoryLock.OwnerFileName), "2147483646\n");
        using var taken = RunDirectoryLock.Acquire(dir);
        Assert.Equal(2147483646, taken.TakenOverFrom);
    }

    [Fact]
    public void Lock_IsFreeAgain_OnceReleased()
    {
        var dir = Testing.Some.TempDirectory();
        RunDirectoryLock.Acquire(dir).Dispose();
        using var again = RunDirectoryLock.Acquire(dir);
        Assert.Null(again.TakenOverFrom);
    }
}

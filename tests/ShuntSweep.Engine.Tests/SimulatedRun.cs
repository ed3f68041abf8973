using System.Text;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
using ShuntSweep.Simulation;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Engine.Tests;

/// <summary>Runs a sequence on the bundled simulated handheld bench, optionally with faults added to its simulation section, and reads back what a user would find.</summary>
internal sealed class SimulatedRun
{
    public const string Sequence = """
        sequence: Fault test
        defaults: { dwell: 50 ms, samples: 3 }
        limits: { maxDrop: 1.5 V }
        steps:
          - sweep: { range: 60mA, currents: { linear: { from: 10 %, to: 100 %, points: 8 } } }
          - sweep: { range: 10A, currents: { linear: { from: 1 A, to: 8 A, points: 8 } } }
        """;

    private SimulatedRun(RunOutcome outcome, string directory, bool supplyOff, bool loadOff, string mAFuseOpen)
    {
        Outcome = outcome;
        Directory = directory;
        SupplyOff = supplyOff;
        LoadOff = loadOff;
        MilliampFuseOpen = mAFuseOpen == "1";
    }

    public RunOutcome Outcome { get; }

    public string Directory { get; }

    /// <summary>The supply's output as the simulated instrument itself reports it after the run.</summary>
    public bool SupplyOff { get; }

    /// <summary>The load's input as the simulated instrument itself reports it after the run.</summary>
    public bool LoadOff { get; }

    /// <summary>Whether the simulated UUT's mA-jack fuse is open after the run.</summary>
    public bool MilliampFuseOpen { get; }

    public JournalContents Journal => JournalCsv.Read(Path.Combine(Directory, RunJournal.JournalFile));

    public static string BenchFile => Repo.File("simulators/handheld-tarnwell-tw18.yaml");

    /// <summary>The handheld bench with <paramref name="faults"/> (YAML flow mappings) appended to its simulation section.</summary>
    public static string BenchWithFaults(params string[] faults)
    {
        var text = new StringBuilder(File.ReadAllText(BenchFile).TrimEnd()).Append('\n');
        if (faults.Length > 0)
        {
            text.Append("  faults:\n");
            foreach (var f in faults)
            {
                text.Append("    - ").Append(f).Append('\n');
            }
        }

        return Some.TempFile(text.ToString());
    }

    /// <summary>The handheld bench with a shunt tap voltmeter (<c>SIM::tap</c>) added, and <paramref name="faults"/>.</summary>
    public static string BenchWithTap(params string[] faults)
    {
        var text = File.ReadAllText(BenchWithFaults(faults)).Replace(
            "  reference: { resource: \"SIM::ref\" }",
            "  reference: { resource: \"SIM::ref\" }\n  shuntTap: { resource: \"SIM::tap\" }",
            StringComparison.Ordinal);
        return Some.TempFile(text);
    }

    public static async Task<SimulatedRun> RunAsync(string benchFile, string sequence = Sequence, int seed = 1)
    {
        // A run that hangs must fail the test, not the test run.
        using var limit = CancellationTokenSource.CreateLinkedTokenSource(TestContext.Current.CancellationToken);
        limit.CancelAfter(TimeSpan.FromSeconds(60));
        var ct = limit.Token;
        var bench = BenchReader.Load(benchFile);
        var parsed = SequenceReader.Parse(sequence, "fault-test.yaml");
        var plan = Planner.Plan(parsed, bench);
        Assert.True(plan.IsSafe, string.Join("; ", plan.Violations.Select(v => v.Message)));
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var simulator = SimulatedBench.Create(bench, clock, seed);
        var dir = Some.TempDirectory();
        RunOutcome outcome;
        await using (var instruments = await BenchConnector.ConnectAsync(bench, clock, simulator.Connect, null, ct))
        {
            using var journal = RunJournal.Create(dir, clock.Time, clock.Now());
            outcome = await new Runner(instruments, bench, parsed, plan, new SimulatedOperator(), journal, clock.Now()).RunAsync(0, false, ct);
        }

        var supplyOff = await AskAsync(simulator, "supply", "OUTP?") == "0";
        var loadOff = await AskAsync(simulator, "load", "INP?") == "0";
        var fuse = await AskAsync(simulator, "supply", "SIM:FUSE:OPEN? \"mA\"");
        return new SimulatedRun(outcome, dir, supplyOff, loadOff, fuse);
    }

    /// <summary>Every step recorded as done has all its rows in the journal, and the journal has no rows of other steps.</summary>
    public void AssertNoCompletedPointLost()
    {
        var done = EventLog.Read(Path.Combine(Directory, RunJournal.EventsFile))
            .Where(e => e.GetProperty("event").GetString() == "step-done")
            .ToDictionary(e => e.GetProperty("step").GetInt32(), e => e.GetProperty("rows").GetInt32());
        var journal = Journal;
        Assert.False(journal.TornTail);
        var rows = journal.Samples.GroupBy(s => s.Step).ToDictionary(g => g.Key, g => g.Count());
        Assert.Equal(done.OrderBy(kv => kv.Key), rows.OrderBy(kv => kv.Key));
    }

    private static async Task<string> AskAsync(SimulatedBench simulator, string instrument, string query)
    {
        await using var stream = simulator.Connect(instrument);
        await stream.WriteAsync(Encoding.ASCII.GetBytes(query + "\n"), TestContext.Current.CancellationToken);
        var buffer = new byte[256];
        var text = new StringBuilder();
        while (!text.ToString().EndsWith('\n'))
        {
            var n = await stream.ReadAsync(buffer, TestContext.Current.CancellationToken);
            if (n == 0)
            {
                break;
            }

            text.Append(Encoding.ASCII.GetString(buffer, 0, n));
        }

        return text.ToString().Trim();
    }
}

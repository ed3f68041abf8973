using System.Net;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
using ShuntSweep.Simulation;
using ShuntSweep.Simulation.Hosting;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Engine.Tests;

/// <summary>The simulated bench served over loopback TCP, faster than real time, and driven through a bench file of TCPIP resources,
/// exactly as a real bench is driven.</summary>
public sealed class ServedBenchTests
{
    private const string Short = """
        sequence: Served bench check
        defaults: { dwell: 20 ms, samples: 2 }
        limits: { maxDrop: 1.5 V }
        steps:
          - sweep: { range: 60mA, currents: [6 mA, 20 mA, 35 mA, 50 mA, 60 mA] }
        """;

    [Fact]
    public async Task ServedFiftyTimesFaster_GivesTheSamePhysicsAsInProcess()
    {
        // Regression: at --speed 50 a measurement window was placed from a clock reading taken before the physics was brought up to date,
        // so it could close before it was integrated and the voltmeter answered +9.91E37 (not a number).
        var served = await RunServedAsync(speed: 50);
        var inProcess = await RunInProcessAsync();
        Assert.Equal(RunEnd.Completed, served.Outcome.End);
        Assert.Equal(inProcess.Count, served.Samples.Count);
        foreach (var (s, reference) in served.Samples.Zip(inProcess))
        {
            Assert.True(double.IsFinite(s.Burden.Volts), $"step {s.Step}: drop {s.Burden}");

            // The same unit (same seed) at the same current drops the same voltage to within the meters' noise and a little self-heating.
            Assert.Equal(reference.Burden.Volts, s.Burden.Volts, reference.Burden.Volts * 0.01);
        }
    }

    private static async Task<List<Sample>> RunInProcessAsync()
    {
        var bench = BenchReader.Load(SimulatedRun.BenchFile);
        var sequence = SequenceReader.Parse(Short, "served.yaml");
        var plan = Planner.Plan(sequence, bench);
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var simulator = SimulatedBench.Create(bench, clock, 1);
        var dir = Some.TempDirectory();
        await using (var instruments = await BenchConnector.ConnectAsync(bench, clock, simulator.Connect, null, TestContext.Current.CancellationToken))
        {
            using var journal = RunJournal.Create(dir, clock.Time, clock.Now());
            var outcome = await new Runner(instruments, bench, sequence, plan, new SimulatedOperator(), journal, clock.Now()).RunAsync(0, false, TestContext.Current.CancellationToken);
            Assert.Equal(RunEnd.Completed, outcome.End);
        }

        return [.. JournalCsv.Read(Path.Combine(dir, RunJournal.JournalFile)).Samples];
    }

    private static async Task<(RunOutcome Outcome, IReadOnlyList<Sample> Samples)> RunServedAsync(double speed)
    {
        using var limit = CancellationTokenSource.CreateLinkedTokenSource(TestContext.Current.CancellationToken);
        limit.CancelAfter(TimeSpan.FromSeconds(60));
        var ct = limit.Token;
        var simulatedBench = BenchReader.Load(SimulatedRun.BenchFile);
        var serverClock = new RealBenchClock(new ScaledTimeProvider(TimeProvider.System, speed));
        await using var simulator = SimulatedBench.Create(simulatedBench, serverClock, 1);
        await using var host = TcpBenchHost.Start(simulator, IPAddress.Loopback, 0, allowRemote: false);

        // The bench file a user would write for the served instruments: the same file with each SIM:: resource replaced by its socket.
        var text = File.ReadAllText(SimulatedRun.BenchFile);
        foreach (var (name, _, resource) in host.Endpoints)
        {
            text = text.Replace($"\"SIM::{name}\"", $"\"{resource}\"", StringComparison.Ordinal);
        }

        var bench = BenchReader.Load(Some.TempFile(text));
        Assert.False(bench.IsSimulated);
        var sequence = SequenceReader.Parse(Short, "served.yaml");
        var plan = Planner.Plan(sequence, bench);
        var clock = new RealBenchClock(TimeProvider.System);
        var dir = Some.TempDirectory();
        RunOutcome outcome;
        await using (var instruments = await BenchConnector.ConnectAsync(bench, clock, null, null, ct))
        {
            using var journal = RunJournal.Create(dir, clock.Time, clock.Now());
            outcome = await new Runner(instruments, bench, sequence, plan, new SimulatedOperator(), journal, clock.Now()).RunAsync(0, false, ct);
        }

        return (outcome, JournalCsv.Read(Path.Combine(dir, RunJournal.JournalFile)).Samples);
    }
}

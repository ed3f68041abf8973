using System.Net;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resources;
using ShuntSweep.Simulation;
using ShuntSweep.Simulation.Hosting;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Engine.Tests;

/// <summary>Every shipped dialect bench served over loopback TCP, each instrument in the dialect of its profile, and driven through the
/// bench file a user would write for it: probe, a two-range run, Ctrl-C, and a hung instrument, the outputs ending off every time.</summary>
public sealed class DialectBenchTests
{
    private const string TwoRanges = """
        sequence: Dialect loopback check
        defaults: { dwell: 20 ms, samples: 2, read: [drop, uut, reference] }
        limits: { maxDrop: 1.5 V }
        steps:
          - sweep: { range: RANGE_A, currents: [20 %, 50 %, 80 %] }
          - sweep: { range: 10A, currents: [1 A, 4 A, 7 A] }
        """;

    public static TheoryData<string> Benches() =>
        new("dialect-supply-corvane-psx30.yaml", "dialect-load-hollin-el150.yaml", "dialect-dmm-quillon-dv7.yaml", "handheld-brannock-bm5.yaml");

    [Theory]
    [MemberData(nameof(Benches))]
    public async Task Probe_ReadsEveryQueryOfEachProfile_OverLoopback(string file)
    {
        await using var served = await Served.StartAsync(file);
        var bench = BenchReader.Load(served.BenchFile);
        var baseDirectory = Path.GetDirectoryName(bench.File);
        foreach (var entry in bench.Instruments.Values)
        {
            var settings = DriverSettings.Read(entry.Settings, baseDirectory, entry.Role);
            var profile = InstrumentProfile.Load(settings.Profile, baseDirectory);
            await using var session = await BenchConnector.OpenSessionAsync(ResourceAddress.Parse(entry.Resource), settings, profile, null, TimeProvider.System, null, null, TestContext.Current.CancellationToken);
            var report = await ProfileProbe.RunAsync(session, profile, ProfileRequirements.SectionOf(entry.Role), 2, TimeProvider.System, TestContext.Current.CancellationToken);
            Assert.True(report.AllUnderstood, $"{entry.Resource} ({profile.Name}): {report.IdentityProblem} {string.Join("; ", report.Queries.Where(q => q.Problem is not null).Select(q => $"{q.Operation}: {q.Problem}"))}");
            Assert.Empty(report.Errors);
            Assert.Equal((false, false), served.Simulator.OutputStates());
        }
    }

    [Theory]
    [MemberData(nameof(Benches))]
    public async Task TwoRangeRun_CompletesInEachDialect_SelectingRangesByTheirCodes(string file)
    {
        await using var served = await Served.StartAsync(file);
        var traffic = Path.Combine(Some.TempDirectory(), "traffic.jsonl");
        var run = await served.RunAsync(TimeSpan.FromSeconds(60), traffic);
        Assert.True(run.Outcome.End == RunEnd.Completed, run.Outcome.Message);
        Assert.True(run.Outcome.OutputsConfirmedOff);
        Assert.Equal((false, false), served.Simulator.OutputStates());
        Assert.Equal(12, run.Samples);
        if (file.Contains("brannock", StringComparison.Ordinal))
        {
            // The BM-5 takes range numbers: 40mA is R3, 10A is R5 (profiles/brannock-bm5.yaml).
            var sent = await File.ReadAllTextAsync(traffic, TestContext.Current.CancellationToken);
            Assert.Contains("\"tx\":\"R3\"", sent, StringComparison.Ordinal);
            Assert.Contains("\"tx\":\"R5\"", sent, StringComparison.Ordinal);
        }
    }

    [Theory]
    [MemberData(nameof(Benches))]
    public async Task CtrlC_MidRun_EndsInterrupted_WithOutputsOffInEachDialect(string file)
    {
        await using var served = await Served.StartAsync(file, speed: 1);
        var traffic = Path.Combine(Some.TempDirectory(), "traffic.jsonl");
        var run = await served.RunAsync(TimeSpan.FromSeconds(60), traffic, cancelAfter: TimeSpan.FromSeconds(1));
        Assert.True(run.Outcome.End == RunEnd.Interrupted, $"{run.Outcome.End}: {run.Outcome.Message} {Unconfirmed(run.Outcome)}\n" + string.Join("\n", File.ReadAllLines(traffic).TakeLast(30)));
        Assert.True(run.Outcome.OutputsConfirmedOff, Unconfirmed(run.Outcome));
        Assert.Equal((false, false), served.Simulator.OutputStates());
    }

    [Theory]
    [MemberData(nameof(Benches))]
    public async Task HungVoltmeter_IsAnInstrumentFailure_WithOutputsOffInEachDialect(string file)
    {
        await using var served = await Served.StartAsync(file, "{ kind: hang, instrument: dmm, afterCommands: 20 }");
        var run = await served.RunAsync(TimeSpan.FromSeconds(90), null);
        Assert.True(run.Outcome.End == RunEnd.InstrumentFailure, $"{run.Outcome.End}: {run.Outcome.Message}");
        Assert.True(run.Outcome.OutputsConfirmedOff);
        Assert.Equal((false, false), served.Simulator.OutputStates());
    }

    private static string Unconfirmed(RunOutcome outcome) =>
        string.Join("; ", outcome.Off.Where(o => !o.Confirmed).Select(o => $"{o.Role} {o.Resource}: {o.Problem}"));

    /// <summary>A dialect bench served on loopback ports, with the bench file that drives it.</summary>
    private sealed class Served : IAsyncDisposable
    {
        private Served(SimulatedBench simulator, TcpBenchHost host, string benchFile, string smallRange)
        {
            Simulator = simulator;
            Host = host;
            BenchFile = benchFile;
            SmallRange = smallRange;
        }

        public SimulatedBench Simulator { get; }

        public TcpBenchHost Host { get; }

        public string BenchFile { get; }

        public string SmallRange { get; }

        public static Task<Served> StartAsync(string file, params string[] faults) => StartAsync(file, 50, faults);

        public static Task<Served> StartAsync(string file, double speed, params string[] faults)
        {
            var source = Repo.File(Path.Combine("simulators", file));
            var text = File.ReadAllText(source).TrimEnd() + "\n";
            if (faults.Length > 0)
            {
                text += "  faults:\n" + string.Concat(faults.Select(f => $"    - {f}\n"));
            }

            // The profiles by absolute path, so that the copy can live anywhere.
            text = text.Replace("profile: ../profiles/", $"profile: {Repo.File("profiles")}/", StringComparison.Ordinal);
            var simulatedFile = Some.TempFile(text);
            var bench = BenchReader.Load(simulatedFile);
            var simulator = SimulatedBench.Create(bench, new RealBenchClock(new ScaledTimeProvider(TimeProvider.System, speed)), 1);
            var host = TcpBenchHost.Start(simulator, IPAddress.Loopback, 0, allowRemote: false);
            var served = Path.Combine(Some.TempDirectory(), "served.yaml");
            ServedBenchFile.Write(simulatedFile, host.Endpoints.Select(e => (e.Name, e.Resource)), served);
            var small = bench.Uut.Ranges.First(r => r.Jack != "10A" && r.FullScale.Amperes >= 0.02).Name;
            return Task.FromResult(new Served(simulator, host, served, small));
        }

        public async Task<(RunOutcome Outcome, int Samples)> RunAsync(TimeSpan limit, string? trafficFile, TimeSpan? cancelAfter = null)
        {
            using var limited = CancellationTokenSource.CreateLinkedTokenSource(TestContext.Current.CancellationToken);
            limited.CancelAfter(limit);
            using var interrupt = new CancellationTokenSource();
            if (cancelAfter is { } after)
            {
                interrupt.CancelAfter(after);
            }

            using var both = CancellationTokenSource.CreateLinkedTokenSource(limited.Token, interrupt.Token);
            var bench = BenchReader.Load(BenchFile);
            var sequence = SequenceReader.Parse(TwoRanges.Replace("RANGE_A", SmallRange, StringComparison.Ordinal), "dialect.yaml");
            var plan = Planner.Plan(sequence, bench);
            Assert.True(plan.IsSafe, string.Join("; ", plan.Violations.Select(v => v.Message)));
            var clock = new RealBenchClock(TimeProvider.System);
            var dir = Some.TempDirectory();
            RunOutcome outcome;
            using var traffic = trafficFile is null ? null : TrafficLog.Create(trafficFile, TimeProvider.System, TimeProvider.System.GetUtcNow());
            await using (var instruments = await BenchConnector.ConnectAsync(bench, clock, null, traffic, limited.Token))
            {
                using var journal = RunJournal.Create(dir, clock.Time, clock.Now());
                outcome = await new Runner(instruments, bench, sequence, plan, new SimulatedOperator(), journal, clock.Now()).RunAsync(0, false, both.Token);
            }

            Assert.False(limited.IsCancellationRequested, "the run did not end within its time limit");
            return (outcome, JournalCsv.Read(Path.Combine(dir, RunJournal.JournalFile)).Samples.Count);
        }

        public async ValueTask DisposeAsync()
        {
            await Host.DisposeAsync();
            await Simulator.DisposeAsync();
        }
    }
}

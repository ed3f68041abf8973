using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Text.RegularExpressions;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
using ShuntSweep.Simulation;
using ShuntSweep.Simulation.Hosting;

namespace ShuntSweep.Benchmarks;

/// <summary>What asking independent instruments at the same time saves on a socket bench: a sequence run on the simulated bench served over loopback TCP in real time, with the end-of-point queries concurrent and one after another, rounds interleaved.</summary>
internal static partial class ServedReport
{
    public static async Task<int> RunAsync(string sequencePath, string benchPath, int rounds)
    {
        var sequence = SequenceReader.Load(sequencePath);
        var simulatedBench = BenchReader.Load(benchPath);
        var times = new Dictionary<bool, List<double>> { [true] = [], [false] = [] };
        for (var round = 0; round < rounds; round++)
        {
            foreach (var concurrent in new[] { true, false })
            {
                times[concurrent].Add(await RunOnceAsync(sequence, simulatedBench, benchPath, concurrent));
            }
        }

        foreach (var (concurrent, list) in times)
        {
            list.Sort();
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{(concurrent ? "concurrent end-of-point queries" : "one query after another      ")}: median {list[list.Count / 2]:0.000} s of wall time over {list.Count} runs ({string.Join(", ", list.Select(t => t.ToString("0.000", CultureInfo.InvariantCulture)))})"));
        }

        return 0;
    }

    private static async Task<double> RunOnceAsync(Sequence sequence, BenchDescription simulatedBench, string benchPath, bool concurrent)
    {
        var clock = new RealBenchClock(TimeProvider.System);
        await using var simulator = SimulatedBench.Create(simulatedBench, clock, 1);
        await using var host = TcpBenchHost.Start(simulator, IPAddress.Loopback, 0, false);
        var text = File.ReadAllText(benchPath);
        text = text[..text.IndexOf("\nsimulation:", StringComparison.Ordinal)] + "\n";
        text = SimResource().Replace(text, m => $"\"{host.Endpoints.First(e => string.Equals(e.Name, m.Groups["name"].Value, StringComparison.OrdinalIgnoreCase)).Resource}\"");
        var tcpBenchFile = Path.Combine(Path.GetTempPath(), $"shuntsweep-served-{Guid.NewGuid():N}.yaml");
        File.WriteAllText(tcpBenchFile, text);
        var bench = BenchReader.Load(tcpBenchFile);
        var plan = Planner.Plan(sequence, bench);
        await using var instruments = await BenchConnector.ConnectAsync(bench, clock, null, null, CancellationToken.None);
        var dir = Path.Combine(Path.GetTempPath(), "shuntsweep-served-" + Guid.NewGuid().ToString("N"));
        var wall = Stopwatch.StartNew();
        using (var journal = RunJournal.Create(dir, clock.Time, clock.Now()))
        {
            var outcome = await new Runner(instruments, bench, sequence, plan, new AnswerFileOperator(new Dictionary<string, bool>(), true), journal, clock.Now(), null, new RunnerOptions(ConcurrentQueries: concurrent)).RunAsync();
            if (outcome.End != RunEnd.Completed)
            {
                throw new InvalidOperationException(outcome.Message);
            }
        }

        return wall.Elapsed.TotalSeconds;
    }

    [GeneratedRegex("\"SIM::(?<name>\\w+)\"")]
    private static partial Regex SimResource();
}

using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments;
using ShuntSweep.Simulation;

namespace ShuntSweep.Cli.Composition;

/// <summary>The composition root for a bench: picks the clock, starts the in-process simulator for <c>SIM::</c> resources, and connects the drivers.</summary>
internal static class BenchHost
{
    /// <summary>The bench used when none is given: the bundled simulated handheld meter.</summary>
    public const string DefaultBench = "simulators/handheld-tarnwell-tw18.yaml";

    /// <summary>Finds a bench file: as given, else next to the executable (for the bundled simulated benches).</summary>
    public static string Locate(string? path) => Bundled(path ?? DefaultBench, "bench file");

    /// <summary>Finds a sequence or bench file: as given, else next to the executable, where the bundled <c>sequences/</c> and
    /// <c>simulators/</c> travel, so that <c>shuntsweep run sequences/demo-handheld.yaml</c> works from any folder.</summary>
    public static string Bundled(string wanted, string what = "file")
    {
        if (File.Exists(wanted))
        {
            return wanted;
        }

        if (Directory.Exists(wanted))
        {
            throw new Core.Documents.DocumentException(wanted, 0, 0, $"this is a directory; expected a {what}.");
        }

        var bundled = Path.Combine(AppContext.BaseDirectory, wanted);
        return File.Exists(bundled) ? bundled : throw new FileNotFoundException($"The {what} '{wanted}' does not exist.", wanted);
    }

    /// <summary>The clock a bench runs on: virtual for a fully simulated bench, the system clock otherwise.</summary>
    public static IBenchClock ClockFor(BenchDescription bench, DateTimeOffset? virtualStart = null) =>
        bench.IsSimulated ? new VirtualBenchClock(new VirtualTimeProvider(virtualStart ?? VirtualTimeProvider.DefaultStart)) : new RealBenchClock(TimeProvider.System);

    /// <summary>Where a simulated run's virtual time starts: the wall clock now (whole seconds), so that simulated runs are dated when they ran;
    /// the fixed virtual epoch under <c>--reproducible</c>, so that the same run gives the same files.</summary>
    public static DateTimeOffset VirtualStart(bool reproducible)
    {
        var now = TimeProvider.System.GetUtcNow();
        return reproducible ? VirtualTimeProvider.DefaultStart : new DateTimeOffset(now.Ticks - (now.Ticks % TimeSpan.TicksPerSecond), TimeSpan.Zero);
    }

    /// <summary>Connects every instrument of <paramref name="bench"/>, starting the in-process simulator when the bench uses one.</summary>
    public static async Task<InstrumentBench> ConnectAsync(BenchDescription bench, IBenchClock clock, int seed, TrafficLog? traffic, CancellationToken ct)
    {
        var needsSimulator = bench.Instruments.Values.Any(i => i.Resource.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase));
        var simulator = needsSimulator ? SimulatedBench.Create(bench, clock, seed) : null;
        return await BenchConnector.ConnectAsync(bench, clock, simulator is null ? null : simulator.Connect, traffic, ct);
    }
}

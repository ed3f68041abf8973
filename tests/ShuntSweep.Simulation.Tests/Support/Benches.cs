using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;

namespace ShuntSweep.Simulation.Tests.Support;

/// <summary>Loads the simulated bench files of the repository and builds benches on a virtual clock.</summary>
internal static class Benches
{
    public static string Root { get; } = FindRoot();

    public static string Handheld => Path.Combine(Root, "simulators", "handheld-tarnwell-tw18.yaml");

    /// <summary>Every simulated bench whose instruments speak SCPI-99; benches whose entries name a profile speak its dialect and are
    /// tested through their profiles (ShuntSweep.Engine.Tests DialectBenchTests).</summary>
    public static IEnumerable<string> All => Directory.GetFiles(Path.Combine(Root, "simulators"), "*.yaml")
        .Where(f => !File.ReadLines(f).Any(l => l.Contains("profile:", StringComparison.Ordinal) && !l.TrimStart().StartsWith('#')))
        .Order(StringComparer.Ordinal);

    public static (SimulatedBench Bench, VirtualBenchClock Clock) Create(string path, int seed = 1)
    {
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        return (SimulatedBench.Create(BenchReader.Load(path), clock, seed), clock);
    }

    /// <summary>Writes <paramref name="yaml"/> to a temporary bench file and loads it.</summary>
    public static (SimulatedBench Bench, VirtualBenchClock Clock) FromText(string yaml, int seed = 1)
    {
        var path = Path.Combine(Path.GetTempPath(), $"shuntsweep-sim-{Guid.NewGuid():N}.yaml");
        File.WriteAllText(path, yaml);
        try
        {
            return Create(path, seed);
        }
        finally
        {
            File.Delete(path);
        }
    }

    private static string FindRoot()
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "ShuntSweep.sln")))
        {
            dir = dir.Parent;
        }

        return dir?.FullName ?? throw new DirectoryNotFoundException("Cannot find the repository root (ShuntSweep.sln) above the test binaries.");
    }
}

using System.Globalization;

namespace ShuntSweep.Simulation.Tests.Support;

/// <summary>Reads the cited reference tables copied into data/reference/physics (see its SOURCES.md).</summary>
internal static class ReferenceData
{
    public static IReadOnlyList<string[]> Rows(string file) =>
        File.ReadAllLines(Path.Combine(Benches.Root, "data", "reference", "physics", file))
            .Where(l => l.Length > 0 && !l.StartsWith('#'))
            .Skip(1)
            .Select(l => l.Split(','))
            .ToList();

    public static double Constant(string quantity) =>
        double.Parse(Rows("constants-codata2018.csv").First(r => r[0] == quantity)[1], CultureInfo.InvariantCulture);

    /// <summary>Every handbook temperature coefficient given for <paramref name="material"/> (rows whose name starts with it).</summary>
    public static IReadOnlyList<double> Alphas(string material) =>
        Rows("materials-20C.csv")
            .Where(r => r[0].StartsWith(material, StringComparison.Ordinal) && r[2].Length > 0)
            .Select(r => Math.Abs(double.Parse(r[2].Replace("+/-", string.Empty, StringComparison.Ordinal), CultureInfo.InvariantCulture)))
            .ToList();
}

namespace ShuntSweep.Testing;

/// <summary>Finds files of the repository (sequences, simulated benches) from the test's output directory.</summary>
public static class Repo
{
    public static string Root { get; } = FindRoot();

    public static string File(string relative) => Path.Combine(Root, relative);

    public static IEnumerable<string> Files(string folder, string pattern) =>
        Directory.EnumerateFiles(Path.Combine(Root, folder), pattern).Order(StringComparer.Ordinal);

    private static string FindRoot()
    {
        var dir = new DirectoryInfo(AppContext.BaseDirectory);
        while (dir is not null && !System.IO.File.Exists(Path.Combine(dir.FullName, "ShuntSweep.sln")))
        {
            dir = dir.Parent;
        }

        return dir?.FullName ?? throw new InvalidOperationException("ShuntSweep.sln not found above the test directory.");
    }
}

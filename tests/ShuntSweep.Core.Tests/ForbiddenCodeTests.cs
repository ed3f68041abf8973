using System.Text.RegularExpressions;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Core.Tests;

/// <summary>Scans the sources for habits the codebase forbids: wall-clock reads and sleeps outside the injected clock, console output outside the CLI.</summary>
public sealed partial class ForbiddenCodeTests
{
    public static TheoryData<string> Sources() =>
        new(Directory.EnumerateFiles(Repo.File("src"), "*.cs", SearchOption.AllDirectories)
            .Where(f => !f.Contains($"{Path.DirectorySeparatorChar}obj{Path.DirectorySeparatorChar}", StringComparison.Ordinal)
                     && !f.Contains($"{Path.DirectorySeparatorChar}bin{Path.DirectorySeparatorChar}", StringComparison.Ordinal))
            .Select(f => Path.GetRelativePath(Repo.Root, f)));

    [Theory]
    [MemberData(nameof(Sources))]
    public void Source_ReadsTimeOnlyThroughTheInjectedClock(string file)
    {
        var hits = Lines(file).Where(l => WallClock().IsMatch(l.Text)).ToList();
        Assert.True(hits.Count == 0, $"{file}: {string.Join("; ", hits.Select(h => $"line {h.Number}: {h.Text.Trim()}"))} — inject a TimeProvider or IBenchClock instead.");
    }

    [Theory]
    [MemberData(nameof(Sources))]
    public void Source_WritesToTheConsoleOnlyInTheCli(string file)
    {
        if (file.StartsWith(Path.Combine("src", "ShuntSweep.Cli"), StringComparison.Ordinal))
        {
            return;
        }

        var hits = Lines(file).Where(l => ConsoleWrite().IsMatch(l.Text)).ToList();
        Assert.True(hits.Count == 0, $"{file}: {string.Join("; ", hits.Select(h => $"line {h.Number}: {h.Text.Trim()}"))} — report through return values, events or a logger.");
    }

    private static IEnumerable<(int Number, string Text)> Lines(string file) =>
        File.ReadLines(Repo.File(file)).Select((text, i) => (i + 1, text)).Where(l => !l.text.TrimStart().StartsWith("//", StringComparison.Ordinal));

    [GeneratedRegex(@"DateTime(Offset)?\.(Now|UtcNow|Today)\b|Thread\.Sleep\(|Task\.Delay\([^,()]*\)")]
    private static partial Regex WallClock();

    [GeneratedRegex(@"\bConsole\.(Write|WriteLine|Out|Error)\b|AnsiConsole\.")]
    private static partial Regex ConsoleWrite();
}

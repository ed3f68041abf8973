using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

public sealed class OverlayCommandTests
{
    private static readonly string Smoke = Repo.File("sequences/ci-smoke.yaml");

    [Fact]
    public async Task Overlay_OfTwoUnits_PrintsTheDifferences_AndWritesThePageOnlyWhereAsked()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Smoke, "--out", Path.Combine(dir, "unit-1"), "--no-archive", "--seed", "1"));
        Assert.Equal(0, await Cli.RunAsync("run", Smoke, "--out", Path.Combine(dir, "unit-2"), "--no-archive", "--seed", "2"));

        var (exit, output, error) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "overlay", Path.Combine(dir, "unit-1"), Path.Combine(dir, "unit-2"));
        Assert.True(exit == 0, error);
        Assert.Contains("unit-2", output, StringComparison.Ordinal);
        Assert.Contains("resistance", output, StringComparison.Ordinal);
        Assert.False(File.Exists(Path.Combine(dir, "overlay.html")));

        var folder = Path.Combine(dir, "overlay");
        Assert.Equal(0, await Cli.RunAsync("overlay", Path.Combine(dir, "unit-1"), Path.Combine(dir, "unit-2"), "--label", "rev A", "rev B", "--out", folder));
        Assert.True(File.Exists(Path.Combine(folder, "overlay.html")));
        Assert.True(File.Exists(Path.Combine(folder, "plots", "overlay-60mA.png")));
    }

    [Fact]
    public async Task Overlay_OfOneResult_IsAUsageError()
    {
        var (exit, output, error) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "overlay", "result.json");
        Assert.Equal(2, exit);
        Assert.Equal(string.Empty, output);
        Assert.NotEqual(string.Empty, error);
    }
}

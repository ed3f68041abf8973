using System.Diagnostics;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

public sealed class ResumeTests
{
    private static readonly string Demo = Repo.File("sequences/demo-handheld.yaml");
    private static readonly string Bench = Repo.File("simulators/handheld-tarnwell-tw18.yaml");

    [Fact]
    public async Task KilledRun_Resumed_GivesTheJournalOfAnUninterruptedRun()
    {
        var ct = TestContext.Current.CancellationToken;
        var killed = Some.TempDirectory();
        var start = new ProcessStartInfo("dotnet", [Path.Combine(AppContext.BaseDirectory, "shuntsweep.dll"), "run", Demo, "--bench", Bench, "--out", killed, "--seed", "5"])
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
        };
        using (var child = Process.Start(start)!)
        {
            _ = child.StandardOutput.ReadToEndAsync(ct);
            _ = child.StandardError.ReadToEndAsync(ct);
            var events = Path.Combine(killed, "events.jsonl");
            var deadline = Stopwatch.StartNew();
            while (StepsDone(events) < 30 && !child.HasExited && deadline.Elapsed < TimeSpan.FromSeconds(60))
            {
                await Task.Delay(5, ct);
            }

            Assert.False(child.HasExited, "the run finished before it could be killed");
            child.Kill(entireProcessTree: true);
            await child.WaitForExitAsync(ct);
        }

        var doneBefore = StepsDone(Path.Combine(killed, "events.jsonl"));
        Assert.InRange(doneBefore, 30, 80);

        Assert.Equal(0, await Cli.RunAsync("run", "--resume", killed));

        var whole = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Demo, "--bench", Bench, "--out", whole, "--seed", "5"));
        Assert.Equal(
            await File.ReadAllTextAsync(Path.Combine(whole, "journal.csv"), ct),
            await File.ReadAllTextAsync(Path.Combine(killed, "journal.csv"), ct));
    }

    [Fact]
    public async Task Resume_IsRefused_WhenTheSequenceChanged()
    {
        var sequence = Some.TempFile(await File.ReadAllTextAsync(Demo, TestContext.Current.CancellationToken));
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", sequence, "--bench", Bench, "--out", dir));
        await File.AppendAllTextAsync(sequence, "# edited\n", TestContext.Current.CancellationToken);
        Assert.Equal(2, await Cli.RunAsync("run", "--resume", dir));
    }

    private static int StepsDone(string events)
    {
        try
        {
            using var stream = new FileStream(events, FileMode.Open, FileAccess.Read, FileShare.ReadWrite);
            using var reader = new StreamReader(stream);
            return reader.ReadToEnd().Split('\n').Count(l => l.Contains("\"step-done\"", StringComparison.Ordinal));
        }
        catch (IOException)
        {
            return 0;
        }
    }
}

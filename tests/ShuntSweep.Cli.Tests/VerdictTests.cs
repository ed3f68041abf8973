using System.Text.Json;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>A run's verdict: exit 1 when a range fails its accuracy or its burden, the verdict on screen and in every record, and a run that
/// stopped early incomplete everywhere, never a pass.</summary>
public sealed class VerdictTests
{
    private const string Sequence = """
        sequence: Verdict check — 60mA read against the reference
        defaults: { dwell: 20 ms, samples: 2, read: [drop, uut, reference] }
        limits: { maxDrop: 1.5 V }
        steps:
          - sweep: { range: 60mA, currents: [6 mA, 20 mA, 35 mA, 50 mA, 60 mA] }
        """;

    private const string Spec60mA = "accuracy: { reading: 0.01, counts: 3 }, burdenAtFullScale: 1 V }";

    private static (string Sequence, string Bench) Files(string spec60mA)
    {
        var dir = Some.TempDirectory();
        var bench = File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml"));
        var line = bench.Split('\n').Single(l => l.Contains("name: 60mA", StringComparison.Ordinal));
        Assert.Contains(Spec60mA, line, StringComparison.Ordinal);
        File.WriteAllText(Path.Combine(dir, "bench.yaml"), bench.Replace(line, line.Replace(Spec60mA, spec60mA, StringComparison.Ordinal), StringComparison.Ordinal));
        File.WriteAllText(Path.Combine(dir, "sequence.yaml"), Sequence);
        return (Path.Combine(dir, "sequence.yaml"), Path.Combine(dir, "bench.yaml"));
    }

    private static JsonElement Result(string dir) => JsonDocument.Parse(File.ReadAllText(Path.Combine(dir, "result.json"))).RootElement;

    [Fact]
    public async Task AccuracyOutsideSpecification_ExitsOne_WithTheVerdictOnScreen()
    {
        // The simulated UUT reads within ±0.2 % of its shunt tolerance; a specification of ±0.01 % of reading + 0 counts cannot be met.
        var (sequence, bench) = Files("accuracy: { reading: 0.0001, counts: 0 }, burdenAtFullScale: 1 V }");
        var dir = Some.TempDirectory();
        var (exit, output, _) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "run", sequence, "--bench", bench, "--out", dir, "--no-archive");
        Assert.Equal(1, exit);
        Assert.Contains("✗ outside specification (accuracy)", output, StringComparison.Ordinal);
        Assert.Contains("Verdict: ✗ outside specification: 60mA outside specification.", output, StringComparison.Ordinal);
        Assert.Equal("fail", Result(dir).GetProperty("verdict").GetString());
        Assert.Equal("fail", Result(dir).GetProperty("rangeVerdicts").GetProperty("60mA").GetString());
        var report = File.ReadAllText(Path.Combine(dir, "report.html"));
        Assert.Contains("Verdict: ✗ outside specification", report, StringComparison.Ordinal);
    }

    [Fact]
    public async Task BurdenAboveTheSpecifiedBurden_ExitsOne_AndSaysItIsTheBurden()
    {
        // 60mA drops about 738 mV at full scale; 500 mV specified is exceeded by far more than the fit's uncertainty.
        var (sequence, bench) = Files("accuracy: { reading: 0.01, counts: 3 }, burdenAtFullScale: 500 mV }");
        var dir = Some.TempDirectory();
        var (exit, output, _) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "run", sequence, "--bench", bench, "--out", dir, "--no-archive");
        Assert.Equal(1, exit);
        Assert.Contains("✗ outside specification (burden)", output, StringComparison.Ordinal);
        var burden = Result(dir).GetProperty("ranges")[0].GetProperty("burden");
        Assert.Equal("fail", burden.GetProperty("atFullScale").GetString());
        Assert.Equal(0.5, burden.GetProperty("specifiedVolts").GetDouble(), 12);
    }

    [Fact]
    public async Task BurdenAboveItsLimitCurve_Fails_EvenWhereFullScaleWouldPass()
    {
        // A curve of 10 Ω·I up to full scale: the ~12.3 Ω range lies above it at every point, although 1 V at full scale is met.
        var (sequence, bench) = Files("accuracy: { reading: 0.01, counts: 3 }, burdenAtFullScale: 1 V, burdenLimit: [{ current: 0 A, drop: 0 V }, { current: 70 mA, drop: 700 mV }] }");
        var dir = Some.TempDirectory();
        Assert.Equal(1, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", dir, "--no-archive"));
        var burden = Result(dir).GetProperty("ranges")[0].GetProperty("burden");
        Assert.Equal("pass", burden.GetProperty("atFullScale").GetString());
        Assert.Equal("fail", burden.GetProperty("curve").GetString());
        Assert.Equal(5, burden.GetProperty("curvePoints").GetInt32());
        Assert.Equal(5, burden.GetProperty("curvePointsAbove").GetInt32());
    }

    [Fact]
    public async Task WithinSpecification_ExitsZero_AndThePassIsStated()
    {
        var (sequence, bench) = Files(Spec60mA);
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", dir, "--no-archive"));
        Assert.Equal("pass", Result(dir).GetProperty("verdict").GetString());
    }

    [Fact]
    public async Task WeakFuseRun_IsIncomplete_InResultReportArchiveHistoryAndCompare_NeverAPass()
    {
        var dir = Some.TempDirectory();
        var archive = Path.Combine(Some.TempDirectory(), "archive.db");
        Assert.Equal(4, await Cli.RunAsync("run", Repo.File("sequences/fault-demo-weak-fuse.yaml"), "--out", dir, "--archive", archive));

        var result = Result(dir);
        Assert.Equal("incomplete", result.GetProperty("verdict").GetString());
        Assert.Equal("SafetyAbort", result.GetProperty("runEnd").GetString());
        Assert.DoesNotContain("\"pass\"", result.GetProperty("rangeVerdicts").GetRawText(), StringComparison.Ordinal);

        var report = File.ReadAllText(Path.Combine(dir, "report.html"));
        Assert.Contains("Incomplete run (stopped for safety)", report, StringComparison.Ordinal);
        Assert.Contains("Verdict: ◐ incomplete: no verdict", report, StringComparison.Ordinal);
        Assert.DoesNotContain("✓ meets specification", report, StringComparison.Ordinal);

        var (historyExit, history, _) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "history", "TW18-231190", "--archive", archive);
        Assert.Equal(0, historyExit);
        Assert.Contains("incomplete", history, StringComparison.Ordinal);
        Assert.DoesNotContain("meets specification", history, StringComparison.Ordinal);

        // Even compared with itself, an incomplete result does not pass the gate.
        var (compareExit, compare, _) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "compare", Path.Combine(dir, "result.json"), Path.Combine(dir, "result.json"));
        Assert.Equal(1, compareExit);
        Assert.Contains("incomplete", compare, StringComparison.Ordinal);
    }

    [Fact]
    public async Task TwoSimulatedRunsOfOneSerial_WithDifferentSeeds_ShowNoDriftInHistory()
    {
        // One serial is one simulated unit: a second run with another seed differs only by its noise, far inside 0.1 %.
        var archive = Path.Combine(Some.TempDirectory(), "archive.db");
        foreach (var seed in new[] { "1", "2" })
        {
            Assert.Equal(0, await Cli.RunAsync("run", Repo.File("sequences/ci-smoke.yaml"), "--out", Some.TempDirectory(), "--seed", seed, "--archive", archive));
        }

        var (exit, history, _) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "history", "TW18-240417", "--archive", archive, "--drift-limit", "0.1 %");
        Assert.True(exit == 0, history);
    }

    [Fact]
    public async Task AsFoundAndAsLeftRuns_ArePairedInHistory()
    {
        var archive = Path.Combine(Some.TempDirectory(), "archive.db");
        foreach (var (condition, seed) in new[] { ("as-found", "1"), ("as-left", "2") })
        {
            // A run is dated to the second it starts; the as-left run must start in a later second than the as-found one, as on any real bench.
            var second = DateTimeOffset.UtcNow.ToUnixTimeSeconds();
            while (DateTimeOffset.UtcNow.ToUnixTimeSeconds() == second)
            {
                await Task.Delay(50, TestContext.Current.CancellationToken);
            }

            Assert.Equal(0, await Cli.RunAsync("run", Repo.File("sequences/ci-smoke.yaml"), "--out", Some.TempDirectory(), "--seed", seed, "--condition", condition, "--archive", archive));
        }

        var (exit, history, _) = await Cli.RunProcessAsync(new Dictionary<string, string?> { ["COLUMNS"] = "220" }, "history", "TW18-240417", "--archive", archive);

        Assert.True(exit == 0, history);
        Assert.Contains("as-found", history, StringComparison.Ordinal);
        Assert.Contains("as-left", history, StringComparison.Ordinal);
        Assert.Matches(@"As found \d{4}-\d{2}-\d{2} \d{2}:\d{2} → as left \d{4}-\d{2}-\d{2} \d{2}:\d{2}", history);
        Assert.Matches(@"60mA\s*│ 12\.3\d* Ω ± .* │ 12\.3\d* Ω ± ", history);
    }

    [Fact]
    public async Task ReportPdf_WithoutABrowser_SaysWhatItNeeds_AndKeepsTheHtml()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Repo.File("sequences/ci-smoke.yaml"), "--out", dir, "--no-archive"));

        var (exit, _, cautions) = await Cli.RunProcessAsync(new Dictionary<string, string?> { ["SHUNTSWEEP_BROWSER"] = "/nonexistent/chromium" }, "report", dir, "--pdf");

        Assert.Equal(6, exit);
        Assert.Contains("needs a Chromium browser", cautions, StringComparison.Ordinal);
        Assert.True(File.Exists(Path.Combine(dir, "report.html")));
        Assert.False(File.Exists(Path.Combine(dir, "report.pdf")));
    }

    [Fact]
    public async Task UnsettledPoint_IsFlagged_InResultScreenAndReport_AndSaidToBeUsedInTheFit()
    {
        // The inspection's 10A sweep, allowed only 2 s (instead of 20 s) for the heating fuse: its 8 A point cannot settle in that time.
        var dir = Some.TempDirectory();
        var text = File.ReadAllText(Repo.File("sequences/incoming-inspection-tw18.yaml"));
        Assert.Contains("maxWait: 20 s", text, StringComparison.Ordinal);
        var sequence = Some.TempFile(text.Replace("maxWait: 20 s", "maxWait: 2 s", StringComparison.Ordinal), ".yaml");
        var (exit, _, cautions) = await Cli.RunProcessAsync(
            new Dictionary<string, string?>(), "run", sequence, "--bench", Repo.File("simulators/handheld-tarnwell-tw18.yaml"), "--out", dir, "--no-archive");
        Assert.Equal(0, exit);
        var events = File.ReadAllLines(Path.Combine(dir, "events.jsonl")).Where(l => l.Contains("\"not-settled\"", StringComparison.Ordinal)).ToList();
        Assert.NotEmpty(events);
        var step = JsonDocument.Parse(events[0]).RootElement.GetProperty("step").GetInt32();
        var point = Result(dir).GetProperty("ranges").EnumerateArray().SelectMany(r => r.GetProperty("points").EnumerateArray()).Single(p => p.GetProperty("step").GetInt32() == step);
        Assert.True(point.GetProperty("unsettled").GetBoolean());
        Assert.Contains("they are used in the fit", cautions, StringComparison.Ordinal);
        Assert.Contains("Points that had not settled (used in the fit)", File.ReadAllText(Path.Combine(dir, "report.html")), StringComparison.Ordinal);
    }
}

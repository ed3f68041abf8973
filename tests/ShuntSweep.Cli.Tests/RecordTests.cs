using System.Globalization;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>What a calibration record carries: bench instruments' calibration checked at the start, the run's context, and an approval that
/// seals the record's files so that any later change is found.</summary>
public sealed class RecordTests
{
    private const string Sequence = """
        sequence: Record check — 60mA as found
        id: WI-CUR-018
        version: "3.2"
        defaults: { dwell: 20 ms, samples: 2 }
        limits: { maxDrop: 1.5 V }
        steps:
          - sweep: { range: 60mA, currents: [6 mA, 20 mA, 35 mA, 50 mA, 60 mA] }
        """;

    /// <summary>The TW-18 bench with a calibration entry on its drop meter due on <paramref name="due"/>, and the short sequence above.</summary>
    private static (string Sequence, string Bench) Files(DateOnly due)
    {
        var dir = Some.TempDirectory();
        var bench = File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml")).Replace(
            "dropMeter: { resource: \"SIM::dmm\" }",
            $"dropMeter: {{ resource: \"SIM::dmm\", calibration: {{ certificate: CAL-2291-A, due: {due.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)} }} }}",
            StringComparison.Ordinal);
        Assert.Contains("CAL-2291-A", bench, StringComparison.Ordinal);
        File.WriteAllText(Path.Combine(dir, "bench.yaml"), bench);
        File.WriteAllText(Path.Combine(dir, "sequence.yaml"), Sequence);
        return (Path.Combine(dir, "sequence.yaml"), Path.Combine(dir, "bench.yaml"));
    }

    private static DateOnly Today => DateOnly.FromDateTime(DateTime.UtcNow);

    [Fact]
    public async Task OverdueInstrument_IsRefusedBeforeAnythingIsTouched_AndTheOverrideIsRecordedInJournalAndReport()
    {
        var (sequence, bench) = Files(Today.AddDays(-3));
        var refused = Some.TempDirectory();
        var (exit, _, err) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "run", sequence, "--bench", bench, "--out", refused, "--no-archive");
        Assert.Equal(2, exit);
        Assert.Contains("was due for calibration", err, StringComparison.Ordinal);
        Assert.Contains("CAL-2291-A", err, StringComparison.Ordinal);
        Assert.False(File.Exists(Path.Combine(refused, "journal.csv")));

        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", dir, "--no-archive", "--overdue-reason", "spare meter checked against the lab standard today"));
        var events = File.ReadAllText(Path.Combine(dir, "events.jsonl"));
        Assert.Contains("\"calibration-override\"", events, StringComparison.Ordinal);
        Assert.Contains("spare meter checked against the lab standard today", events, StringComparison.Ordinal);
        var report = File.ReadAllText(Path.Combine(dir, "report.html"));
        Assert.Contains("spare meter checked against the lab standard today", report, StringComparison.Ordinal);
        Assert.Contains("overdue by 3 day(s)", report, StringComparison.Ordinal);
    }

    [Fact]
    public async Task InstrumentDueSoon_IsWarnedOf_AndItsCertificateAndDueDateArePrinted()
    {
        var due = Today.AddDays(10);
        var (sequence, bench) = Files(due);
        var dir = Some.TempDirectory();
        var (exit, _, err) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "run", sequence, "--bench", bench, "--out", dir, "--no-archive");
        Assert.Equal(0, exit);
        Assert.Contains("in 10 day(s)", err, StringComparison.Ordinal);
        var report = File.ReadAllText(Path.Combine(dir, "report.html"));
        Assert.Contains("CAL-2291-A", report, StringComparison.Ordinal);
        Assert.Contains(due.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture), report, StringComparison.Ordinal);
    }

    [Fact]
    public async Task RunContext_FromOptionsAndLabProfile_IsInTheRecord()
    {
        var (sequence, bench) = Files(Today.AddDays(200));
        var lab = Some.TempFile("laboratory: Brightwater Test Lab, Unit 4, Quarry Road\noperator: R. Okafor\ncustomer: Fenmoor Instruments Ltd\n");
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", dir, "--no-archive", "--lab", lab, "--operator", "A. Lindqvist", "--humidity", "45 %", "--condition", "as-found"));
        var report = System.Net.WebUtility.HtmlDecode(File.ReadAllText(Path.Combine(dir, "report.html")));
        foreach (var field in new[] { "Brightwater Test Lab, Unit 4, Quarry Road", "Fenmoor Instruments Ltd", "A. Lindqvist", "WI-CUR-018, version 3.2", "as-found", "23 °C", "45 %", "id=\"report-id\">SSR-", "Not yet approved" })
        {
            Assert.Contains(field, report, StringComparison.Ordinal);
        }

        Assert.DoesNotContain("R. Okafor", report, StringComparison.Ordinal); // the option wins over the profile
        Assert.Equal(2, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", Some.TempDirectory(), "--no-archive", "--humidity", "145 %"));
        Assert.Equal(2, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", Some.TempDirectory(), "--no-archive", "--condition", "found"));
    }

    [Fact]
    public async Task Endorse_SealsTheRecord_AndVerifyFindsAOneByteChangeInEachSealedFile()
    {
        var (sequence, bench) = Files(Today.AddDays(200));
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", sequence, "--bench", bench, "--out", dir, "--no-archive"));
        Assert.Equal(1, await Cli.RunAsync("verify", dir)); // never approved
        Assert.Equal(0, await Cli.RunAsync("endorse", dir, "--by", "M. Achterberg", "--role", "technical manager"));
        Assert.Contains("M. Achterberg, technical manager", File.ReadAllText(Path.Combine(dir, "report.html")), StringComparison.Ordinal);
        Assert.Equal(0, await Cli.RunAsync("verify", dir));

        foreach (var file in new[] { "journal.csv", "events.jsonl", "manifest.json", "result.json", "report.html" })
        {
            var copy = Some.TempDirectory();
            foreach (var f in Directory.GetFiles(dir))
            {
                File.Copy(f, Path.Combine(copy, Path.GetFileName(f)));
            }

            Assert.Equal(0, await Cli.RunAsync("verify", copy));
            var bytes = File.ReadAllBytes(Path.Combine(copy, file));
            bytes[bytes.Length / 2] ^= 0x01;
            File.WriteAllBytes(Path.Combine(copy, file), bytes);
            var (exit, _, err) = await Cli.RunProcessAsync(new Dictionary<string, string?>(), "verify", copy);
            Assert.Equal(1, exit);
            Assert.Contains($"{file} changed since approval", err, StringComparison.Ordinal);
        }
    }
}

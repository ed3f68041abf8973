using System.Globalization;
using System.Text.Json.Nodes;
using System.Text.RegularExpressions;
using System.Xml;
using System.Xml.Linq;
using System.Xml.Schema;
using Json.Schema;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>The command line keeps the conventions scripts rely on: results on standard output, errors on standard error, usage errors exit 2
/// naming the offending token, no hard wrap when piped, and machine-readable summaries that validate against their published schemas.</summary>
public sealed partial class CommandLineConventionTests
{
    private static readonly string Smoke = Repo.File("sequences/ci-smoke.yaml");
    private static readonly Dictionary<string, string?> NoEnvironment = [];

    [Theory]
    [InlineData("--nosuchopt", "run", "--nosuchopt", "sequences/ci-smoke.yaml")]
    [InlineData("--nosuchopt", "run", "--nosuchopt")]
    [InlineData("abc", "run", "--seed", "abc", "sequences/ci-smoke.yaml")]
    [InlineData("nosuchcommand", "nosuchcommand")]
    [InlineData("ambiguous", "compare", "a.json", "b.json", "--tolerance", "5")]
    [InlineData("--frobnicate", "plan", "sequences/ci-smoke.yaml", "--frobnicate")]
    public async Task UsageError_ExitsTwo_OnStandardErrorOnly_NamingTheOffendingToken(string blamed, params string[] args)
    {
        var (exit, output, error) = await Cli.RunProcessAsync(NoEnvironment, args);
        Assert.Equal(2, exit);
        Assert.Equal(string.Empty, output);
        var first = error.Split('\n')[0];
        Assert.Contains(blamed, first, StringComparison.Ordinal);
        Assert.DoesNotContain("ci-smoke", first, StringComparison.Ordinal);
    }

    [Fact]
    public async Task PipedOutput_WithColumns200_KeepsEachLineWhole()
    {
        // A run directory whose path makes the closing "Journal: …" line longer than 80 columns but shorter than 200.
        var dir = Path.Combine(Some.TempDirectory(), "run");
        var (exit, output, error) = await Cli.RunProcessAsync(new Dictionary<string, string?> { ["COLUMNS"] = "200" }, "run", Smoke, "--out", dir, "--no-archive");
        Assert.True(exit == 0, error);
        var journalLine = output.Split('\n').Single(l => l.StartsWith("Journal: ", StringComparison.Ordinal));
        Assert.InRange(journalLine.Length, 81, 200);
        Assert.Contains(Path.Combine(dir, "journal.csv"), journalLine, StringComparison.Ordinal);
        Assert.Contains(Path.Combine(dir, "result.json"), journalLine, StringComparison.Ordinal);
    }

    [Fact]
    public async Task PipedOutput_WithoutColumns_IsNotWrappedAtAll()
    {
        var dir = Path.Combine(Some.TempDirectory(), new string('d', 150));
        var (exit, output, error) = await Cli.RunProcessAsync(NoEnvironment, "run", Smoke, "--out", dir, "--no-archive");
        Assert.True(exit == 0, error);
        Assert.Contains(output.Split('\n'), l => l.StartsWith("Journal: ", StringComparison.Ordinal) && l.Contains(Path.Combine(dir, "result.json"), StringComparison.Ordinal));
    }

    [Fact]
    public async Task Quiet_PrintsNothing_AndTheExitCodeTellsTheOutcome()
    {
        var (exit, output, error) = await Cli.RunProcessAsync(NoEnvironment, "run", Smoke, "--out", Some.TempDirectory(), "--no-archive", "--quiet");
        Assert.Equal(0, exit);
        Assert.Equal(string.Empty, output);
        Assert.Equal(string.Empty, error);
    }

    [Fact]
    public async Task FaultDemo_EndsInPlainWords_NotACodeIdentifier()
    {
        var (exit, output, _) = await Cli.RunProcessAsync(NoEnvironment, "run", Repo.File("sequences/fault-demo-weak-fuse.yaml"), "--out", Some.TempDirectory(), "--no-archive");
        Assert.Equal(4, exit);
        Assert.Contains("Stopped for safety", output, StringComparison.Ordinal);
        Assert.DoesNotContain("SafetyAbort", output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task RunJson_ValidatesAgainstItsSchema_AndJUnit_AgainstItsXsd()
    {
        var dir = Some.TempDirectory();
        var json = Path.Combine(dir, "summary.json");
        var junit = Path.Combine(dir, "checks.xml");
        Assert.Equal(0, await Cli.RunAsync("run", Smoke, "--out", Path.Combine(dir, "run"), "--no-archive", "--json", json, "--junit", junit));

        var schema = JsonSchema.FromText(File.ReadAllText(Repo.File("docs/schemas/run-summary.schema.json")));
        var summary = JsonNode.Parse(File.ReadAllText(json));
        var evaluation = schema.Evaluate(summary, new EvaluationOptions { OutputFormat = OutputFormat.List });
        Assert.True(evaluation.IsValid, string.Join("; ", evaluation.Details.Where(d => d.HasErrors).SelectMany(d => d.Errors!.Select(e => $"{d.InstanceLocation}: {e.Value}"))));
        Assert.Equal("completed", (string?)summary!["end"]);
        Assert.Equal(["60mA", "10A"], summary["ranges"]!.AsArray().Select(r => (string?)r!["name"]));
        Assert.Equal("pass", (string?)summary["verdict"]);

        // A summary the schema must refuse, so that the check above can fail.
        summary["end"] = "SafetyAbort";
        Assert.False(schema.Evaluate(summary).IsValid);

        var xml = ValidateJUnit(junit);
        Assert.Equal("6", (string?)xml.Root!.Attribute("tests")); // completed, outputs off, and per range its burden and conformity
    }

    [Fact]
    public async Task RunJsonToStandardOutput_IsTheSummaryAlone()
    {
        var (exit, output, error) = await Cli.RunProcessAsync(NoEnvironment, "run", Smoke, "--out", Some.TempDirectory(), "--no-archive", "--json", "-");
        Assert.True(exit == 0, error);
        var schema = JsonSchema.FromText(File.ReadAllText(Repo.File("docs/schemas/run-summary.schema.json")));
        Assert.True(schema.Evaluate(JsonNode.Parse(output)).IsValid, output);
    }

    [Fact]
    public async Task CompareJUnit_ValidatesAgainstTheXsd_AlsoWhenChecksFail()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Smoke, "--out", Path.Combine(dir, "a"), "--no-archive", "--seed", "1"));
        Assert.Equal(0, await Cli.RunAsync("run", Smoke, "--out", Path.Combine(dir, "b"), "--no-archive", "--seed", "2"));
        var junit = Path.Combine(dir, "compare.xml");
        var exit = await Cli.RunAsync("compare", Path.Combine(dir, "a"), Path.Combine(dir, "b"), "--tolerance", "1 ppm", "--junit", junit);
        Assert.Equal(1, exit);
        var xml = ValidateJUnit(junit);
        Assert.NotEqual("0", (string?)xml.Root!.Attribute("failures"));
    }

    [Fact]
    public async Task Reproducible_TwoRunsInDifferentFolders_GiveTheSameReportSummaryAndJUnit()
    {
        var files = new List<(string Report, string Json, string Junit)>();
        foreach (var name in new[] { "first", "second-elsewhere" })
        {
            var dir = Path.Combine(Some.TempDirectory(), name);
            Assert.Equal(0, await Cli.RunAsync("run", Smoke, "--out", dir, "--no-archive", "--reproducible", "--json", dir + ".json", "--junit", dir + ".xml"));
            files.Add((File.ReadAllText(Path.Combine(dir, "report.html")), File.ReadAllText(dir + ".json"), File.ReadAllText(dir + ".xml")));
            Assert.DoesNotContain(dir, files[^1].Report, StringComparison.Ordinal);
            Assert.DoesNotContain(Repo.Root, files[^1].Report, StringComparison.Ordinal);
        }

        Assert.Equal(files[0], files[1]);
    }

    [Fact]
    public async Task SequenceOnABenchWithoutItsRanges_IsInvalidInput_NotAnUnsafePlan()
    {
        var (exit, output, error) = await Cli.RunProcessAsync(NoEnvironment, "plan", Repo.File("sequences/rnd-wide-range-lx1.yaml"), "--bench", Repo.File("simulators/handheld-tarnwell-tw18.yaml"));
        Assert.Equal(2, exit);
        Assert.Equal(string.Empty, output);
        Assert.Contains("rnd-wide-range-lx1.yaml:", error, StringComparison.Ordinal);
        Assert.Contains("step 1 of the sequence uses range '100uA'", error, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Plan_ShowsEachJacksSupplyCurrentLimit_TheLargestPlannedCurrentPlusMargin_BelowItsDeratedFuse()
    {
        var (exit, output, _) = await Cli.RunProcessAsync(NoEnvironment, "plan", Smoke);
        Assert.Equal(0, exit);

        // ci-smoke plans at most 60 mA through the mA jack (500 mA fuse) and 8 A through the 10A jack (10 A fuse), derated to 80 %.
        Assert.Contains("mA jack: current limit 66 mA (largest planned 60 mA + 10 %, at most 80 % of its 500 mA fuse", output, StringComparison.Ordinal);
        Assert.Contains("10A jack: current limit 8 A (largest planned 8 A + 10 %, at most 80 % of its 10 A fuse", output, StringComparison.Ordinal);
        Assert.Contains("Supply protection: over-voltage", output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task NoArchive_LeavesTheArchiveUntouched()
    {
        var archive = Path.Combine(Some.TempDirectory(), "archive.db");
        var (exit, output, _) = await Cli.RunProcessAsync(
            new Dictionary<string, string?> { ["SHUNTSWEEP_ARCHIVE"] = archive }, "run", Smoke, "--out", Some.TempDirectory(), "--no-archive");
        Assert.Equal(0, exit);
        Assert.Contains("Not archived (--no-archive).", output, StringComparison.Ordinal);
        Assert.False(File.Exists(archive));
    }

    [Fact]
    public async Task CompletedRun_CountsItsStepsTheSameOnScreen_InTheEvents_AndInTheReport()
    {
        var dir = Some.TempDirectory();
        var (exit, output, _) = await Cli.RunProcessAsync(NoEnvironment, "run", Smoke, "--out", dir, "--no-archive");
        Assert.Equal(0, exit);
        var said = StepCounts().Match(output);
        Assert.True(said.Success, output);
        var (all, measured, other) = (int.Parse(said.Groups[1].Value, CultureInfo.InvariantCulture), int.Parse(said.Groups[2].Value, CultureInfo.InvariantCulture), int.Parse(said.Groups[3].Value, CultureInfo.InvariantCulture));
        Assert.Equal(all, measured + other);
        var journalled = File.ReadLines(Path.Combine(dir, "events.jsonl")).Count(l => l.Contains("\"event\":\"step-done\"", StringComparison.Ordinal));
        Assert.Equal(measured, journalled);
        var report = await File.ReadAllTextAsync(Path.Combine(dir, "report.html"), TestContext.Current.CancellationToken);
        Assert.Contains($"{measured} measurement and hold steps journalled", report, StringComparison.Ordinal);
    }

    private const string ValidJUnit = "<testsuites><testsuite name=\"s\" tests=\"1\" failures=\"0\" errors=\"0\"><testcase name=\"c\" classname=\"k\" time=\"0.5\"/></testsuite></testsuites>";

    /// <summary>The XSD is not vacuous: the smallest valid document passes, and each one-change break of what it promises is refused.</summary>
    [Theory]
    [InlineData("", "")]
    [InlineData("tests=\"1\"", "tests=\"-1\"")]
    [InlineData("time=\"0.5\"", "time=\"-0.5\"")]
    [InlineData(" classname=\"k\"", "")]
    [InlineData("time=\"0.5\"/>", "time=\"0.5\"><failure/><error/></testcase>")]
    [InlineData("<testcase ", "<case ")]
    public void JUnitSchema_AcceptsTheValidDocument_AndRefusesEachBreak(string part, string replacement)
    {
        var xml = part.Length == 0 ? ValidJUnit : ValidJUnit.Replace(part, replacement, StringComparison.Ordinal);
        Assert.True(part.Length == 0 || xml != ValidJUnit, "the break did not change the document");
        var schemas = new XmlSchemaSet();
        schemas.Add(null, Repo.File("docs/schemas/junit.xsd"));
        var problems = new List<string>();
        XDocument.Parse(xml).Validate(schemas, (_, e) => problems.Add(e.Message));
        Assert.Equal(part.Length != 0, problems.Count > 0);
    }

    private static XDocument ValidateJUnit(string path)
    {
        var schemas = new XmlSchemaSet();
        schemas.Add(null, Repo.File("docs/schemas/junit.xsd"));
        var problems = new List<string>();
        var xml = XDocument.Load(path);
        xml.Validate(schemas, (_, e) => problems.Add($"{e.Severity}: {e.Message}"));
        Assert.True(problems.Count == 0, string.Join("; ", problems));
        return xml;
    }

    [GeneratedRegex(@"All (\d+) plan steps completed \((\d+) measurement and hold steps journalled, (\d+) operator and ramp steps\)")]
    private static partial Regex StepCounts();
}

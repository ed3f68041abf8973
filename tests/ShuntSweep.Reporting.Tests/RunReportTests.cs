using System.Text.RegularExpressions;
using System.Xml.Linq;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting.Tests.Support;

namespace ShuntSweep.Reporting.Tests;

public sealed class RunReportTests
{
    private static readonly string[] Sections = ["uut", "bench", "safety", "ranges", "plots", "budget", "conformity", "files"];

    [Fact]
    public void Write_ProducesOneHtmlFile_WithEverySection()
    {
        using var run = DemoRun.Create();
        var path = RunReport.Write(run.Directory);
        Assert.Equal(Path.Combine(run.Directory, "report.html"), path);
        var html = File.ReadAllText(path);
        foreach (var id in Sections)
        {
            Assert.Contains($"<section id=\"{id}\">", html, StringComparison.Ordinal);
        }

        Assert.Contains("TW18-240417", html, StringComparison.Ordinal);
        Assert.Contains("SIM-HH-001", html, StringComparison.Ordinal);
        Assert.Contains("SIM-DMM-65", html, StringComparison.Ordinal);
        Assert.Contains("CAT II 600 V", html, StringComparison.Ordinal);
        Assert.Contains("ILAC-G8", html, StringComparison.Ordinal);
        if (run.Result.Ranges.Any(r => r.Correlation is { Count: > 1 }))
        {
            Assert.Contains("Correlation of the parameter estimates", html, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Write_ReferencesNothingOutsideTheFile()
    {
        using var run = DemoRun.Create();
        var html = File.ReadAllText(RunReport.Write(run.Directory));
        Assert.DoesNotContain("http://", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("https://", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("@import", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("<script", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("<link", html, StringComparison.OrdinalIgnoreCase);
        foreach (Match m in Regex.Matches(html, "src=\"([^\"]*)\""))
        {
            Assert.StartsWith("data:image/png;base64,", m.Groups[1].Value, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Write_ShowsEachRangesResistanceAsTheResultStatesIt()
    {
        using var run = DemoRun.Create();
        var html = File.ReadAllText(RunReport.Write(run.Directory));
        foreach (var r in run.Result.Ranges)
        {
            var (u, k) = r.ResistanceOhms.Expansion(run.Result.CoverageProbability);
            Assert.Contains(System.Net.WebUtility.HtmlEncode(QuantityFormatter.FormatExpanded(r.ResistanceOhms.Value, u, k, SiUnit.Ohm)), html, StringComparison.Ordinal);
            Assert.Contains(System.Net.WebUtility.HtmlEncode(r.Model), html, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Write_WritesEveryPlotAsPngAndWellFormedSvg()
    {
        using var run = DemoRun.Create();
        RunReport.Write(run.Directory);
        var plots = Path.Combine(run.Directory, "plots");
        var expected = new List<string> { "drop-60mA", "drop-10A", "drop-log-60mA", "drop-log-10A", "resistance-60mA", "resistance-10A", "all-ranges-loglog", "insertion-error" };
        expected.AddRange(run.Result.Ranges.Where(r => r.ReadingError is { Count: > 0 }).Select(r => $"reading-error-{r.Name}"));
        expected.AddRange(run.Result.Ranges.SelectMany(r => (r.Thermal ?? []).Select(h => $"thermal-{r.Name}-step{h.Step}")));
        if (run.Result.Decomposition is { Count: > 0 } d && d.Any(j => j.Separations.Count > 0))
        {
            expected.Add("decomposition");
        }

        foreach (var name in expected)
        {
            var png = File.ReadAllBytes(Path.Combine(plots, name + ".png"));
            Assert.Equal([0x89, (byte)'P', (byte)'N', (byte)'G'], png[..4]); // PNG signature, ISO/IEC 15948 §5.2
            var svg = XDocument.Parse(File.ReadAllText(Path.Combine(plots, name + ".svg")));
            Assert.Equal("http://www.w3.org/2000/svg", svg.Root!.Name.NamespaceName); // SVG 1.1 namespace, W3C
        }
    }

    [Fact]
    public void Write_Twice_GivesTheSameSvgFiles_WhateverWasDrawnBefore()
    {
        // Skia numbers the clip paths of an SVG per process and plots are drawn in parallel: the files must not show either.
        using var run = DemoRun.Create();
        RunReport.Write(run.Directory);
        var plots = Path.Combine(run.Directory, "plots");
        var first = Directory.GetFiles(plots, "*.svg").Order(StringComparer.Ordinal).Select(File.ReadAllText).ToList();
        RunReport.Write(run.Directory);
        var second = Directory.GetFiles(plots, "*.svg").Order(StringComparer.Ordinal).Select(File.ReadAllText).ToList();
        Assert.NotEmpty(first);
        Assert.Equal(first, second);
        foreach (var svg in first)
        {
            // Every reference names an element of the same document (SVG 1.1 §5.3.2, IRI references).
            var ids = Regex.Matches(svg, "id=\"([^\"]+)\"").Select(m => m.Groups[1].Value).ToHashSet(StringComparer.Ordinal);
            Assert.All(Regex.Matches(svg, "url\\(#([^)]+)\\)"), m => Assert.Contains(m.Groups[1].Value, ids));
        }
    }

    [Fact]
    public void Write_ThermalHoldPlot_IsDrawnWhenTheResultHasAHold()
    {
        using var run = DemoRun.Create();
        var hold = Assert.Single(run.Result.Range("10A").Thermal ?? []);
        RunReport.Write(run.Directory);
        Assert.True(File.Exists(Path.Combine(run.Directory, "plots", $"thermal-10A-step{hold.Step}.svg")));
    }

    [Fact]
    public void Write_NoResult_SaysWhichFileIsMissing()
    {
        using var run = DemoRun.Create();
        File.Delete(Path.Combine(run.Directory, "result.json"));
        var e = Assert.Throws<FileNotFoundException>(() => RunReport.Write(run.Directory));
        Assert.Contains("result.json", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_MalformedEventLine_NamesTheFileAndLine()
    {
        using var run = DemoRun.Create();
        var events = Path.Combine(run.Directory, "events.jsonl");
        var lines = File.ReadAllLines(events).ToList();
        lines.Insert(2, "{not json");
        File.WriteAllText(events, string.Join('\n', lines) + "\n");
        var e = Assert.Throws<InvalidDataException>(() => RunReport.Write(run.Directory));
        Assert.Contains("events.jsonl:3", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_EventLogWithATornLastLine_LeavesThatLineOut()
    {
        using var run = DemoRun.Create();
        File.AppendAllText(Path.Combine(run.Directory, "events.jsonl"), "{\"time\":\"2026-03-14T09:10:00Z\",\"event\":\"fau");
        var html = File.ReadAllText(RunReport.Write(run.Directory));
        Assert.Contains("Run completed", html, StringComparison.Ordinal);
        Assert.DoesNotContain("fau<", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_RunCutOffWithoutRunEnd_SaysSo()
    {
        using var run = DemoRun.Create();
        var events = Path.Combine(run.Directory, "events.jsonl");
        File.WriteAllLines(events, File.ReadAllLines(events).Where(l => !l.Contains("\"run-end\"", StringComparison.Ordinal)));
        var html = File.ReadAllText(RunReport.Write(run.Directory));
        Assert.Contains("no end-of-run record", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_WithoutManifest_StillReportsTheResult()
    {
        using var run = DemoRun.Create();
        File.Delete(Path.Combine(run.Directory, "manifest.json"));
        var html = File.ReadAllText(RunReport.Write(run.Directory));
        Assert.Contains("No manifest", html, StringComparison.Ordinal);
        Assert.Contains("<section id=\"ranges\">", html, StringComparison.Ordinal);
    }
}

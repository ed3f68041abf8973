using System.Text.Json.Nodes;
using ShuntSweep.Reporting.Tests.Support;
using SkiaSharp;

namespace ShuntSweep.Reporting.Tests;

public sealed class ReportInChromiumTests
{
    private static readonly string[] KeyElements = ["top", "outcome", "uut", "bench", "safety", "ranges", "plots", "budget", "conformity", "verdict", "files"];

    [Fact]
    public async Task Report_OpensInHeadlessChromium_WithKeyElementsVisibleAndPlotsDecoded()
    {
        SkipWithoutChromium();
        using var run = DemoRun.Create();
        var report = RunReport.Write(run.Directory);
        await using var browser = await HeadlessChromium.StartAsync(1280, 1600);
        await browser.NavigateAsync(new Uri(report).AbsoluteUri);

        var visible = (await browser.EvaluateAsync($$"""
            (() => {
              const out = {};
              for (const id of {{new JsonArray([.. KeyElements.Select(k => (JsonNode)k)]).ToJsonString()}}) {
                const e = document.getElementById(id);
                if (!e) { out[id] = 'missing'; continue; }
                const r = e.getBoundingClientRect(), s = getComputedStyle(e);
                out[id] = (r.width > 0 && r.height > 0 && s.visibility !== 'hidden' && s.display !== 'none') ? 'visible' : 'hidden';
              }
              return out;
            })()
            """))!.AsObject();
        foreach (var id in KeyElements)
        {
            Assert.Equal("visible", (string?)visible[id]);
        }

        var images = (await browser.EvaluateAsync("[...document.images].map(i => i.complete && i.naturalWidth > 0)"))!.AsArray();
        Assert.NotEmpty(images);
        Assert.All(images, i => Assert.True(i!.GetValue<bool>(), "every embedded plot decodes"));

        var title = (string?)await browser.EvaluateAsync("document.querySelector('header h1').textContent");
        Assert.StartsWith("Burden-voltage characterisation report", title, StringComparison.Ordinal);

        var png = await browser.ScreenshotAsync();
        File.WriteAllBytes(Path.Combine(run.Directory, "screenshot.png"), png);
        using var shot = SKBitmap.Decode(png);
        Assert.True(shot.Width >= 1280 && shot.Height > 1600, $"the screenshot covers the whole page ({shot.Width}×{shot.Height})");
        var band = shot.GetPixel(5, 5); // the header band is our deep teal #0F4C5C
        Assert.InRange(band.Red, 0x05, 0x19);
        Assert.InRange(band.Green, 0x42, 0x56);
        Assert.InRange(band.Blue, 0x52, 0x66);
    }

    [Fact]
    public async Task Report_RequestsNothingFromTheNetwork()
    {
        SkipWithoutChromium();
        using var run = DemoRun.Create();
        var report = RunReport.Write(run.Directory);
        await using var browser = await HeadlessChromium.StartAsync(1280, 900);
        await browser.NavigateAsync(new Uri(report).AbsoluteUri);
        await browser.EvaluateAsync("new Promise(r => setTimeout(() => r(true), 500))");

        var urls = browser.RequestedUrls;
        Assert.Contains(urls, u => u.StartsWith("file:", StringComparison.Ordinal) && u.EndsWith("report.html", StringComparison.Ordinal)); // the recorder saw the page itself
        Assert.All(urls, u => Assert.True(u.StartsWith("file:", StringComparison.Ordinal) || u.StartsWith("data:", StringComparison.Ordinal), $"the report asked for {u}"));
    }

    [Fact]
    public async Task Overlay_RendersInHeadlessChromium_WithAPlotAndATablePerRange_AndNoNetwork()
    {
        SkipWithoutChromium();
        using var run = DemoRun.Create();
        var folder = Path.Combine(run.Directory, "overlay");
        var (page, differences) = OverlayReport.Write([new("rev A", run.Result), new("rev B", DemoRun.ScaleResistance(run.Result, 1.01))], folder);
        await using var browser = await HeadlessChromium.StartAsync(1280, 1600);
        await browser.NavigateAsync(new Uri(page).AbsoluteUri);

        var ranges = differences.Select(d => d.Range).Distinct().Count();
        var images = (await browser.EvaluateAsync("[...document.images].map(i => i.complete && i.naturalWidth >= 900)"))!.AsArray();
        Assert.Equal(ranges, images.Count);
        Assert.All(images, i => Assert.True(i!.GetValue<bool>(), "every overlay plot decodes at its full width"));
        var tables = (await browser.EvaluateAsync("[...document.querySelectorAll('table.differences')].filter(t => t.getBoundingClientRect().height > 0).length"))!.GetValue<int>();
        Assert.Equal(ranges, tables);
        var enTags = (await browser.EvaluateAsync("document.querySelectorAll('table.differences .tag').length"))!.GetValue<int>();
        Assert.True(enTags >= ranges * 3, $"an En tag per compared quantity ({enTags})");
        Assert.All(browser.RequestedUrls, u => Assert.True(u.StartsWith("file:", StringComparison.Ordinal) || u.StartsWith("data:", StringComparison.Ordinal), $"the overlay asked for {u}"));
        File.WriteAllBytes(Path.Combine(folder, "screenshot.png"), await browser.ScreenshotAsync());
    }

    [Fact]
    public async Task RequestRecorder_SeesAPageThatFetchesFromTheNetwork()
    {
        SkipWithoutChromium();
        var page = Path.Combine(Path.GetTempPath(), $"shuntsweep-fetching-{Guid.NewGuid():N}.html");
        File.WriteAllText(page, "<!DOCTYPE html><html><body><img src=\"http://127.0.0.1:9/plot.png\"></body></html>");
        try
        {
            await using var browser = await HeadlessChromium.StartAsync(800, 600);
            await browser.NavigateAsync(new Uri(page).AbsoluteUri);
            Assert.Contains("http://127.0.0.1:9/plot.png", browser.RequestedUrls);
        }
        finally
        {
            File.Delete(page);
        }
    }

    private static void SkipWithoutChromium()
    {
        if (!HeadlessChromium.IsInstalled)
        {
            Assert.Skip($"chromium is not installed at {HeadlessChromium.Executable} (apt-get install chromium; .ci/run installs it).");
        }
    }
}

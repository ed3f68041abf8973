using System.Text.RegularExpressions;
using ShuntSweep.Reporting.Tests.Support;
using UglyToad.PdfPig;

namespace ShuntSweep.Reporting.Tests;

/// <summary>The report printed to PDF by headless Chromium: a short certificate, the engineering appendix after it, and every page
/// footed with the report id and "page x of y".</summary>
public sealed partial class ReportPdfTests
{
    [Fact]
    public async Task PrintedReport_HasACertificateOfTwoToFourPages_ThenTheAppendix_WithPageXOfYOnEveryPage()
    {
        var pages = await PrintedPagesAsync();

        // Page footers: the same report id on every page, and page i of N with N the PDF's own page count.
        var id = ReportId().Match(pages[0]).Groups["id"].Value;
        Assert.NotEmpty(id);
        for (var i = 0; i < pages.Count; i++)
        {
            Assert.Contains($"Report {id}", pages[i], StringComparison.Ordinal);
            Assert.EndsWith($"page {i + 1} of {pages.Count}", pages[i].TrimEnd(), StringComparison.Ordinal);
        }

        // ISO/IEC 17025:2017 7.8 asks for a record a customer can read: the certificate (identity, record, results, conformity) first,
        // 2–4 pages; the appendix begins on a page of its own.
        var appendix = pages.FindIndex(p => p.Contains("Engineering appendix", StringComparison.Ordinal));
        Assert.InRange(appendix, 2, 4);
        Assert.StartsWith("Engineering appendix", Body(pages[appendix]), StringComparison.Ordinal);
        Assert.Contains("Calibration record", string.Concat(pages.Take(appendix)), StringComparison.Ordinal);
        Assert.Contains("Statement of conformity", string.Concat(pages.Take(appendix)), StringComparison.Ordinal);

        // Every field of the calibration record is on the certificate as Chromium renders it, stated or said to be not stated.
        var certificate = string.Join(' ', pages.Take(appendix));
        foreach (var field in new[] { "Report id", "Laboratory", "Customer", "Operator", "Procedure", "Condition of the UUT", "Ambient temperature", "Relative humidity",
            "Measured", "Software", "Approval", "Unit under test", "Serial number", "Bench and instruments" })
        {
            Assert.Contains(field, certificate, StringComparison.Ordinal);
        }
    }

    [Fact]
    public async Task PrintedReport_NeverLeavesAHeadingAtTheFootOfAPage()
    {
        var pages = await PrintedPagesAsync();
        string[] headings = ["Calibration record", "Unit under test", "Bench and instruments", "Results per range", "Statement of conformity", "Safety notes",
            "Range details", "Model choice", "Thermal holds", "Plots", "Uncertainty budget", "Raw data files", "Run log", "Decision rule"];

        foreach (var (page, i) in pages.Select((p, i) => (Body(p), i)))
        {
            Assert.DoesNotContain(headings, h => page.EndsWith(h, StringComparison.Ordinal));
            Assert.False(i > 0 && page.Length == 0, $"page {i + 1} is empty");
        }
    }

    private static async Task<List<string>> PrintedPagesAsync()
    {
        if (PdfPrinter.FindBrowser() is not { } browser)
        {
            Assert.Skip($"no Chromium to print with ({HeadlessChromium.Executable}; apt-get install chromium; .ci/run installs it).");
            return [];
        }

        using var run = DemoRun.Create();
        var html = RunReport.Write(run.Directory);
        var pdf = await PdfPrinter.PrintAsync(html, Path.Combine(run.Directory, "report.pdf"), browser, TestContext.Current.CancellationToken);
        using var document = PdfDocument.Open(pdf);
        return document.GetPages().Select(p => string.Join(' ', p.GetWords().Select(w => w.Text))).ToList();
    }

    /// <summary>A page's text without its footer.</summary>
    private static string Body(string page) => Footer().Replace(page, string.Empty).Trim();

    [GeneratedRegex(@"Report (?<id>SSR-[0-9A-F]{12})")]
    private static partial Regex ReportId();

    [GeneratedRegex(@"Report SSR-[0-9A-F]{12} page \d+ of \d+\s*$")]
    private static partial Regex Footer();
}

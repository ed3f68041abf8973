using System.Globalization;
using CsCheck;
using ShuntSweep.Reporting.Comparison;
using ShuntSweep.Reporting.Html;

namespace ShuntSweep.Reporting.Tests.Html;

public sealed class MarkupTests
{
    [Fact]
    public void E_AnyText_LeavesNoMarkupCharacterUnescaped() =>
        Gen.String.Sample(text =>
        {
            var html = Markup.E(text);
            Assert.DoesNotContain('<', html);
            Assert.DoesNotContain('>', html);
            Assert.DoesNotContain('"', html);
            Assert.Equal(text, System.Net.WebUtility.HtmlDecode(html));
        }, iter: 10_000);

    [Fact]
    public void ParseFraction_AnyPositivePercentage_IsItsHundredth() =>
        Gen.Double[1e-9, 1e4].Sample(v =>
            Assert.Equal(v / 100, CompareTolerance.ParseFraction(v.ToString("R", CultureInfo.InvariantCulture) + "%"), v * 1e-15), iter: 10_000);

    [Fact]
    public void Report_SerialWithMarkup_IsShownAsText()
    {
        using var run = Support.DemoRun.Create();
        var manifest = Core.Records.RunManifest.Read(run.Directory);
        (manifest with { UutSerial = "<b onclick=\"x\">TW18</b>" }).Write(run.Directory);
        var html = File.ReadAllText(RunReport.Write(run.Directory));
        Assert.DoesNotContain("<b onclick", html, StringComparison.Ordinal);
        Assert.Contains("&lt;b onclick=&quot;x&quot;&gt;TW18&lt;/b&gt;", html, StringComparison.Ordinal);
    }
}

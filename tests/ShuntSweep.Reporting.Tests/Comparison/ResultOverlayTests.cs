using ShuntSweep.Reporting.Comparison;
using ShuntSweep.Reporting.Tests.Support;

namespace ShuntSweep.Reporting.Tests.Comparison;

public sealed class ResultOverlayTests
{
    [Fact]
    public void En_IsTheDifferenceOverTheRootSumSquareOfTheExpandedUncertainties()
    {
        // ISO/IEC 17043:2010 Annex B (from memory): En = (x − X) / √(U_lab² + U_ref²) with expanded uncertainties; |En| ≤ 1 is satisfactory.
        // 10.3 ± 0.4 against 10.0 ± 0.3: 0.3 / √(0.16 + 0.09) = 0.3 / 0.5 = 0.6.
        Assert.Equal(0.6, ResultOverlay.En(10.3, 0.4, 10.0, 0.3), 12);
        Assert.Equal(-1.2, ResultOverlay.En(9.4, 0.4, 10.0, 0.3), 12);
        Assert.True(double.IsNaN(ResultOverlay.En(1, 0, 1, 0)));
    }

    [Fact]
    public void AResultAgainstItself_DiffersByNothing()
    {
        using var run = DemoRun.Create();
        var differences = ResultOverlay.Compare([new("a", run.Result), new("b", run.Result)]);
        Assert.Equal(run.Result.Ranges.Select(r => r.Name), differences.Select(d => d.Range));
        Assert.All(differences.SelectMany(d => d.Quantities), q => Assert.Equal(0, q.En));
        Assert.All(differences, d => Assert.Equal(run.Result.Range(d.Range).Points.Count, d.Points.Count));
        Assert.All(differences.SelectMany(d => d.Points), p => Assert.Equal(0, p.Difference));
    }

    [Fact]
    public void AResistanceMovedBy2Percent_ShowsAsItsDifference_WithItsEn()
    {
        using var run = DemoRun.Create();
        var moved = DemoRun.ScaleResistance(run.Result, 1.02);
        var differences = ResultOverlay.Compare([new("rev A", run.Result), new("rev B", moved)]);
        foreach (var d in differences)
        {
            var r = run.Result.Range(d.Range).ResistanceOhms;
            var q = Assert.Single(d.Quantities, q => q.Quantity == "resistance");
            Assert.Equal(0.02 * r.Value, q.Difference, 12);
            Assert.Equal(0.02, q.Relative, 12);
            Assert.Equal(0.02 * r.Value / Math.Sqrt(2 * Math.Pow(2 * r.StandardUncertainty, 2)), q.En, 9);
            Assert.Equal("rev B", d.Label);
        }
    }

    [Fact]
    public void Overlay_NeedsTwoResults()
    {
        using var run = DemoRun.Create();
        Assert.Throws<ArgumentException>(() => ResultOverlay.Compare([new("only", run.Result)]));
    }

    [Fact]
    public void OverlayReport_WritesThePageAndOnePlotPerSharedRange()
    {
        using var run = DemoRun.Create();
        var folder = Path.Combine(run.Directory, "overlay");
        var (page, differences) = OverlayReport.Write([new("rev A", run.Result), new("rev B", DemoRun.ScaleResistance(run.Result, 1.01))], folder);
        Assert.True(File.Exists(page));
        foreach (var range in differences.Select(d => d.Range).Distinct())
        {
            Assert.True(File.Exists(Path.Combine(folder, "plots", $"overlay-{range}.png")));
        }

        var html = File.ReadAllText(page);
        Assert.Contains("rev B", html, StringComparison.Ordinal);
        Assert.DoesNotContain("http://", html.Replace("http://www.w3.org", string.Empty, StringComparison.Ordinal), StringComparison.Ordinal);
    }
}

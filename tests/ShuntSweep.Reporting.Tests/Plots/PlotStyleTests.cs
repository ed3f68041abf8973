using Plot = ScottPlot.Plot;
using ShuntSweep.Reporting.Plots;

namespace ShuntSweep.Reporting.Tests.Plots;

public sealed class PlotStyleTests
{
    [Theory]
    [InlineData(2026, 1, 4, 0, 0, 0, 0, "2026-01-04")]
    [InlineData(2026, 1, 4, 13, 5, 0, 0, "2026-01-04 13:05")]
    [InlineData(2026, 12, 4, 4, 47, 10, 0, "2026-12-04 04:47:10")]
    [InlineData(2026, 12, 4, 4, 47, 10, 250, "2026-12-04 04:47:10.250")]
    public void DateTicks_AreIso8601_WithAsMuchTimeAsTheTickHas(int y, int mo, int d, int h, int mi, int s, int ms, string expected)
    {
        // ISO 8601-1:2019 calendar date YYYY-MM-DD and time hh:mm:ss (the space separator as RFC 3339 5.6 allows).
        Assert.Equal(expected, PlotStyle.Iso(new DateTime(y, mo, d, h, mi, s, ms, DateTimeKind.Utc)));
    }

    [Fact]
    public void ADateAxis_LabelsItsTicksInIso8601_NeverInACulturesOrder()
    {
        var plot = new Plot();
        PlotStyle.IsoDates(plot);
        var start = new DateTime(2026, 1, 4, 0, 0, 0, DateTimeKind.Utc);
        plot.Add.Scatter(new[] { start.ToOADate(), start.AddDays(20).ToOADate() }, new[] { 0.0, 1.0 });
        plot.GetImage(900, 480).Dispose();

        var labels = plot.Axes.Bottom.TickGenerator.Ticks.Where(t => t.IsMajor).Select(t => t.Label).ToList();
        Assert.NotEmpty(labels);
        Assert.All(labels, l => Assert.Matches(@"^\d{4}-\d{2}-\d{2}( \d{2}:\d{2}(:\d{2}(\.\d{3})?)?)?$", l));
    }

    [Fact]
    public void PercentTicks_GoThroughTheFormatter()
    {
        var plot = new Plot();
        PlotStyle.Percent(plot.Axes.Left);
        plot.Add.Scatter(new[] { 0.0, 1.0 }, new[] { -0.25, 0.5 });
        plot.GetImage(400, 300).Dispose();

        var labels = plot.Axes.Left.TickGenerator.Ticks.Where(t => t.IsMajor).Select(t => t.Label).ToList();
        Assert.Contains("0 %", labels);
        Assert.All(labels, l => Assert.EndsWith(" %", l, StringComparison.Ordinal));
        Assert.DoesNotContain(labels, l => l.Contains('E', StringComparison.Ordinal) || l.StartsWith("-0 ", StringComparison.Ordinal));
    }
}

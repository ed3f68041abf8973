using ShuntSweep.Core.Records;
using ShuntSweep.Reporting.Plots;
using ShuntSweep.Reporting.Tests.Support;

namespace ShuntSweep.Reporting.Tests.Plots;

public sealed class RangeViewsTests
{
    [Fact]
    public void Markers_TakeTheFuseFromTheBench_AndItsDeratingFromTheManifest()
    {
        using var run = DemoRun.Create();
        var manifest = RunManifest.Read(run.Directory) with { FuseDerating = 0.8 };
        manifest.Write(run.Directory);
        var records = RunRecords.Load(run.Directory);

        var markers = RangeMarkers.For(records.Result.Range("10A"), records);
        Assert.Equal(10.0, markers.FullScaleA);
        Assert.Equal(10.0, markers.FuseA);
        Assert.Equal(8.0, markers.DeratedFuseA!.Value, 12);
        Assert.Contains(markers.All(), m => m.Label.StartsWith("derated fuse limit", StringComparison.Ordinal));
    }

    [Fact]
    public void Markers_WithoutADeratingInTheManifest_MarkOnlyTheFuseRating()
    {
        using var run = DemoRun.Create();
        var records = RunRecords.Load(run.Directory);
        var markers = RangeMarkers.For(records.Result.Range("60mA"), records);
        Assert.Equal(0.5, markers.FuseA);
        Assert.Null(markers.DeratedFuseA);
        Assert.Null(markers.KneeA);
    }

    [Fact]
    public void DropLogAndResistanceViews_RenderForEveryRangeWithPoints()
    {
        using var run = DemoRun.Create();
        var records = RunRecords.Load(run.Directory);
        for (var i = 0; i < records.Result.Ranges.Count; i++)
        {
            var range = records.Result.Ranges[i];
            var markers = RangeMarkers.For(range, records);
            var log = RangeViews.DropLog(range, i, records.Result.DiodeTemperatureK, markers);
            var resistance = RangeViews.Resistance(range, i, records.Result.DiodeTemperatureK, markers);
            Assert.NotNull(log);
            Assert.NotNull(resistance);
            Assert.Equal([0x89, (byte)'P', (byte)'N', (byte)'G'], log.Png[..4]); // PNG signature, ISO/IEC 15948 §5.2
            Assert.Contains(range.Model, log.Caption, StringComparison.Ordinal);
        }
    }
}

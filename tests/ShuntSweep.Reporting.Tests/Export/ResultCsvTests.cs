using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Reporting.Export;
using ShuntSweep.Reporting.Tests.Support;

namespace ShuntSweep.Reporting.Tests.Export;

public sealed class ResultCsvTests
{
    [Fact]
    public void ExportedPointsAndCurve_ReadBackIntoTheSameNumbers()
    {
        using var run = DemoRun.Create();
        var folder = Path.Combine(run.Directory, "export-test");
        var (pointsPath, curvePath) = ResultCsv.Write(run.Result, folder);

        var points = ResultCsv.ReadPoints(pointsPath);
        var expected = run.Result.Ranges.SelectMany(r => r.Points.Select(p => (r.Name, p))).ToList();
        Assert.Equal(expected.Count, points.Count);
        for (var i = 0; i < points.Count; i++)
        {
            var (range, p) = expected[i];
            var row = points[i];
            Assert.Equal(range, row.Range);
            Assert.Equal(p.Step, row.Step);
            // Bit for bit: the round-trip format writes the shortest text that parses back to the same double (NaN included).
            Assert.Equal(p.CurrentA, row.CurrentA);
            Assert.Equal(p.DropVolts, row.DropVolts);
            Assert.Equal(p.DropUncertaintyVolts, row.DropUncertaintyVolts);
            Assert.Equal(p.ReadingA, row.ReadingA);
            Assert.Equal(p.ResidualVolts, row.ResidualVolts);
            Assert.Equal(p.StudentisedResidual, row.StudentisedResidual);
            Assert.Equal(p.Outlier, row.Outlier);
        }

        var curve = ResultCsv.ReadCurve(curvePath);
        Assert.Equal(ResultCsv.Curves(run.Result).ToList().Count, curve.Count);
        foreach (var group in curve.GroupBy(c => c.Range))
        {
            var range = run.Result.Range(group.Key);
            var fitted = DropCurve.For(range, run.Result.DiodeTemperatureK);
            Assert.Equal(ResultCsv.CurvePoints, group.Count());
            Assert.All(group, c => Assert.Equal(fitted.Drop(c.CurrentA), c.DropVolts));
            Assert.All(group, c => Assert.Equal(c.DropVolts / c.CurrentA, c.ChordOhms));
            Assert.Equal(range.Points.Min(p => p.CurrentA), group.First().CurrentA, 12);
            Assert.Equal(range.Points.Max(p => p.CurrentA), group.Last().CurrentA, 12);
        }
    }

    [Fact]
    public void ExportedHeaders_CarryTheirUnits()
    {
        using var run = DemoRun.Create();
        var (pointsPath, curvePath) = ResultCsv.Write(run.Result, Path.Combine(run.Directory, "export-test"));
        Assert.Equal(
            "range,jack,step,samples,setpoint_A,current_A,drop_V,drop_sd_V,drop_u_V,reading_A,residual_V,studentised_residual,outlier",
            File.ReadLines(pointsPath).First());
        Assert.Equal("range,model,current_A,drop_V,drop_u_V,chord_resistance_ohm,incremental_resistance_ohm", File.ReadLines(curvePath).First());
    }

    [Fact]
    public void MalformedPointsFile_IsReportedWithItsRow()
    {
        var path = Path.Combine(Path.GetTempPath(), $"shuntsweep-points-{Guid.NewGuid():N}.csv");
        File.WriteAllText(path, "range,jack,step,samples,setpoint_A,current_A,drop_V,drop_sd_V,drop_u_V,reading_A,residual_V,studentised_residual,outlier\n"
            + "6mA,mA,3,5,0.001,0.001,0.12,1e-6,4e-7,NaN,1e-7,0.2,False\n"
            + "6mA,mA,4,5,0.002,two mA,0.24,1e-6,4e-7,NaN,1e-7,0.2,False\n");
        try
        {
            var e = Assert.Throws<InvalidDataException>(() => ResultCsv.ReadPoints(path));
            Assert.Contains("row 3", e.Message, StringComparison.Ordinal);
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public void RunReport_WritesTheExportIntoTheRunDirectory()
    {
        using var run = DemoRun.Create();
        RunReport.Write(run.Directory);
        Assert.True(File.Exists(Path.Combine(run.Directory, RunReport.ExportFolder, ResultCsv.PointsFile)));
        Assert.True(File.Exists(Path.Combine(run.Directory, RunReport.ExportFolder, ResultCsv.CurveFile)));
    }
}

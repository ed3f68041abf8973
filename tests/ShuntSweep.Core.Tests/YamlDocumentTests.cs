using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed class YamlDocumentTests
{
    [Fact]
    public void UnknownKey_IsAnError_WithLineColumnAndSuggestion()
    {
        var map = YamlDocument.Parse("name: a\nvoltge: 5 V\n", "x.yaml");
        map.Text("name");
        map.Optional("voltage");
        var ex = Assert.Throws<DocumentException>(map.Finish);
        Assert.Equal(2, ex.Line);
        Assert.Equal(1, ex.Column);
        Assert.Contains("did you mean 'voltage'", ex.Message, StringComparison.Ordinal);
        Assert.StartsWith("x.yaml:2:1:", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void WrongUnit_PointsAtTheValue()
    {
        var map = YamlDocument.Parse("a: 1\nlimit:   5 V\n", "y.yaml");
        var ex = Assert.Throws<DocumentException>(() => map.Quantity("limit", Quantities.SiUnit.Ampere));
        Assert.Equal(2, ex.Line);
        Assert.Equal(10, ex.Column);
    }

    [Fact]
    public void BrokenYaml_ReportsPosition()
    {
        var ex = Assert.Throws<DocumentException>(() => YamlDocument.Parse("a: [1, 2\nb: 3\n", "z.yaml"));
        Assert.True(ex.Line >= 0);
        Assert.Contains("not valid YAML", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void BenchFile_ReadsUutRangesAndLimits()
    {
        var bench = Some.Bench();
        Assert.Equal(3, bench.Uut.Ranges.Count);
        Assert.Equal(0.06, bench.Uut.Range("60mA").FullScale.Amperes, 12);
        Assert.Equal(1e-5, bench.Uut.Range("60mA").Resolution.Amperes, 12);
        Assert.Equal(0.005, bench.Uut.Range("60mA").Accuracy.FractionOfReading, 12);
        Assert.True(bench.IsSimulated);
        Assert.Equal(1.5, bench.Load.MinimumVoltage.Volts, 12);
    }

    [Fact]
    public void BenchFile_RangeOnUnknownJack_IsAnError()
    {
        var text = Some.BenchYaml().Replace("jack: A\n", "jack: B\n", StringComparison.Ordinal);
        var ex = Assert.Throws<DocumentException>(() => BenchReader.Load(Some.TempFile(text)));
        Assert.Contains("jack 'B'", ex.Message, StringComparison.Ordinal);
        Assert.True(ex.Line > 0);
    }
}

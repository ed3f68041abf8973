using System.Xml.Linq;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Reporting.Comparison;
using ShuntSweep.Reporting.Tests.Support;

namespace ShuntSweep.Reporting.Tests.Comparison;

public sealed class ResultComparerTests : IClassFixture<ResultComparerTests.Golden>
{
    private readonly CharacterisationResult _golden;

    public ResultComparerTests(Golden golden)
    {
        ArgumentNullException.ThrowIfNull(golden);
        _golden = golden.Result;
    }

    [Fact]
    public void Compare_TheSameResult_Passes()
    {
        var report = ResultComparer.Compare(_golden, _golden, CompareTolerance.Default);
        Assert.True(report.Passed);
        Assert.Equal(2 + (_golden.Ranges.Count * 4) + _golden.Ranges.Count(r => r.Conformity is not null), report.Checks.Count); // 2: both results complete
    }

    [Fact]
    public void Compare_AnIncompleteResult_FailsEvenAgainstItself()
    {
        var stopped = _golden with { RunEnd = "SafetyAbort" };
        var report = ResultComparer.Compare(stopped, stopped, CompareTolerance.Default);
        Assert.False(report.Passed);
        Assert.Equal(2, report.Failures);
        Assert.Contains(report.Checks, c => c.Quantity == "complete" && c.Message.Contains("stopped for safety", StringComparison.Ordinal));
    }

    [Fact]
    public void Compare_ResistanceMovedWithinTolerance_Passes()
    {
        var moved = DemoRun.ScaleResistance(_golden, 1.004);
        Assert.True(ResultComparer.Compare(moved, _golden, new CompareTolerance(0.005, 100e-6)).Passed);
    }

    [Fact]
    public void Compare_ResistanceMovedBeyondTolerance_FailsOnResistanceOnly()
    {
        var moved = DemoRun.ScaleResistance(_golden, 1.006);
        var report = ResultComparer.Compare(moved, _golden, new CompareTolerance(0.005, 100e-6));
        Assert.False(report.Passed);
        Assert.All(report.Checks.Where(c => !c.Passed), c => Assert.Equal("resistance", c.Quantity));
        Assert.Equal(_golden.Ranges.Count, report.Failures);
    }

    [Fact]
    public void Compare_OffsetMovedBeyondItsAbsoluteTolerance_Fails()
    {
        var moved = _golden with { Ranges = _golden.Ranges.Select(r => r with { OffsetVolts = r.OffsetVolts with { Value = r.OffsetVolts.Value + 150e-6 } }).ToList() };
        var report = ResultComparer.Compare(moved, _golden, CompareTolerance.Default);
        Assert.Equal(["offset"], report.Checks.Where(c => !c.Passed).Select(c => c.Quantity).Distinct());
    }

    [Fact]
    public void Compare_ModelChangedOrRangeMissing_Fails()
    {
        var changed = _golden with { Ranges = [_golden.Ranges[0] with { Model = "clamp-diodes-imagined" }] };
        var report = ResultComparer.Compare(changed, _golden, CompareTolerance.Default);
        Assert.Contains(report.Checks, c => !c.Passed && c.Quantity == "model");
        Assert.Contains(report.Checks, c => !c.Passed && c.Quantity == "present" && c.Range == _golden.Ranges[1].Name);
    }

    [Fact]
    public void JUnit_HasOneTestCasePerCheck_AndAFailureForEachFailedCheck()
    {
        var report = ResultComparer.Compare(DemoRun.ScaleResistance(_golden, 1.02), _golden, CompareTolerance.Default);
        var xml = JUnitReport.Build(report, "demo against golden", new DateTimeOffset(2026, 3, 14, 9, 0, 0, TimeSpan.Zero));
        var suite = Assert.Single(xml.Root!.Elements("testsuite"));
        Assert.Equal("testsuites", xml.Root.Name.LocalName);
        Assert.Equal(report.Checks.Count, suite.Elements("testcase").Count());
        Assert.Equal(report.Failures.ToString(System.Globalization.CultureInfo.InvariantCulture), (string?)suite.Attribute("failures"));
        Assert.Equal(report.Failures, suite.Elements("testcase").Count(t => t.Element("failure") is not null));
        Assert.All(suite.Elements("testcase"), t => Assert.StartsWith("shuntsweep.compare.", (string?)t.Attribute("classname"), StringComparison.Ordinal));
        var reparsed = XDocument.Parse(xml.ToString());
        Assert.Equal(xml.Root.Elements().Count(), reparsed.Root!.Elements().Count());
    }

    [Fact]
    public void JUnit_Write_IsUtf8WithoutByteOrderMark()
    {
        var path = Path.Combine(Path.GetTempPath(), $"shuntsweep-junit-{Guid.NewGuid():N}.xml");
        try
        {
            JUnitReport.Write(ResultComparer.Compare(_golden, _golden, CompareTolerance.Default), path, "same", DateTimeOffset.UnixEpoch);
            var bytes = File.ReadAllBytes(path);
            Assert.Equal((byte)'<', bytes[0]); // no EF BB BF: some CI parsers reject a BOM before the XML declaration (common practice, no source)
            Assert.Equal("0", (string?)XDocument.Load(path).Root!.Attribute("failures"));
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Theory]
    [InlineData("0.5%", 0.005)]
    [InlineData("2 %", 0.02)]
    [InlineData("500 ppm", 0.0005)]
    [InlineData("20ppm", 0.00002)]
    public void Tolerance_ParsesPercentagesAndPartsPerMillion(string text, double expected) =>
        Assert.Equal(expected, CompareTolerance.ParseFraction(text), 1e-15);

    [Theory]
    [InlineData("")]
    [InlineData("0")]
    [InlineData("-1%")]
    [InlineData("one percent")]
    [InlineData("5")]
    [InlineData("0.001")]
    [InlineData("5 V")]
    public void Tolerance_RejectsWhatIsNotPositive_AndABareNumberAsAmbiguous(string text) =>
        Assert.Throws<FormatException>(() => CompareTolerance.ParseFraction(text));

    /// <summary>The demo run's result, fitted once for the class.</summary>
    public sealed class Golden : IDisposable
    {
        private readonly DemoRun _run = DemoRun.Create();

        public CharacterisationResult Result => _run.Result;

        public void Dispose() => _run.Dispose();
    }
}

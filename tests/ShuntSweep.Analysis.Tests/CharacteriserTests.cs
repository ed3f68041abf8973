using ShuntSweep.Analysis.Tests.Support;

namespace ShuntSweep.Analysis.Tests;

public sealed class CharacteriserTests
{
    [Fact]
    public void Analyse_RecoversSeriesResistance_WithinExpandedUncertainty()
    {
        var rng = new Random(1234);
        var samples = Some.Sweep("60mA", "mA", Some.Linear(0, 0.06, 20), i => 1e-5 + (2.04 * i), 20e-6, 5, rng);

        var result = Characteriser.Analyse(samples, uut: null);

        var range = Assert.Single(result.Ranges);
        Assert.Equal("60mA", range.Name);
        Assert.Equal("mA", range.Jack);
        Assert.Equal(0.06, range.FullScaleA, 12);
        Assert.Equal(20, range.Points.Count);
        Assert.InRange(range.ResistanceOhms.Value, 2.04 - (3 * range.ResistanceOhms.StandardUncertainty), 2.04 + (3 * range.ResistanceOhms.StandardUncertainty));
        Assert.InRange(range.OffsetVolts.Value, 1e-5 - (3 * range.OffsetVolts.StandardUncertainty), 1e-5 + (3 * range.OffsetVolts.StandardUncertainty));
        Assert.InRange(range.BurdenAtFullScaleVolts, 0.1224 - 1e-4, 0.1224 + 1e-4);
    }

    [Fact]
    public void Analyse_FlagsOutlier_WithoutDroppingIt()
    {
        var rng = new Random(7);
        var samples = Some.Sweep("6A", "A", Some.Linear(0.1, 6, 15), i => 0.01 * i, 50e-6, 5, rng);
        samples = samples.Select(s => s.Step == 7 ? s with { Burden = new(s.Burden.Volts + 0.002) } : s).ToList();

        var range = Assert.Single(Characteriser.Analyse(samples, null).Ranges);

        Assert.Equal(15, range.Points.Count);
        var flagged = Assert.Single(range.Points, p => p.Outlier);
        Assert.Equal(7, flagged.Step);
    }

    [Fact]
    public void ResultJson_RoundTripsWithCamelCaseFieldsAndNullForNaN()
    {
        var rng = new Random(3);
        var samples = Some.Sweep("600uA", "mA", Some.Linear(0, 600e-6, 8), i => 100 * i, 1e-6, 3, rng);
        var result = Characteriser.Analyse(samples, null);
        var path = Path.Combine(Path.GetTempPath(), $"shuntsweep-{Guid.NewGuid():N}", "result.json");

        ResultJson.Write(result, path);
        var text = File.ReadAllText(path);
        var back = ResultJson.Read(path);

        foreach (var field in new[] { "\"name\"", "\"jack\"", "\"fullScaleA\"", "\"model\"", "\"resistanceOhms\"", "\"offsetVolts\"", "\"standardUncertainty\"", "\"residualStdDevVolts\"", "\"burdenAtFullScaleVolts\"", "\"points\"" })
        {
            Assert.Contains(field, text, StringComparison.Ordinal);
        }

        Assert.Contains("\"readingA\": null", text, StringComparison.Ordinal);
        Assert.Equal(result.Ranges[0].ResistanceOhms, back.Ranges[0].ResistanceOhms);
        Assert.True(double.IsNaN(back.Ranges[0].Points[0].ReadingA));
    }

    [Fact]
    public void ResultJson_Read_NamesLineOfMalformedFile()
    {
        var e = Assert.Throws<InvalidDataException>(() => ResultJson.Deserialize("{\n  \"ranges\": [ {\"name\": 3 ]\n}", "bad.json"));

        Assert.Contains("bad.json: line 2", e.Message, StringComparison.Ordinal);
    }
}

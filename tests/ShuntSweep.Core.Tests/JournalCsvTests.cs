using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed class JournalCsvTests
{
    private static Sample S(int step, double i, double reading) =>
        new("60mA", "mA", step, 0, new Current(i), new Current(i * 1.0001), reading, new Voltage(i * 2.1), new Voltage(5), new Voltage(4.8), TimeSpan.FromSeconds(step));

    [Fact]
    public void Rows_RoundTrip_IncludingOverloadAndMissingReadings()
    {
        var samples = new[] { S(0, 0.01, 0.00999), S(1, 0.02, double.PositiveInfinity), S(2, 0.03, double.NaN) };
        var text = JournalCsv.Header + JournalCsv.FormatRows(samples);
        var back = JournalCsv.Parse(text, "j.csv");
        Assert.False(back.TornTail);
        Assert.Equal(samples, back.Samples);
    }

    [Fact]
    public void ShuntTapColumn_RoundTrips_AndAJournalWithoutItReadsAsNoTap()
    {
        var tapped = new[] { S(0, 0.01, 0.01) with { ShuntTap = new Voltage(0.0123) }, S(1, 0.02, 0.02) with { ShuntTap = new Voltage(0.0246) } };
        Assert.Equal(tapped, JournalCsv.Parse(JournalCsv.Header + JournalCsv.FormatRows(tapped), "j.csv").Samples);

        var withoutTapColumn = "range,jack,step,sample,setpoint_A,reference_A,uut_reading_A,burden_V,supply_V,load_V,elapsed_s\n60mA,mA,0,0,0.01,0.01,,0.021,5,4.8,0\n";
        Assert.Null(Assert.Single(JournalCsv.Parse(withoutTapColumn, "old.csv").Samples).ShuntTap);
    }

    [Fact]
    public void MalformedRow_IsReported_WithItsLineNumber()
    {
        var text = JournalCsv.Header + JournalCsv.FormatRows([S(0, 0.01, 0.01)]) + "60mA,mA,1,0,abc,0.02,,0.04,5,4.8,1,\n";
        var ex = Assert.Throws<DocumentException>(() => JournalCsv.Parse(text, "j.csv"));
        Assert.Equal(3, ex.Line);
        Assert.Contains("setpoint_A", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void TornLastLine_IsLeftOut_AndFlagged()
    {
        var text = JournalCsv.Header + JournalCsv.FormatRows([S(0, 0.01, 0.01)]) + "60mA,mA,1,0,0.0";
        var back = JournalCsv.Parse(text, "j.csv");
        Assert.True(back.TornTail);
        Assert.Single(back.Samples);
    }

    [Fact]
    public void MinimalJournal_WithExtraColumns_GetsStepsFromSetpointRuns()
    {
        var text = "range,setpoint_A,reference_A,uut_reading_A,burden_V,elapsed_s,operator_note\n" +
                   "1A,0.1,0.1,0.1,0.01,0,x\n1A,0.1,0.1,0.1,0.01,1,y\n1A,0.2,0.2,0.2,0.02,2,z\n";
        var back = JournalCsv.Parse(text, "j.csv");
        Assert.Equal([0, 0, 1], back.Samples.Select(s => s.Step));
        Assert.All(back.Samples, s => Assert.Equal("?", s.Jack));
    }

    [Fact]
    public void MissingRequiredColumn_IsAnError()
    {
        var ex = Assert.Throws<DocumentException>(() => JournalCsv.Parse("range,setpoint_A\n", "j.csv"));
        Assert.Contains("burden_V", ex.Message, StringComparison.Ordinal);
    }
}

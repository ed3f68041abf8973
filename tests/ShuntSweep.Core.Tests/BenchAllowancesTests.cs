using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed class BenchAllowancesTests
{
    [Fact]
    public void UncertaintySection_IsReadIntoTheTypeBInputs()
    {
        var path = Some.TempFile(Some.BenchYaml() + """

            ambient: 21.5 °C
            uncertainty:
              dropMeter: { reading: 30 ppm, floor: 5 uV, resolution: 0.1 uV }
              reference: { reading: 0.005 %, floor: 1 uA }
              thermalEmf: 2 uV
              leads: 20 uohm
            """);
        var a = BenchReader.Load(path).Allowances!;
        Assert.Equal(30e-6, a.DropMeter!.FractionOfReading, 15);
        Assert.Equal(5e-6, a.DropMeter.Floor, 15);
        Assert.Equal(0.1e-6, a.DropMeter.Resolution, 15);
        Assert.Equal(50e-6, a.Reference!.FractionOfReading, 15);
        Assert.Equal(1e-6 + (50e-6 * 0.1), a.Reference.Limit(0.1), 15);
        Assert.Equal(2e-6, a.ThermalEmf, 15);
        Assert.Equal(20e-6, a.Leads, 15);
        Assert.Equal(21.5, a.AmbientCelsius);
    }

    [Fact]
    public void BenchWithoutUncertaintySection_StatesNoTypeBInput()
    {
        var a = BenchReader.Load(Some.TempFile(Some.BenchYaml())).Allowances!;
        Assert.Null(a.DropMeter);
        Assert.Null(a.Reference);
        Assert.Equal(0, a.ThermalEmf);
    }

    [Fact]
    public void UnknownUncertaintyKey_FailsWithItsPosition()
    {
        var path = Some.TempFile(Some.BenchYaml() + "\nuncertainty:\n  dropMeter: { reading: 30 ppm, flor: 5 uV }\n");
        var e = Assert.Throws<DocumentException>(() => BenchReader.Load(path));
        Assert.Contains("flor", e.Message, StringComparison.Ordinal);
    }
}

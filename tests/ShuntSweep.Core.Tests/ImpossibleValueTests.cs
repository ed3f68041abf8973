using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Core.Tests;

/// <summary>Physically impossible values in bench and UUT files are refused where they are written, saying what is allowed.</summary>
public sealed class ImpossibleValueTests
{
    /// <summary>The test bench with one line of it replaced.</summary>
    private static string BenchWith(string line, string replacement)
    {
        var text = Some.BenchYaml();
        Assert.Contains(line, text, StringComparison.Ordinal);
        return Some.TempFile(text.Replace(line, replacement, StringComparison.Ordinal));
    }

    [Theory]
    [InlineData("wiring: 20 mohm", "wiring: -20 mohm", "wiring: -20 mohm is out of range; expected ≥ 0 Ω", "-20 mohm")]
    [InlineData("resolution: 0.01 mA", "resolution: 0 mA", "resolution: 0 mA is out of range; expected > 0 A", "0 mA")]
    [InlineData("fuseRating: 500 mA", "fuseRating: -500 mA", "expected > 0 A", "-500 mA")]
    [InlineData("nominalShunt: 1 ohm", "nominalShunt: -1 ohm", "expected ≥ 0 Ω", "-1 ohm")]
    [InlineData("fullScale: 60 mA", "fullScale: 0 mA", "expected > 0 A", "0 mA")]
    [InlineData("currentLimit: 12 A", "currentLimit: 0 A", "expected > 0 A", "0 A")]
    [InlineData("minimumVoltage: 1.5 V", "minimumVoltage: -1.5 V", "expected ≥ 0 V", "-1.5 V")]
    [InlineData("maxPower: 150 W\nload:", "maxPower: -150 W\nload:", "expected > 0 W", "-150 W")]
    [InlineData("accuracy: { reading: 0.5 %, counts: 3 }", "accuracy: { reading: -0.5 %, counts: 3 }", "expected from 0 % to 100 % of the reading", "-0.5 %")]
    [InlineData("- name: 400mA", "- name: 60mA", "a second range named '60mA'", "60mA")]
    [InlineData("- name: A\n", "- name: mA\n", "a second jack named 'mA'", "mA")]
    public void ImpossibleValue_IsRefused_AtItsPosition(string line, string replacement, string expected, string at)
    {
        var path = BenchWith(line, replacement);
        var ex = Assert.Throws<DocumentException>(() => BenchReader.Load(path));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);

        // The position is that of the replaced value (or the repeated name), not of its mapping.
        var lines = File.ReadAllLines(path);
        Assert.StartsWith(at, lines[ex.Line - 1][(ex.Column - 1)..], StringComparison.Ordinal);
    }

    [Fact]
    public void SecondYamlDocument_IsRefused_WhereItStarts()
    {
        var path = Some.TempFile(Some.BenchYaml() + "\n---\nbench: another\n");
        var ex = Assert.Throws<DocumentException>(() => BenchReader.Load(path));
        Assert.Contains("exactly one document", ex.Message, StringComparison.Ordinal);
        Assert.Equal("bench: another", File.ReadAllLines(path)[ex.Line - 1]);
    }

    [Fact]
    public void Utf16File_IsRefused_SayingToSaveAsUtf8()
    {
        var path = Some.TempFile(string.Empty);
        File.WriteAllText(path, Some.BenchYaml(), System.Text.Encoding.Unicode);
        var ex = Assert.Throws<DocumentException>(() => BenchReader.Load(path));
        Assert.Contains("UTF-16", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Utf8WithByteOrderMark_IsRead()
    {
        var path = Some.TempFile(string.Empty);
        File.WriteAllText(path, Some.BenchYaml(), new System.Text.UTF8Encoding(encoderShouldEmitUTF8Identifier: true));
        Assert.Equal("Test bench T1", BenchReader.Load(path).Name);
    }

    [Fact]
    public void Allowed_ExcludesNotANumberAndInfinity()
    {
        Assert.False(Allowed.NonNegative(Quantities.SiUnit.Ohm).Contains(double.NaN));
        Assert.False(Allowed.NonNegative(Quantities.SiUnit.Ohm).Contains(double.PositiveInfinity));
        Assert.True(Allowed.NonNegative(Quantities.SiUnit.Ohm).Contains(0));
        Assert.False(Allowed.Positive(Quantities.SiUnit.Ohm).Contains(0));
        Assert.False(Allowed.Temperature.Contains(-273.15));
        Assert.True(Allowed.Temperature.Contains(-273.14));
    }
}

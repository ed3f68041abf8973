using CsCheck;
using ShuntSweep.Core.Quantities;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed class QuantityParserTests
{
    // SI prefixes and their factors: BIPM, The International System of Units (SI Brochure, 9th ed., 2019), Table 7.
    [Theory]
    [InlineData("10 mA", SiUnit.Ampere, 10e-3)]
    [InlineData("2.5V", SiUnit.Volt, 2.5)]
    [InlineData("500 ms", SiUnit.Second, 0.5)]
    [InlineData("4.7 kΩ", SiUnit.Ohm, 4700)]
    [InlineData("10 mohm", SiUnit.Ohm, 10e-3)]
    [InlineData("1 Mohm", SiUnit.Ohm, 1e6)]
    [InlineData("20 µA", SiUnit.Ampere, 20e-6)]
    [InlineData("20 uA", SiUnit.Ampere, 20e-6)]
    [InlineData("3 nA", SiUnit.Ampere, 3e-9)]
    [InlineData("5 pA", SiUnit.Ampere, 5e-12)]
    [InlineData("1e-3 A", SiUnit.Ampere, 1e-3)]
    [InlineData("-1.5E+2 mV", SiUnit.Volt, -0.15)]
    [InlineData("2 min", SiUnit.Second, 120)]
    [InlineData("10 Hz", SiUnit.Hertz, 10)]
    [InlineData("80 %", SiUnit.None, 0.8)]
    [InlineData("10 ppm", SiUnit.None, 1e-5)]
    public void Parse_AppliesSiPrefix_ToCoherentUnit(string text, SiUnit unit, double expected) =>
        Assert.Equal(expected, QuantityParser.Parse(text, unit), 12);

    [Fact]
    public void Parse_RejectsWrongUnit_NamingBoth()
    {
        var ex = Assert.Throws<FormatException>(() => QuantityParser.Parse("10 mV", SiUnit.Ampere));
        Assert.Contains("volts", ex.Message, StringComparison.Ordinal);
        Assert.Contains("amperes", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Parse_RejectsMissingUnit_WithExample()
    {
        var ex = Assert.Throws<FormatException>(() => QuantityParser.Parse("10", SiUnit.Ampere));
        Assert.Contains("10 mA", ex.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("ten mA")]
    [InlineData("10 qA")]
    [InlineData("")]
    [InlineData("1e999 A")]
    public void Parse_RejectsNonsense(string text) =>
        Assert.Throws<FormatException>(() => QuantityParser.Parse(text, SiUnit.Ampere));

    [Fact]
    public void Format_ThenParse_RoundTripsToFourDigits() =>
        Gen.Double[1e-11, 1e8].Sample(v =>
        {
            var text = QuantityFormatter.Format(v, SiUnit.Ampere, 4);
            var back = QuantityParser.Parse(text, SiUnit.Ampere);
            Assert.True(Math.Abs(back - v) <= 5e-4 * Math.Abs(v), $"{v} -> '{text}' -> {back}");
        });

    [Fact]
    public void TryParse_NeverThrows_OnRandomText() =>
        Gen.String.Sample(s => { _ = QuantityParser.TryParse(s, out _, out _, out _); });

    [Fact]
    public void Ohm_Law_VoltageOverCurrentIsResistance()
    {
        // Ohm's law, V = I·R (IEC 60050-131, 131-12-04): 10 mA through 100 Ω drops 1 V.
        var v = Current.FromMilliamperes(10) * Resistance.FromOhms(100);
        Assert.Equal(1.0, v.Volts, 12);
        Assert.Equal(100.0, (v / Current.FromMilliamperes(10)).Ohms, 12);
    }

    [Fact]
    public void Quantity_RejectsNaN() =>
        Assert.Throws<ArgumentOutOfRangeException>(() => new Current(double.NaN));
}

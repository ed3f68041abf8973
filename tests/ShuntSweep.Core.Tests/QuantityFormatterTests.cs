using System.Globalization;
using System.Text.RegularExpressions;
using CsCheck;
using ShuntSweep.Core.Quantities;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed partial class QuantityFormatterTests
{
    // Worked examples, written out by hand from JCGM 100:2008 (GUM) 7.2.6: "if y = 10,057 62 Ω with uc(y) = 27 mΩ,
    // y should be rounded to 10,058 Ω"; "u(xi) = 28,05 kHz should be rounded down to 28 kHz"; uc(y) = 10,47 mΩ is
    // quoted to two significant digits, 10 mΩ when rounded to nearest (7.2.6 allows rounding up to 11 mΩ; this tool
    // rounds to nearest, so a printed uncertainty is never more than half its last digit from the computed one).
    [Fact]
    public void Format_GumExample_RoundsTheValueToTheUncertaintysLastDigit() =>
        Assert.Equal("10.058 Ω ± 27 mΩ", QuantityFormatter.Format(10.05762, 0.027, SiUnit.Ohm));

    [Fact]
    public void FormatUncertainty_GumExamples_KeepTwoSignificantDigits()
    {
        Assert.Equal("28 kHz", QuantityFormatter.FormatUncertainty(28_050, SiUnit.Hertz));
        Assert.Equal("10 mΩ", QuantityFormatter.FormatUncertainty(10.47e-3, SiUnit.Ohm));
    }

    // JCGM 100:2008 7.2.2 example: m_s = 100,021 47 g with u_c = 0,35 mg, written "100,021 47(35) g"; grams are not a
    // unit of this tool, so the same numbers are checked as plain numbers and as volts.
    [Fact]
    public void Format_GumMassExample_KeepsTheValuesFiveDecimals()
    {
        Assert.Equal("100.02147 ± 0.00035", QuantityFormatter.Format(100.02147, 0.00035, SiUnit.None));
        Assert.Equal("100.02147 V ± 350 µV", QuantityFormatter.Format(100.02147, 0.00035, SiUnit.Volt));
    }

    // JCGM 100:2008 7.2.4 example: "m_s = (100,021 47 ± 0,000 79) g, where ... U = k·u_c ... from u_c = 0,35 mg and
    // k = 2,26 based on the t-distribution for ν = 9 degrees of freedom" (2.26 × 0.35 mg = 0.791 mg → 0.79 mg).
    [Fact]
    public void FormatExpanded_GumMassExample_ShowsUAndK() =>
        Assert.Equal("100.02147 ± 0.00079 (k = 2.26)", QuantityFormatter.FormatExpanded(100.02147, 2.26 * 0.00035, 2.26, SiUnit.None));

    // Hand-worked cases of the same rule (7.2.6) for the forms the tool used to get wrong.
    [Theory]
    [InlineData(99.7016, 0.019, SiUnit.Ohm, "99.702 Ω ± 19 mΩ")]
    [InlineData(1.79569, 13e-6, SiUnit.Ohm, "1.795690 Ω ± 13 µΩ")]
    [InlineData(0.0123, 123e-6, SiUnit.Ohm, "12.30 mΩ ± 120 µΩ")]
    [InlineData(-3e-9, 7.5e-7, SiUnit.Volt, "0 nV ± 750 nV")]
    [InlineData(1.2e-9, 0.995e-3, SiUnit.Volt, "0.0 mV ± 1.0 mV")]
    [InlineData(0.0149939, 170e-6, SiUnit.Ampere, "14.99 mA ± 170 µA")]
    [InlineData(1234.5678, 0.27, SiUnit.Volt, "1.23457 kV ± 270 mV")]
    public void Format_WithUncertainty_FollowsTheRoundingRule(double value, double uncertainty, SiUnit unit, string expected) =>
        Assert.Equal(expected, QuantityFormatter.Format(value, uncertainty, unit));

    [Theory]
    [InlineData(120e-6, SiUnit.Ohm, 2, "120 µΩ")]
    [InlineData(750e-9, SiUnit.Volt, 2, "750 nV")]
    [InlineData(2e-6, SiUnit.Ohm, 4, "2 µΩ")]
    [InlineData(0.0123, SiUnit.Ampere, 4, "12.3 mA")]
    [InlineData(1000, SiUnit.Hertz, 4, "1 kHz")]
    [InlineData(-0.0, SiUnit.Volt, 4, "0 V")]
    [InlineData(999.96, SiUnit.Ampere, 4, "1 kA")]
    [InlineData(1e-15, SiUnit.Ampere, 4, "1 fA")]
    [InlineData(1e12, SiUnit.Ohm, 4, "1 TΩ")]
    [InlineData(3.2e-5, SiUnit.None, 2, "3.2e-5")]
    [InlineData(3600, SiUnit.Second, 4, "3600 s")]
    public void Format_WithoutUncertainty_HasTheDigitsAsked(double value, SiUnit unit, int significant, string expected) =>
        Assert.Equal(expected, QuantityFormatter.Format(value, unit, significant));

    [Theory]
    [InlineData(0.00545123, 1e-6, "5.451 mA")]
    [InlineData(0.00545123, 1e-3, "5 mA")]
    [InlineData(0.00545123, 25e-7, "5.4500 mA")]
    [InlineData(-0.0000004, 1e-6, "0 µA")]
    public void FormatAtResolution_ShowsWholeStepsOfTheMeter(double value, double resolution, string expected) =>
        Assert.Equal(expected, QuantityFormatter.FormatAtResolution(value, resolution, SiUnit.Ampere));

    /// <summary>Values at the ends of the double range (a mutated file gave 6e-306 V) are printed in exponent form instead of overflowing.</summary>
    [Theory]
    [InlineData(6.000000000000256E-306, "6e-306 V")]
    [InlineData(-2.5e-310, "-2.5e-310 V")]
    [InlineData(1.5e300, "1.5e300 V")]
    public void Format_AtTheEndsOfTheDoubleRange_UsesAnExponent(double value, string expected) =>
        Assert.Equal(expected, QuantityFormatter.Format(value, SiUnit.Volt));

    [Fact]
    public void Format_WithUncertainty_AtTheEndsOfTheDoubleRange_DoesNotOverflow()
    {
        Assert.Equal("6.00e-306 V ± 1.0e-307 V", QuantityFormatter.Format(6e-306, 1e-307, SiUnit.Volt));
        Assert.Equal("1 fV", QuantityFormatter.FormatAtResolution(1e-15, 1e-320, SiUnit.Volt));
    }

    [Theory]
    [InlineData(0.8, false, "80 %")]
    [InlineData(0.1, false, "10 %")]
    [InlineData(0.00026, true, "+0.026 %")]
    [InlineData(-0.009068, true, "-0.907 %")]
    [InlineData(0.0, true, "0 %")]
    [InlineData(0.000001, false, "0.0001 %")]
    public void FormatPercent_HasThreeSignificantDigits_AndASignWhenAsked(double fraction, bool showSign, string expected) =>
        Assert.Equal(expected, QuantityFormatter.FormatPercent(fraction, showSign: showSign));

    [Fact]
    public void Format_NotANumber_IsADashNotNaN() =>
        Assert.Equal("—", QuantityFormatter.Format(double.NaN, SiUnit.Ampere));

    [Fact]
    public void Format_WithUncertainty_AnyValue_HasNoExponentBetweenOneFemtoAndOneTera() =>
        Gen.Select(Magnitude, Gen.Double[-1, 1], Gen.Double[1e-6, 1])
            .Sample((m, sign, relative) =>
            {
                var value = Math.CopySign(m, sign);
                var text = QuantityFormatter.Format(value, Math.Max(relative * m, 2e-15), SiUnit.Volt);
                Assert.DoesNotContain("e", text.Replace("µ", string.Empty, StringComparison.Ordinal), StringComparison.Ordinal);
            }, iter: 20_000);

    [Fact]
    public void Format_WithUncertainty_UncertaintyHasTwoSignificantDigitsWithinHalfItsLastDigit() =>
        Gen.Select(Magnitude, Gen.Double[1e-9, 10]).Sample((value, relative) =>
        {
            var u = value * relative;
            if (u < 1e-15)
            {
                return;
            }

            var (_, uText) = Split(QuantityFormatter.Format(value, u, SiUnit.Ampere));
            var printed = QuantityParser.Parse(uText, SiUnit.Ampere);
            var place = Math.Pow(10, Math.Floor(Math.Log10(printed)) - 1);
            var steps = printed / place;
            Assert.InRange(Math.Round(steps), 10, 99);
            Assert.True(Math.Abs(steps - Math.Round(steps)) < 1e-6, $"{u} -> {uText}");
            Assert.True(Math.Abs(printed - u) <= 0.5 * place * (1 + 1e-9), $"{u} -> {uText}");
        }, iter: 20_000);

    [Fact]
    public void Format_WithUncertainty_ValueIsRoundedToTheUncertaintysLastDigit() =>
        Gen.Select(Magnitude, Gen.Double[-1, 1], Gen.Double[1e-9, 10]).Sample((m, sign, relative) =>
        {
            var value = Math.CopySign(m, sign);
            var u = m * relative;
            if (u < 1e-15 || m / u > 1e13 || u > 1e14)
            {
                return;
            }

            var (vText, uText) = Split(QuantityFormatter.Format(value, u, SiUnit.Ohm));
            var printedU = QuantityParser.Parse(uText, SiUnit.Ohm);
            var place = Math.Pow(10, Math.Floor(Math.Log10(printedU)) - 1);
            var printedV = QuantityParser.Parse(vText, SiUnit.Ohm);
            Assert.True(Math.Abs(printedV - value) <= 0.5 * place * (1 + 1e-6) + 1e-15 * Math.Abs(value), $"{value} ± {u} -> {vText}");
            var lastDigit = printedV / place;
            Assert.True(Math.Abs(lastDigit - Math.Round(lastDigit)) < 1e-3 || Math.Abs(lastDigit) > 1e12, $"{value} ± {u} -> {vText} not at {place}");
            Assert.Equal(DecimalsAtPrefix(vText), DecimalsWanted(printedV, vText, place));
        }, iter: 20_000);

    [Fact]
    public void Format_AnyForm_NeverPrintsNegativeZero() =>
        Gen.Select(Gen.Double[-1e-3, 1e-3], Gen.Double[1e-12, 1], Gen.Int[1, 8]).Sample((value, u, sig) =>
        {
            foreach (var text in new[]
            {
                QuantityFormatter.Format(value, u, SiUnit.Volt), QuantityFormatter.Format(value, SiUnit.Volt, sig),
                QuantityFormatter.FormatAtResolution(value, u, SiUnit.Volt),
            })
            {
                Assert.False(NegativeZero().IsMatch(text), text);
            }
        }, iter: 20_000);

    [Fact]
    public void Format_WithoutUncertainty_ParsesBackWithinHalfTheLastDigit() =>
        Gen.Select(Gen.Double[-1e14, 1e14], Gen.Int[1, 10]).Sample((value, sig) =>
        {
            if (Math.Abs(value) < 1e-15)
            {
                return;
            }

            var text = QuantityFormatter.Format(value, SiUnit.Watt, sig);
            var back = QuantityParser.Parse(text, SiUnit.Watt);
            var place = Math.Pow(10, Math.Floor(Math.Log10(Math.Abs(value))) - sig + 1);
            Assert.True(Math.Abs(back - value) <= place * (1 + 1e-9), $"{value} ({sig}) -> {text}");
            Assert.DoesNotContain("e", text, StringComparison.Ordinal);
        }, iter: 20_000);

    [Fact]
    public void FormatAtResolution_AnyReading_IsAWholeNumberOfSteps() =>
        Gen.Select(Gen.Double[-20, 20], Gen.Int[-9, 0], Gen.Int[0, 3].Select(i => new[] { 1, 2, 5, 25 }[i])).Sample((value, exponent, q) =>
        {
            var resolution = q * Math.Pow(10, exponent);
            var text = QuantityFormatter.FormatAtResolution(value, resolution, SiUnit.Ampere);
            var back = QuantityParser.Parse(text, SiUnit.Ampere);
            var exact = ExactValue(text) / (q * (decimal)Math.Pow(10, exponent));
            Assert.True(exact == decimal.Truncate(exact), $"{value} at {resolution} -> {text}");
            Assert.True(Math.Abs(back - value) <= 0.5 * resolution * (1 + 1e-9), $"{value} at {resolution} -> {text}");
        }, iter: 20_000);

    [Fact]
    public void FormatCoverageFactor_TableValue_HasTwoDecimals() =>
        // JCGM 100:2008 Table G.2, ν = 9, p = 95 %: t = 2.26.
        Assert.Equal("2.26", QuantityFormatter.FormatCoverageFactor(2.262157));

    /// <summary>Magnitudes from 1 f to 999 G (the ohm's printable range without an exponent).</summary>
    private static Gen<double> Magnitude => Gen.Double[-15, 14.99].Select(e => Math.Pow(10, e));

    private static (string Value, string Uncertainty) Split(string text)
    {
        var parts = text.Split(" ± ", StringSplitOptions.None);
        Assert.Equal(2, parts.Length);
        return (parts[0], parts[1]);
    }

    /// <summary>The number of decimals written in the numeral of <paramref name="text"/>.</summary>
    private static int DecimalsAtPrefix(string text)
    {
        var numeral = text.Split(' ')[0];
        var dot = numeral.IndexOf('.', StringComparison.Ordinal);
        return dot < 0 ? 0 : numeral.Length - dot - 1;
    }

    /// <summary>The decimals a numeral at the text's prefix needs to end on <paramref name="place"/>.</summary>
    private static int DecimalsWanted(double printed, string text, double place)
    {
        var numeral = double.Parse(text.Split(' ')[0], CultureInfo.InvariantCulture);
        var prefixFactor = numeral == 0 ? 1 : printed / numeral;
        if (numeral == 0)
        {
            var unitText = text.Split(' ')[1];
            prefixFactor = unitText.Length > 1 ? QuantityParser.Parse("1 " + unitText, SiUnit.Ohm) : 1;
        }

        return Math.Max(0, (int)Math.Round(Math.Log10(prefixFactor / place)));
    }

    /// <summary>The value a printed quantity stands for, as an exact decimal (numeral times prefix).</summary>
    private static decimal ExactValue(string text)
    {
        var parts = text.Split(' ');
        var numeral = decimal.Parse(parts[0], CultureInfo.InvariantCulture);
        var prefix = parts.Length > 1 && parts[1].Length > 1 ? parts[1][0] : ' ';
        var exponent = "fpnµm kMGT".IndexOf(prefix, StringComparison.Ordinal) * 3 - 15;
        return numeral * (decimal)Math.Pow(10, prefix == ' ' ? 0 : exponent);
    }

    [GeneratedRegex(@"^-0(\.0*)?( |$)|± -0(\.0*)?( |$)")]
    private static partial Regex NegativeZero();
}

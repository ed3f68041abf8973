using System.Globalization;
using CsCheck;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class ResponseParserTests
{
    [Theory]
    // IEEE 488.2 §8.7.2 NR1, §8.7.3 NR2, §8.7.4 NR3 response formats.
    [InlineData("42", 42)]
    [InlineData("-7", -7)]
    [InlineData("+0.5", 0.5)]
    [InlineData(".25", 0.25)]
    [InlineData("3.", 3)]
    [InlineData("+1.234567E-03", 1.234567e-3)]
    [InlineData("-4.5E+02", -450)]
    [InlineData("1e3", 1000)]
    [InlineData(" +2.000000E+00 ", 2)]
    public void ParseNumber_AcceptsNr1Nr2Nr3(string text, double expected) =>
        Assert.Equal(expected, ScpiResponse.ParseNumber(text), 15);

    [Theory]
    // SCPI-99 Vol. 1 §7.2.1.5: +9.9E37 is +infinity, -9.9E37 is -infinity, 9.91E37 is not-a-number.
    [InlineData("9.9E37", double.PositiveInfinity)]
    [InlineData("+9.90000000E+37", double.PositiveInfinity)]
    [InlineData("-9.9E+37", double.NegativeInfinity)]
    [InlineData("9.91E37", double.NaN)]
    [InlineData("+9.9100E+37", double.NaN)]
    public void ParseNumber_MapsScpiSpecialValues(string text, double expected) =>
        Assert.Equal(expected, ScpiResponse.ParseNumber(text));

    [Theory]
    [InlineData("")]
    [InlineData("E5")]
    [InlineData("1.2.3")]
    [InlineData("1E")]
    [InlineData("0x10")]
    [InlineData("NaN")]
    [InlineData("1,5")]
    [InlineData("1 V")]
    public void ParseNumber_RejectsWhatIsNotDecimalNumeric(string text) =>
        Assert.Throws<FormatException>(() => ScpiResponse.ParseNumber(text));

    [Fact]
    public void ParseNumber_RoundTripsEveryFiniteDoubleInNr3() =>
        Gen.Double.Where(double.IsFinite).Where(d => Math.Abs(d) is not (ScpiResponse.Overload or ScpiResponse.NotANumber)).Sample(d =>
            ScpiResponse.ParseNumber(d.ToString("E16", CultureInfo.InvariantCulture)) == d
            && ScpiResponse.ParseNumber(ScpiResponse.FormatNumber(d)) == d, iter: 10_000);

    [Fact]
    public void ParseNumber_OnRandomText_ReturnsOrThrowsFormatException_Only() =>
        Gen.String[Gen.Char["0123456789+-.eE ,#\"x\u00ff"], 0, 20].Sample(s =>
        {
            try
            {
                _ = ScpiResponse.ParseNumber(s);
                return ScpiResponse.IsDecimalNumeric(s.Trim());
            }
            catch (FormatException ex)
            {
                // Well-formed but beyond a double (for example 1E999) is refused too, saying so.
                return !ScpiResponse.IsDecimalNumeric(s.Trim()) || ex.Message.Contains("outside the range", StringComparison.Ordinal);
            }
        }, iter: 10_000);

    [Theory]
    // IEEE 488.2 §8.7.8 string response data: embedded quotes are doubled. SCPI-99 Vol. 2 §21.8 error entry format.
    [InlineData("0,\"No error\"", 0, "No error")]
    [InlineData("-222,\"Data out of range\"", -222, "Data out of range")]
    [InlineData("-113,\"Undefined header; \"\"FOO\"\"\"", -113, "Undefined header; \"FOO\"")]
    [InlineData("+0,\"No error\"", 0, "No error")]
    [InlineData("-350", -350, "")]
    public void ParseError_ReadsCodeAndMessage(string text, int code, string message) =>
        Assert.Equal(new InstrumentError(code, message), ScpiResponse.ParseError(text));

    [Fact]
    public void ParseError_RandomEntries_RoundTrip() =>
        Gen.Select(Gen.Int[-999, 999], Gen.String[Gen.Char.AlphaNumeric, 0, 30]).Sample((code, msg) =>
            ScpiResponse.ParseError($"{code},\"{msg}\"") == new InstrumentError(code, msg), iter: 10_000);

    [Fact]
    public void ParseIdentity_ReadsFourFields()
    {
        // IEEE 488.2 §10.14.1: *IDN? answers manufacturer, model, serial number, firmware level.
        Assert.Equal(new InstrumentIdentity("Test Bench Co", "PS-1", "SN100", "1.0.3"), ScpiResponse.ParseIdentity("Test Bench Co,PS-1,SN100,1.0.3\r"));
        Assert.Throws<FormatException>(() => ScpiResponse.ParseIdentity("Test Bench Co,PS-1,SN100"));
        Assert.Throws<FormatException>(() => ScpiResponse.ParseIdentity("a,b,c,d,e"));
    }

    [Fact]
    public void ParseNumbers_ReadsCommaSeparatedFetch() =>
        Assert.Equal([1.5e-3, double.PositiveInfinity, -2], ScpiResponse.ParseNumbers("+1.500000E-03,+9.9E+37,-2"));

    [Theory]
    [InlineData("1", true)]
    [InlineData("0", false)]
    [InlineData("ON", true)]
    [InlineData("off", false)]
    [InlineData("+1.000000E+00", true)]
    public void ParseBoolean_AcceptsScpiBooleans(string text, bool expected) => Assert.Equal(expected, ScpiResponse.ParseBoolean(text));
}

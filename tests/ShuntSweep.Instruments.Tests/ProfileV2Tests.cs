using System.Globalization;
using System.Text.RegularExpressions;
using CsCheck;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Uut;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Tests.Support;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

/// <summary>Version 2 profiles: number formats, answer patterns, error modes, conversions, range codes, the reader's error positions, and the
/// check that a profile has what its role needs.</summary>
public sealed class ProfileV2Tests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    private static readonly string[] Formats = ["shortest", "plain", "fixed 0", "fixed 3", "fixed 6", "significant 1", "significant 5", "significant 12", "scientific 0", "scientific 3", "scientific 9"];

    [Fact]
    public void EveryNumberFormat_WritesWhatItAccepts_AndReadsBackWithinItsResolution()
    {
        // Values an instrument is sent: zero, or 1e-15 to 1e9 in magnitude.
        Gen.Select(Gen.Double[-1000, 1000].Where(m => m == 0 || Math.Abs(m) >= 1e-3), Gen.Int[-12, 6], Gen.Int[0, Formats.Length - 1]).Sample((mantissa, exponent, f) =>
        {
            var value = mantissa * Math.Pow(10, exponent);
            var format = NumberFormat.Parse(Formats[f]);
            var text = format.Format(value);
            var back = double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
            var resolution = format.Kind switch
            {
                NumberFormat.NumberStyleKind.Fixed => ((0.5 * Math.Pow(10, -format.Digits)) + (Math.Abs(value) * 1e-15)) * (1 + 1e-9),
                NumberFormat.NumberStyleKind.Significant or NumberFormat.NumberStyleKind.Scientific => Math.Abs(value) * 0.5 * Math.Pow(10, -(format.Kind == NumberFormat.NumberStyleKind.Scientific ? format.Digits : format.Digits - 1)) * 1.0000001,
                NumberFormat.NumberStyleKind.Plain => Math.Abs(value) * 1e-14,
                _ => 0,
            };
            Assert.True(
                format.Accepts(text)
                && (format.Kind is NumberFormat.NumberStyleKind.Shortest or NumberFormat.NumberStyleKind.Scientific || !text.Contains('E', StringComparison.OrdinalIgnoreCase))
                && Math.Abs(back - value) <= resolution + 1e-300,
                $"{format}: {value:R} written as '{text}'");
        }, iter: 10_000);
    }

    [Theory]
    [InlineData("fixed 3", 1e-5, "0.000")]
    [InlineData("fixed 3", 0.0528, "0.053")]
    [InlineData("fixed 1", 1500, "1500.0")]
    [InlineData("significant 4", 1e-5, "0.00001000")]
    [InlineData("significant 3", 12345, "12300")]
    [InlineData("plain", 1e-5, "0.00001")]
    [InlineData("scientific 3", 0.02, "2.000E-02")]
    [InlineData("shortest", 1e-5, "1E-05")]
    [InlineData("fixed 2", -0.001, "0.00")]
    public void NumberFormat_WritesAsTheInstrumentWants(string format, double value, string expected) =>
        Assert.Equal(expected, NumberFormat.Parse(format).Format(value));

    [Theory]
    [InlineData("fixed 3", "1.000", true)]
    [InlineData("fixed 3", "1.00", false)]
    [InlineData("fixed 3", "1E-05", false)]
    [InlineData("plain", "1E-05", false)]
    [InlineData("scientific 2", "1.25E-03", true)]
    [InlineData("scientific 2", "0.00125", false)]
    [InlineData("fixed 0", "12", true)]
    [InlineData("fixed 0", "12.0", false)]
    public void NumberFormat_AcceptsOnlyItsOwnWriting(string format, string text, bool accepted) =>
        Assert.Equal(accepted, NumberFormat.Parse(format).Accepts(text));

    [Theory]
    [InlineData("fixed")]
    [InlineData("fixed x")]
    [InlineData("significant 0")]
    [InlineData("rounded 3")]
    public void NumberFormat_RefusesWhatItCannotWrite(string format) =>
        Assert.Throws<FormatException>(() => NumberFormat.Parse(format));

    [Fact]
    public void AnswerPattern_ReadsBackWhatTheSimulatorWrites_ForEveryPrefixAndFormat()
    {
        // SI prefixes (BIPM SI Brochure, 9th edition, Table 7): p 1e-12, n 1e-9, µ 1e-6, m 1e-3, k 1e3.
        string[] prefixes = ["", "m", "u", "µ", "n", "k"];
        double[] factors = [1, 1e-3, 1e-6, 1e-6, 1e-9, 1e3];
        Gen.Select(Gen.Double[-999, 999], Gen.Int[0, prefixes.Length - 1], Gen.Int[0, Formats.Length - 1]).Sample((shown, p, f) =>
        {
            var format = NumberFormat.Parse(Formats[f]);
            var answer = new AnswerFormat(
                new Regex(@"^(?<value>[-+]?[0-9.]+(E[-+]?[0-9]+)?) *(?<unit>[pnuµmk]?A)$"), "A", factors[p], "{value} " + prefixes[p] + "A", format, ",");
            var si = shown * factors[p];
            var written = answer.Write(si, RoleWords.None);
            var read = answer.ParseOne(written, RoleWords.None);
            var shownBack = double.Parse(written.Split(' ')[0], CultureInfo.InvariantCulture) * factors[p];
            return Math.Abs(read - shownBack) <= Math.Abs(shownBack) * 1e-12;
        }, iter: 10_000);
    }

    [Theory]
    [InlineData("5.001V", 5.001)]
    [InlineData("  123.4mA", 0.1234)]
    [InlineData("-12.5 uA", -12.5e-6)]
    [InlineData("3.3 µA", 3.3e-6)]
    [InlineData("2.5kA", 2500)]
    [InlineData("+1.000E-03 A", 1e-3)]
    public void AnswerPattern_ScalesByTheUnitGroupsPrefix(string text, double expected)
    {
        var unit = text.TrimEnd().EndsWith('V') ? "V" : "A";
        var answer = new AnswerFormat(new Regex($@"^(?<value>[-+]?[0-9.]+(E[-+]?[0-9]+)?) *(?<unit>[pnuµmk]?{unit})$"), unit, 1, null, NumberFormat.Shortest, ",");
        Assert.Equal(expected, answer.ParseOne(text, RoleWords.None), Math.Abs(expected) * 1e-12);
    }

    [Fact]
    public void AnswerPattern_RefusesAWrongUnit_AndATextThatDoesNotMatch()
    {
        var answer = new AnswerFormat(new Regex(@"^(?<value>[-+0-9.]+) *(?<unit>\S+)$"), "A", 1, null, NumberFormat.Shortest, ",");
        Assert.Contains("A with an SI prefix", Assert.Throws<FormatException>(() => answer.ParseOne("5.0 mV", RoleWords.None)).Message, StringComparison.Ordinal);
        Assert.Contains("does not match", Assert.Throws<FormatException>(() => answer.ParseOne("ERR", RoleWords.None)).Message, StringComparison.Ordinal);
    }

    [Fact]
    public void OverRangeAndNoDataWords_ReadAsInfinityAndNaN()
    {
        var profile = Parse("""
            profile: t
            version: 2
            uut:
              overRange: [OL, OVER]
              noData: "----"
              fetch: { send: "VAL?", unit: mA }
            """);
        Assert.Equal(double.PositiveInfinity, profile.ParseNumber("uut.fetch", " OL"));
        Assert.Equal(double.NegativeInfinity, profile.ParseNumber("uut.fetch", "-OVER"));
        Assert.True(double.IsNaN(profile.ParseNumber("uut.fetch", "----")));
        Assert.Equal(0.0125, profile.ParseNumber("uut.fetch", "12.5"), 1e-15);
    }

    [Fact]
    public void RangeCodes_NplcInSeconds_AndUnitScaling_AreAppliedWhenSending()
    {
        var profile = Parse("""
            profile: t
            version: 2
            uut:
              selectRange: { send: "R{code}", codes: { 600uA: "1", 6mA: "2" } }
            voltmeter:
              setNplc: { send: "APER {value}", convert: nplcToSeconds, number: fixed 4 }
            load:
              setCurrent: { send: "CURR {value}", unit: mA, number: fixed 1 }
            """);
        Assert.Equal(["R2"], profile.CommandsForRange("uut.selectRange", "6mA", 0.006));
        Assert.Contains("no code for the range '60mA'", Assert.Throws<NotSupportedException>(() => profile.CommandsForRange("uut.selectRange", "60mA", 0.06)).Message, StringComparison.Ordinal);

        // One power-line cycle lasts 1/50 s at 50 Hz and 1/60 s at 60 Hz (common practice, no source).
        Assert.Equal(["APER 0.0200"], profile.Commands("voltmeter.setNplc", 1, 50));
        Assert.Equal(["APER 0.1667"], profile.Commands("voltmeter.setNplc", 10, 60));
        Assert.Equal(["CURR 1234.5"], profile.Commands("load.setCurrent", 1.2345));
    }

    [Fact]
    public void VersionOneProfile_WithAnEmptyErrorQuery_HasNoErrorReporting()
    {
        var profile = Parse("profile: t\ncommon:\n  nextError: \"\"\n");
        Assert.Equal(ErrorMode.None, profile.Errors.Mode);
        Assert.Equal(1, profile.Version);
    }

    [Fact]
    public async Task StatusWordMode_ReadsOnce_AndReportsOnlyTheMaskedBits()
    {
        // Bit 2 (value 4) is the load's regulation bit, bit 4 (value 16) its error bit: a dropout must not read as an error.
        var reads = 0;
        var status = 4;
        string Answer()
        {
            reads++;
            return status.ToString(CultureInfo.InvariantCulture);
        }

        await using var server = ScpiResponder.Start(c => c == "STAT?" ? Reply.Line(Answer()) : Reply.None);
        var options = new SessionOptions { Errors = new ErrorReporting(ErrorMode.Status, "STAT?", 16) };
        await using var session = new MessageSession(await Transports.TcpTransport.ConnectAsync(server.Resource, "127.0.0.1", server.Port, Ct), options);
        Assert.Empty(await session.DrainErrorsAsync(Ct));
        status = 4 | 16;
        var errors = await session.DrainErrorsAsync(Ct);
        Assert.Equal(16, Assert.Single(errors).Code);
        Assert.Equal(2, reads);
    }

    [Fact]
    public async Task BareCodeMode_ReadsUntilZero()
    {
        var codes = new Queue<string>(["-222", "17", "0"]);
        await using var server = ScpiResponder.Start(c => c == "ERR?" ? Reply.Line(codes.Dequeue()) : Reply.None);
        var options = new SessionOptions { Errors = new ErrorReporting(ErrorMode.Code, "ERR?") };
        await using var session = new MessageSession(await Transports.TcpTransport.ConnectAsync(server.Resource, "127.0.0.1", server.Port, Ct), options);
        Assert.Equal([-222, 17], (await session.DrainErrorsAsync(Ct)).Select(e => e.Code));
    }

    [Theory]
    [InlineData("profile: x\nsupply:\n  setVoltage: { send: \"V {value}\" }\n", 3, 15, "needs 'version: 2'")]
    [InlineData("profile: x\nversion: 2\nsupply:\n  setVoltage: { send: \"V {value}\", number: fixed }\n", 4, 44, "needs a count")]
    [InlineData("profile: x\nversion: 2\nuut:\n  fetch:\n    send: \"VAL?\"\n    answer: { pattern: '(?<reading>.+)' }\n", 6, 24, "group named 'value'")]
    [InlineData("profile: x\nversion: 2\nuut:\n  selectRange: { send: \"R{code}\" }\n", 4, 16, "needs a 'codes' table")]
    [InlineData("profile: x\nversion: 2\nerrors: { mode: status, query: \"STB?\" }\n", 3, 9, "needs 'mask'")]
    [InlineData("profile: x\nversion: 2\nvoltmeter:\n  setNplc: { send: \"APER {value}\", convertt: nplcToSeconds }\n", 4, 36, "unknown key 'convertt'")]
    [InlineData("profile: x\nversion: 2\nsupply:\n  setVoltage: { send: \"V {value}\", convert: nplcToSeconds }\n", 4, 45, "only setNplc")]
    [InlineData("profile: x\nversion: 2\nsupply:\n  measureVoltage: { send: \"VOUT?\", unit: mA }\n", 4, 42, "'mA' is not V")]
    [InlineData("profile: x\nversion: 2\ncommon:\n  nextError: \"ERR?\"\n", 4, 14, "section 'errors'")]
    [InlineData("profile: x\nversion: 3\n", 2, 10, "outside 1…2")]
    public void BadVersionTwoProfile_FailsAtItsLineAndColumn(string text, int line, int column, string expected)
    {
        var ex = Assert.Throws<DocumentException>(() => InstrumentProfile.Parse(text, "bad.yaml", InstrumentProfile.Default));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.Equal((line, column), (ex.Line, ex.Column));
    }

    [Fact]
    public void ProfileCheck_NamesAnEmptyRequiredOperation_AtItsPosition()
    {
        var profile = InstrumentProfile.Parse("profile: t\nversion: 2\nsupply:\n  queryOutput: \"\"\n", "t.yaml", InstrumentProfile.Default);
        var problem = Assert.Single(ProfileRequirements.Check(profile, "supply"));
        Assert.Contains("supply.queryOutput is empty", problem.Message, StringComparison.Ordinal);
        Assert.Equal(("t.yaml", 4, 16), (problem.File, problem.Line, problem.Column));
    }

    [Fact]
    public void ProfileCheck_WantsACodeForEveryRange_AndARangeCommandForSeveralRanges()
    {
        var ranges = Some.Bench().Uut.Ranges;
        var coded = Parse($"profile: t\nversion: 2\nuut:\n  selectRange: {{ send: \"R{{code}}\", codes: {{ {ranges[0].Name}: \"1\" }} }}\n");
        Assert.Contains("no code for the range(s)", Assert.Single(ProfileRequirements.Check(coded, "uut", ranges)).Message, StringComparison.Ordinal);
        var none = Parse("profile: t\nuut:\n  selectRange: \"\"\n");
        Assert.Contains("would stay on whichever range", Assert.Single(ProfileRequirements.Check(none, "uut", ranges)).Message, StringComparison.Ordinal);
        Assert.Empty(ProfileRequirements.Check(none, "uut", [ranges[0]]));
    }

    [Fact]
    public void FreeFormIdentity_IsReadByItsPattern_AndAMissingQueryGivesTheProfileName()
    {
        var profile = Parse("""
            profile: t
            version: 2
            common:
              identify:
                send: "ID?"
                answer: { pattern: '^(?<maker>\S+) (?<model>\S+) SN(?<serial>\d+)$' }
            """);
        var id = profile.ParseIdentity("CORVANE PSX-30 SN0457");
        Assert.Equal(("CORVANE", "PSX-30", "0457", "-"), (id.Manufacturer, id.Model, id.Serial, id.Firmware));
        var anonymous = Parse("profile: quiet\nversion: 2\ncommon:\n  identify: \"\"\n");
        Assert.False(anonymous.HasIdentity);
        Assert.Equal("quiet", anonymous.UnknownIdentity().Model);
    }

    [Fact]
    public void ALimitIsRoundedTowardZero_ByAFormatWithFewDecimals()
    {
        var profile = Parse("profile: t\nversion: 2\nsupply:\n  setCurrentLimit: { send: \"ISET {value}\", number: fixed 3 }\n");
        Assert.Equal(0.052, profile.Operation("supply.setCurrentLimit").TowardZero(0.0528), 1e-15);
        Assert.Equal(0.066, profile.Operation("supply.setCurrentLimit").TowardZero(0.066), 1e-15);
    }

    [Fact]
    public void EveryShippedProfile_Reads_AndHasWhatItsRoleNeeds()
    {
        foreach (var file in Repo.Files("profiles", "*.yaml"))
        {
            var profile = InstrumentProfile.Load(file, null);
            Assert.Equal(2, profile.Version);
            var section = profile.Operations.Values.Where(o => !o.Key.StartsWith("common.", StringComparison.Ordinal) && o.Position.File == file)
                .Select(o => InstrumentProfile.Section(o.Key)).Distinct().Single();
            Assert.Empty(ProfileRequirements.Check(profile, section));
        }
    }

    [Fact]
    public void ProfileSchema_NamesExactlyTheSectionsAndOperationsTheReaderKnows()
    {
        using var schema = System.Text.Json.JsonDocument.Parse(File.ReadAllText(Repo.File("docs/schemas/instrument-profile.schema.json")));
        var properties = schema.RootElement.GetProperty("properties");
        foreach (var (section, operations) in InstrumentProfile.Sections)
        {
            var listed = properties.GetProperty(section).GetProperty("properties").EnumerateObject().Select(p => p.Name).Except(["overRange", "noData"]);
            Assert.Equal(operations.Select(o => o.Op).Order(StringComparer.Ordinal), listed.Order(StringComparer.Ordinal));
        }
    }

    private static InstrumentProfile Parse(string text) => InstrumentProfile.Parse(text, "t.yaml", InstrumentProfile.Default);
}

using ShuntSweep.Simulation.Scpi;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

/// <summary>Conformance of the SCPI parser and common commands, each check citing the rule (IEEE 488.2-1992 / SCPI-99) and,
/// where the test vector comes from an open implementation, j123b567/scpi-parser @ 886615902b2777b71860445305bfe5a3faef4f3e.</summary>
/// <remarks>The section numbers of IEEE 488.2 and SCPI-99 are cited from memory: the standards' texts are not in our reference folder;
/// the rules themselves are corroborated by scpi-parser's sources and tests (see data sources in the team's reference notes).</remarks>
public sealed class ScpiConformanceTests
{
    [Theory]
    // SCPI-99 vol. 1 §6.2.1 (short form = the upper-case part; only the short or the long form, any case).
    // Vectors: scpi-parser libscpi/test/test_scpi_utils.c test_matchPattern / test_matchCommand.
    [InlineData("A", "a", true)]
    [InlineData("Ab", "a", true)]
    [InlineData("Ab", "ab", true)]
    [InlineData("Ab", "aB", true)]
    [InlineData("AB", "a", false)]
    [InlineData("Ab#", "aB", true)]
    [InlineData("Ab#", "aB10", true)]
    [InlineData("Ab#", "a10", true)]
    [InlineData("ABcc:AACddd", "ab:aac", true)]
    [InlineData("ABcc:AACddd", "abcc:aac", true)]
    [InlineData("ABcc:AACddd", "abcc:aacddd", true)]
    [InlineData("ABcc:AACddd", "abcc:aacdd", false)]
    [InlineData("ABcc:AACddd", "a:aac", false)]
    // SCPI-99 vol. 1 §6.2.5: keywords in brackets may be left out.
    [InlineData("[SOURce:]VOLTage[:LEVel][:IMMediate][:AMPLitude]", "volt", true)]
    [InlineData("[SOURce:]VOLTage[:LEVel][:IMMediate][:AMPLitude]", "SOUR:VOLT:LEV:IMM:AMPL", true)]
    [InlineData("[SOURce:]VOLTage[:LEVel][:IMMediate][:AMPLitude]", "source:voltage:amplitude", true)]
    [InlineData("[SOURce:]VOLTage[:LEVel][:IMMediate][:AMPLitude]", "SOURC:VOLT", false)]
    [InlineData("MEASure[:SCALar]:VOLTage[:DC]?", "MEAS:VOLT", true)]
    public void Header_MatchesShortOrLongForm_CaseInsensitive(string pattern, string header, bool matches)
    {
        var unit = ScpiParser.ParseUnit(header);
        Assert.Equal(matches, ScpiPattern.Parse(pattern.TrimEnd('?')).TryMatch(unit.Mnemonics, out _));
    }

    [Fact]
    public void NumericSuffix_IsCaptured_AndDefaultsToOne()
    {
        // SCPI-99 vol. 1 §6.2.5.2: a numeric suffix distinguishes repeated nodes; omitted it means 1.
        var pattern = ScpiPattern.Parse("OUTPut#[:STATe]");
        Assert.True(pattern.TryMatch(["OUTP3"], out var suffixes));
        Assert.Equal(3, suffixes[0]);
        Assert.True(pattern.TryMatch(["OUTPUT"], out suffixes));
        Assert.Equal(1, suffixes[0]);
    }

    [Theory]
    // IEEE 488.2 §7.7.2 NRf and §7.7.3 suffix with Table 7-2 multipliers; vectors from scpi-parser libscpi/test/test_parser.c testParamNumber.
    [InlineData("1.2mV", "Volt", 0.0012)]
    [InlineData("1.2e-1V", "Volt", 0.12)]
    [InlineData("100 OHM", "Ohm", 100)]
    [InlineData("#Q20", "None", 16)]
    [InlineData("#H20", "None", 32)]
    [InlineData("#B11", "None", 3)]
    // MA after a number in amperes is milliampere (scpi-parser units.c table: {"MA", AMPER, 1e-3}); MOHM is megohm (Table 7-2 note).
    [InlineData("10 MA", "Ampere", 0.010)]
    [InlineData("10ma", "Ampere", 0.010)]
    [InlineData("2 MAA", "Ampere", 2e6)]
    [InlineData("3 MOHM", "Ohm", 3e6)]
    [InlineData("5 UA", "Ampere", 5e-6)]
    [InlineData("-.5", "Volt", -0.5)]
    [InlineData("+4E+2", "None", 400)]
    [InlineData("7 KOHM", "Ohm", 7000)]
    public void NumericParameter_DecodesNrfAndSuffixMultipliers(string text, string unit, double expected)
    {
        Assert.Equal(expected, ScpiNumber.Parse(text, Enum.Parse<ScpiUnit>(unit), 0, 1, 0), Math.Abs(expected) * 1e-12);
    }

    [Theory]
    // SCPI-99 vol. 1 §7.2.1.1 (MINimum, MAXimum, DEFault) — "min" -> MIN is also a scpi-parser test_parser.c vector.
    [InlineData("min", -1)]
    [InlineData("MAXimum", 2)]
    [InlineData("def", 0.5)]
    public void NumericParameter_AcceptsMinMaxDef(string text, double expected) =>
        Assert.Equal(expected, ScpiNumber.Parse(text, ScpiUnit.Volt, -1, 2, 0.5));

    [Theory]
    // scpi-parser test_parser.c: "minc" -> -224 Illegal parameter value; "100 xyz" -> -131 Invalid suffix.
    [InlineData("minc", "Volt", -224)]
    [InlineData("100 xyz", "Volt", -131)]
    [InlineData("5 V", "None", -138)]
    [InlineData("1.2.3", "None", -121)]
    public void NumericParameter_RejectsBadText_WithTheStandardCode(string text, string unit, int code)
    {
        var ex = Assert.Throws<ScpiException>(() => ScpiNumber.Parse(text, Enum.Parse<ScpiUnit>(unit), 0, 10, 0));
        Assert.Equal(code, ex.Code);
    }

    [Theory]
    // SCPI-99 §9 / IEEE 488.2 §8.7.2: NR3 responses; 9.9E37 for overload, 9.91E37 for not-a-number (SCPI-99 vol. 1 §7.2.1.5, §7.2.1.6).
    [InlineData(1.234567e-3, "+1.234567000E-03")]
    [InlineData(-2.5, "-2.500000000E+00")]
    [InlineData(double.PositiveInfinity, "+9.900000000E+37")]
    [InlineData(double.NegativeInfinity, "-9.900000000E+37")]
    [InlineData(double.NaN, "+9.910000000E+37")]
    public void Response_IsNr3(double value, string expected) => Assert.Equal(expected, ScpiNumber.Nr3(value));

    [Fact]
    public async Task CommonCommands_BehaveAsIeee4882Requires()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        var dmm = rig.Dmm;

        // §10.14 *IDN?: four fields, maker, model, serial, firmware.
        Assert.Equal("ShuntSweep Simulator,SIM-DMM-65,DMM-00031,1.0", await dmm.QueryAsync("*IDN?"));
        Assert.Equal("Tarnwell Metrology,TW-18,TW18-240417,1.07", await rig.Uut.QueryAsync("*idn?"));

        // §10.3 *CLS clears the error queue and the event register; power-on sets ESR bit 7 (PON, 128).
        Assert.Equal("128", await dmm.QueryAsync("*ESR?"));
        Assert.Equal("0", await dmm.QueryAsync("*ESR?")); // §10.12: reading *ESR? clears it

        // An undefined header queues -113 and sets CME (ESR bit 5, 32); the error queue sets STB bit 2 (SCPI-99 vol. 1 §9; value 4).
        await dmm.SendAsync("BOGUS:HEADER 1");
        Assert.Equal("4", await dmm.QueryAsync("*STB?"));
        Assert.Equal("32", await dmm.QueryAsync("*ESR?"));
        Assert.Equal("-113,\"Undefined header;BOGUS:HEADER\"", await dmm.QueryAsync("SYST:ERR?"));
        Assert.Equal("0,\"No error\"", await dmm.QueryAsync("SYSTem:ERRor:NEXT?"));

        // *IDN? takes no parameter: -108 (scpi-parser test_parser.c: "*IDN? 12" -> -108).
        await dmm.SendAsync("*IDN? 12");
        Assert.Equal("-108", (await dmm.QueryAsync("SYST:ERR?")).Split(',')[0]);
        Assert.Equal("32", await dmm.QueryAsync("*ESR?"));

        // §10.18 *OPC? answers 1 once pending operations are done; §10.19 *OPC sets ESR bit 0.
        Assert.Equal("1", await dmm.QueryAsync("*OPC?"));
        await dmm.SendAsync("*OPC");
        Assert.Equal("1", await dmm.QueryAsync("*ESR?"));

        await dmm.SendAsync("*CLS");
        Assert.Equal("0", await dmm.QueryAsync("*STB?"));
        await dmm.SendAsync("*WAI");
        Assert.Empty(await dmm.DrainErrorsAsync());
    }

    [Fact]
    public async Task CompoundMessage_ContinuesThePathOfThePreviousUnit_AndJoinsResponsesWithSemicolons()
    {
        // SCPI-99 vol. 1 §6.2.4: after "VOLT:NPLC 10", a unit without a leading colon continues from VOLT; a leading colon returns to the root.
        // IEEE 488.2 §8.4.1: response message units are separated by ";".
        await using var rig = Rig.Open(Benches.Handheld);
        Assert.Equal("+1.000000000E+01;+1.000000000E-01", await rig.Dmm.QueryAsync("SENS:VOLT:NPLC 10;RANG 0.1;:SENS:VOLT:NPLC?;:VOLT:RANG?"));
        Assert.Equal("1;0", await rig.Supply.QueryAsync("*OPC?;OUTP?"));
        Assert.Empty(await rig.Dmm.DrainErrorsAsync());
    }

    [Fact]
    public async Task RepeatedLine_RunsAgainEachTime_WithItsErrorsAndTheStateOfTheMoment()
    {
        // The simulator remembers how a line it has seen parsed; a line sent again must still act as SCPI-99 says it does each time:
        // FETC? without INIT queues -230 Data corrupt or stale (SCPI-99 vol. 2 §21.8, execution errors; cited from memory) every time,
        // and a compound query answers from the settings of the moment (IEEE 488.2 §8.4.1: units joined by ";").
        await using var rig = Rig.Open(Benches.Handheld);
        for (var i = 0; i < 3; i++)
        {
            await rig.Dmm.SendAsync("FETC?");
            Assert.Equal("-230", (await rig.Dmm.QueryAsync("SYST:ERR?")).Split(',')[0]);
        }

        await rig.Dmm.SendAsync("SENS:VOLT:NPLC 10");
        Assert.Equal("+1.000000000E+01;+1.000000000E+01", await rig.Dmm.QueryAsync("SENS:VOLT:NPLC?;:SENS:VOLT:NPLC?"));
        await rig.Dmm.SendAsync("SENS:VOLT:NPLC 1");
        Assert.Equal("+1.000000000E+00;+1.000000000E+00", await rig.Dmm.QueryAsync("SENS:VOLT:NPLC?;:SENS:VOLT:NPLC?"));
        await rig.Dmm.SendAsync("BOGUS:HEADER");
        await rig.Dmm.SendAsync("BOGUS:HEADER");
        Assert.Equal(2, (await rig.Dmm.DrainErrorsAsync()).Count(e => e.StartsWith("-113", StringComparison.Ordinal)));
    }

    [Fact]
    public async Task ExecutionErrors_QueueStandardCodes_AndLeaveSettingsUnchanged()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.Supply.SendAsync("VOLT 2.5");
        await rig.Supply.SendAsync("VOLT 1000");       // above the supply's maximum: -222 Data out of range
        await rig.Supply.SendAsync("OUTP MAYBE");      // not a boolean: -224 Illegal parameter value
        await rig.Supply.SendAsync("VOLT");            // -109 Missing parameter
        await rig.Supply.SendAsync("VOLT 1,2");        // -108 Parameter not allowed
        await rig.Supply.SendAsync("VOLT 1 A");        // wrong unit: -131 Invalid suffix
        await rig.Supply.SendAsync("VOLT \"1\"");      // a string where a number is due: -104 Data type error
        await rig.Supply.SendAsync("OUTP OFF;;OUTP OFF"); // empty unit: -102 Syntax error
        var codes = (await rig.Supply.DrainErrorsAsync()).Select(e => e.Split(',')[0]).ToList();
        Assert.Equal(["-222", "-224", "-109", "-108", "-131", "-104", "-102"], codes);
        Assert.Equal(2.5, await rig.Supply.NumberAsync("VOLT?"));
    }

    [Fact]
    public async Task ErrorQueue_Overflow_ReplacesTheLastEntryWithMinus350()
    {
        // SCPI-99 vol. 2 §21.8.2: when the queue is full the most recent error is replaced by -350 "Queue overflow".
        await using var rig = Rig.Open(Benches.Handheld);
        for (var i = 0; i < ScpiInstrument.QueueCapacity + 5; i++)
        {
            await rig.Load.SendAsync("NOPE");
        }

        var errors = await rig.Load.DrainErrorsAsync();
        Assert.Equal(ScpiInstrument.QueueCapacity, errors.Count);
        Assert.Equal("-350,\"Queue overflow\"", errors[^1]);
    }

    [Fact]
    public void ErrorMessages_AreTheStandardTexts()
    {
        // SCPI-99 vol. 2 §21.8 texts, as listed in scpi-parser libscpi/inc/scpi/error.h.
        Assert.Equal("No error", ScpiErrors.Message(0));
        Assert.Equal("Syntax error", ScpiErrors.Message(-102));
        Assert.Equal("Undefined header", ScpiErrors.Message(-113));
        Assert.Equal("Data out of range", ScpiErrors.Message(-222));
        Assert.Equal("Illegal parameter value", ScpiErrors.Message(-224));
        Assert.Equal("Queue overflow", ScpiErrors.Message(-350));
        Assert.Equal("Execution error", ScpiErrors.Message(-299)); // an unlisted code reports its class
    }
}

using CsCheck;
using ShuntSweep.Core.Documents;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Engine.Tests;

public sealed class SequenceReaderTests
{
    private const string Good = """
        sequence: Smoke
        defaults:
          dwell: 50 ms
          samples: 3
        limits:
          maxDrop: 1 V
          fuseDerating: 80 %
        steps:
          - sweep:
              range: 60mA
              currents:
                linear: { from: 10 %, to: 100 %, points: 10 }
          - sweep:
              range: 10A
              currents:
                log: { from: 10 mA, to: 8 A, points: 5 }
              settle: { agree: 3, within: 0.1 %, maxWait: 2 s }
              read: [drop, uut]
          - hold:
              range: 10A
              current: 5 A
              duration: 10 s
              rate: 10 Hz
          - prompt: Check the fuse is cool.
        """;

    [Fact]
    public void GoodSequence_ExpandsSeriesAndDefaults()
    {
        var s = SequenceReader.Parse(Good, "good.yaml");
        var sweep = Assert.IsType<SweepItem>(s.Items[0]);
        Assert.Equal(10, sweep.Currents.Count);
        Assert.True(sweep.Currents[0].IsFraction);
        Assert.Equal(0.1, sweep.Currents[0].Value, 12);
        Assert.Equal(3, sweep.Settings.Samples);
        var log = Assert.IsType<SweepItem>(s.Items[1]);
        Assert.Equal(0.01, log.Currents[0].Value, 12);
        Assert.Equal(8, log.Currents[^1].Value, 9);
        Assert.Equal(Math.Sqrt(0.01 * 8), log.Currents[2].Value, 9);
        Assert.True(log.Settings.Settling.IsAdaptive);
        Assert.Equal(Readings.Drop | Readings.Uut, log.Settings.Read);
        var hold = Assert.IsType<HoldItem>(s.Items[2]);
        Assert.Equal(TimeSpan.FromMilliseconds(100), hold.Interval);
        Assert.IsType<PromptItem>(s.Items[3]);
        Assert.Equal(0.8, s.Limits.FuseDerating, 12);
    }

    // A catalogue of bad files: each must fail with a DocumentException at the stated line and column, saying what was expected.
    [Theory]
    [InlineData("sequence: x\nstep:\n  - sweep: {}\n", 2, 1, "did you mean 'steps'")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      currents: [10 mV]\n", 5, 18, "amperes")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      currents: [10]\n", 5, 18, "no unit")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      curents: [1 mA]\n", 5, 7, "did you mean 'currents'")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      currents: [1 mA]\n      dwell: 5 A\n", 6, 14, "seconds")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      currents:\n        log: { from: 0 mA, to: 1 mA, points: 3 }\n", 6, 22, "above zero")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      currents: [1 mA]\n      read: [uut]\n", 6, 13, "'drop' must be read")]
    [InlineData("sequence: x\nsteps:\n  - sweep:\n      range: 60mA\n      currents: [1 mA]\n      samples: 0\n", 6, 16, "outside")]
    [InlineData("sequence: x\nsteps:\n  - sweep: { range: a, currents: [1 mA] }\n    hold: { range: a, current: 1 mA, duration: 1 s, rate: 1 Hz }\n", 3, 5, "exactly one of")]
    [InlineData("sequence: x\nsteps: []\n", 2, 8, "empty")]
    [InlineData("steps:\n  - prompt: hi\n", 1, 1, "'sequence' is required")]
    [InlineData("sequence: x\nlimits:\n  fuseDerating: 300 %\nsteps:\n  - prompt: hi\n", 3, 17, "at most 100 % of the fuse rating")]
    [InlineData("sequence: x\nlimits:\n  fuseDerating: 150 %\nsteps:\n  - prompt: hi\n", 3, 17, "150 % is out of range")]
    [InlineData("sequence: x\nlimits:\n  maxOfFullScale: 0 %\nsteps:\n  - prompt: hi\n", 3, 19, "above 0 % and at most 200 %")]
    [InlineData("sequence: x\nlimits:\n  maxDrop: -1 V\nsteps:\n  - prompt: hi\n", 3, 12, "> 0 V")]
    [InlineData("sequence: x\nsteps:\n  - hold: { range: a, current: 1 mA, duration: 1 s, rate: 0 Hz }\n", 3, 59, "above 0 Hz and at most 1 kHz")]
    [InlineData("sequence: x\nsteps:\n  - hold: { range: a, current: 1 mA, duration: 1000000000 s, rate: 1 GHz }\n", 3, 48, "at most 7 days")]
    [InlineData("sequence: x\nsteps:\n  - hold: { range: a, current: 1 mA, duration: 120 h, rate: 1 kHz }\n", 3, 61, "at most 5000000 samples")]
    [InlineData("sequence: x\ndefaults: { dwell: -5 ms }\nsteps:\n  - prompt: hi\n", 2, 20, "from 0 s to 1 h")]
    [InlineData("sequence: x\nsteps:\n  - sweep: { range: a, currents: [1 mA], settle: { agree: 3, within: 0 %, maxWait: 2 s } }\n", 3, 70, "above 0 %")]
    [InlineData("sequence: x\nsteps:\n  - ramp: { range: a, from: 0 A, to: 1 A, duration: -2 s }\n", 3, 53, "from 0 s to 7 days")]
    [InlineData("sequence: x\nsteps:\n  - prompt: hi\n---\nsequence: y\n", 5, 1, "exactly one document")]
    public void BadSequence_FailsWithPosition(string text, int line, int column, string expected)
    {
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Parse(text, "bad.yaml"));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.Equal((line, column), (ex.Line, ex.Column));
        Assert.StartsWith($"bad.yaml:{line}:{column}:", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void TooManyPoints_AreRefusedWhileReading_NamingTheLimit()
    {
        // Two series of 60 000 points: the second crosses the 100 000-point bound and is refused where it is written.
        const string text = "sequence: x\nsteps:\n  - sweep: { range: a, currents: { linear: { from: 1 mA, to: 2 mA, points: 60000 } } }\n"
            + "  - sweep: { range: a, currents: { linear: { from: 1 mA, to: 2 mA, points: 60000 } } }\n";
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Parse(text, "big.yaml"));
        Assert.Equal(4, ex.Line);
        Assert.Contains("at most 100000", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void LongList_IsRefusedByItsLength_BeforeItsItemsAreRead()
    {
        var list = string.Join(", ", Enumerable.Repeat("1 mA", PlanLimits.MaxPoints + 1));
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Parse($"sequence: x\nsteps:\n  - sweep: {{ range: a, currents: [{list}] }}\n", "list.yaml"));
        Assert.Equal((3, 34), (ex.Line, ex.Column));
        Assert.Contains("more than 100000 points", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void HugeFile_IsRefusedBeforeItIsParsed()
    {
        // A generated list of millions of points: refused by its size, so it never costs gigabytes to parse.
        var path = Path.Combine(Some.TempDirectory(), "huge.yaml");
        using (var writer = new StreamWriter(path))
        {
            writer.Write("sequence: x\nsteps:\n  - sweep:\n      range: a\n      currents:\n");
            for (var i = 0; i < 400_000; i++)
            {
                writer.Write("        - 1.000 mA\n");
            }
        }

        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Load(path));
        Assert.Contains("larger than 4 MB are refused", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void NonUtf8File_IsRefused_AtTheFirstBadByte()
    {
        // "µA" written in Latin-1 (0xB5): not UTF-8.
        var path = Path.Combine(Some.TempDirectory(), "latin1.yaml");
        File.WriteAllBytes(path, [.. "sequence: x\nsteps:\n  - sweep: { range: a, currents: [5 "u8, 0xB5, .. "A] }\n"u8]);
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Load(path));
        Assert.Equal((3, 37), (ex.Line, ex.Column));
        Assert.Contains("not UTF-8", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Directory_IsRefusedAsInput()
    {
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Load(Some.TempDirectory()));
        Assert.Contains("is a directory", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Parameters_StandInWhereTheyAreNamed()
    {
        const string text = """
            sequence: With parameters
            parameters:
              top: 90 %
              wait: 250 ms
            steps:
              - sweep: { range: 60mA, currents: { linear: { from: 10 %, to: $top, points: 3 } }, dwell: $wait }
            """;
        var sweep = Assert.IsType<SweepItem>(SequenceReader.Parse(text, "p.yaml").Items[0]);
        Assert.Equal(0.9, sweep.Currents[^1].Value, 12);
        Assert.Equal(TimeSpan.FromMilliseconds(250), sweep.Settings.Settling.Dwell);
    }

    [Fact]
    public void UnknownParameter_IsAnError_AtItsUse()
    {
        const string text = "sequence: x\nparameters:\n  top: 90 %\nsteps:\n  - sweep: { range: a, currents: [$tpo] }\n";
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Parse(text, "p.yaml"));
        Assert.Equal((5, 35), (ex.Line, ex.Column));
        Assert.Contains("the parameters are top", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void ParameterWithTheWrongUnit_IsReportedWhereItIsUsed()
    {
        const string text = "sequence: x\nparameters:\n  wait: 5 A\nsteps:\n  - sweep: { range: a, currents: [1 mA], dwell: $wait }\n";
        var ex = Assert.Throws<DocumentException>(() => SequenceReader.Parse(text, "p.yaml"));
        Assert.Equal(5, ex.Line);
        Assert.Contains("seconds", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void RandomText_NeverCrashesTheReader() =>
        Gen.String.Sample(text => Parse(text), iter: 2000);

    [Fact]
    public void MutatedGoodSequence_NeverCrashesTheReader() =>
        Gen.Select(Gen.Int[0, Good.Length - 1], Gen.Int[0, Good.Length - 1], Gen.Char["{}[]:,-#&*!|>'\"% \n\t0aZ"])
            .Sample((at, cut, c) =>
            {
                var mutated = Good[..at] + c + Good[Math.Min(Good.Length, Math.Max(at, cut))..];
                Parse(mutated);
            }, iter: 3000);

    private static void Parse(string text)
    {
        try
        {
            SequenceReader.Parse(text, "fuzz.yaml");
        }
        catch (DocumentException)
        {
            // The only failure the reader may report.
        }
    }
}

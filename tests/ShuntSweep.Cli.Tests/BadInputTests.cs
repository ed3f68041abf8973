using System.Text;
using System.Text.RegularExpressions;
using CsCheck;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>No input reaches a stack trace: bad files, directories and archives end in a clean exit code with a message.</summary>
public sealed partial class BadInputTests
{
    /// <summary>Cases per shipped file; nine files make 1 350 cases, a few seconds in all.</summary>
    private const int CasesPerFile = 150;

    private static readonly string[] WeirdNumbers = ["0", "-1", "-0.5", "1e9", "1e308", "1e-300", "NaN", ".inf", "-.inf", "-273.16", "999999999999", "2147483648", "-2147483649", "1e-9", "7000000", "00", "0x10"];

    private static readonly string[] Units = ["mA", "A", "uA", "µA", "V", "mV", "ohm", "mohm", "Ω", "s", "ms", "min", "h", "Hz", "kHz", "GHz", "%", "ppm", "°C", "K", "W", "", "furlong"];

    private static readonly string[] Junk = [":", "- ", "[", "]", "{", "}", ",", "&x ", "*x", "*nothere", "!!binary ", "!!int ", "\t", "---\n", "...\n", "'", "\"", "%TAG ! tag:x,1:\n", "? ", "|\n", ">-\n", "µ", "\u0000", "\u202e", "key: value\n", "$points", "$$", "$nope", "#", "<<: *x\n", "\r", "\ufeff"];

    public static TheoryData<string> Directories() => ["plan", "fit"];

    [Theory]
    [MemberData(nameof(Directories))]
    public async Task Directory_GivenAsAFile_IsInvalidInput(string command)
    {
        Assert.Equal(2, await Cli.RunStrictAsync(command, Some.TempDirectory()));
    }

    [Fact]
    public async Task BenchDirectory_IsInvalidInput()
    {
        Assert.Equal(2, await Cli.RunStrictAsync("plan", Repo.File("sequences/ci-smoke.yaml"), "--bench", Some.TempDirectory()));
    }

    [Fact]
    public async Task SimServe_OfADirectory_OrAnImpossibleSimulationValue_IsInvalidInput_BeforeItListens()
    {
        Assert.Equal(2, await Cli.RunStrictAsync("sim", "serve", Some.TempDirectory(), "--port", "0"));
        var bench = Some.TempFile(File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml")).Replace("lineFrequency: 50 Hz", "lineFrequency: 0 Hz", StringComparison.Ordinal));
        Assert.Equal(2, await Cli.RunStrictAsync("sim", "serve", bench, "--port", "0"));
    }

    [Fact]
    public async Task History_OfAFileThatIsNotADatabase_IsInvalidInput()
    {
        var notADatabase = Some.TempFile("these are not the tables you are looking for\n", ".db");
        Assert.Equal(2, await Cli.RunStrictAsync("history", "TW18-240417", "--archive", notADatabase));
    }

    [Fact]
    public async Task History_OfAnArchiveThatDoesNotExist_IsInvalidInput_AndCreatesNothing()
    {
        var missing = Path.Combine(Some.TempDirectory(), "none.db");
        Assert.Equal(2, await Cli.RunStrictAsync("history", "TW18-240417", "--archive", missing));
        Assert.False(File.Exists(missing));
    }

    [Fact]
    public async Task Plan_OfAHoldWhoseSampleCountOverflows_IsInvalidInput()
    {
        var sequence = Some.TempFile("sequence: x\nsteps:\n  - hold: { range: 10A, current: 1 A, duration: 1000000000 s, rate: 1 GHz }\n");
        Assert.Equal(2, await Cli.RunStrictAsync("plan", sequence));
    }

    [Fact]
    public async Task Plan_OfAnImpossibleSimulationValue_IsInvalidInput()
    {
        var bench = Some.TempFile(File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml")).Replace("ambient: 23 °C", "ambient: -300 °C", StringComparison.Ordinal));
        Assert.Equal(2, await Cli.RunStrictAsync("plan", Repo.File("sequences/ci-smoke.yaml"), "--bench", bench));
    }

    /// <summary>Every shipped sequence and simulated bench, mutated at random (numbers, units, lines, junk characters, bad bytes, truncation),
    /// is planned through the command line: each case ends in exit 0 (the file still made sense), 2 (invalid input) or 3 (unsafe plan),
    /// never in an exception.</summary>
    [Fact]
    public async Task MutatedShippedFiles_EndInACleanExitCode_NeverAnException()
    {
        var files = Repo.Files("sequences", "*.yaml").Select(f => (File: f, IsBench: false))
            .Concat(Repo.Files("simulators", "*.yaml").Select(f => (File: f, IsBench: true)))
            .ToList();
        var dir = Some.TempDirectory();
        var exits = new Dictionary<int, int>();
        var cases = 0;
        foreach (var (file, isBench) in files)
        {
            var original = File.ReadAllBytes(file);
            var partner = isBench ? SequenceFor(file) : BenchFor(file);
            var mutation = Gen.Select(Gen.Int[0, 8], Gen.Int[0, int.MaxValue], Gen.Int[0, int.MaxValue]).Array[1, 3];
            await mutation.SampleAsync(
                async steps =>
                {
                    var bytes = steps.Aggregate(original, (text, s) => Mutate(text, s.Item1, s.Item2, s.Item3));
                    var mutated = Path.Combine(dir, Path.GetFileName(file));
                    await File.WriteAllBytesAsync(mutated, bytes, TestContext.Current.CancellationToken);
                    var exit = isBench
                        ? await Cli.RunStrictAsync("plan", partner, "--bench", mutated)
                        : await Cli.RunStrictAsync("plan", mutated, "--bench", partner);
                    Assert.True(exit is 0 or 2 or 3, $"{Path.GetFileName(file)} mutated by {string.Join(", ", steps)} ended with exit {exit}");
                    lock (exits)
                    {
                        exits[exit] = exits.GetValueOrDefault(exit) + 1;
                        cases++;
                    }
                },
                iter: CasesPerFile,
                threads: 1);
        }

        TestContext.Current.TestOutputHelper?.WriteLine($"{cases} mutated files planned: {string.Join(", ", exits.OrderBy(e => e.Key).Select(e => $"exit {e.Key}: {e.Value}"))}");
        Assert.Equal(files.Count * CasesPerFile, cases);

        // Most mutations break something: the test would prove little if nearly all of them still planned cleanly.
        Assert.True(exits.GetValueOrDefault(2) > cases / 3, $"only {exits.GetValueOrDefault(2)} of {cases} cases were refused as invalid input");
    }

    private static byte[] Mutate(byte[] bytes, int kind, int a, int b)
    {
        if (kind == 6)
        {
            // A byte that is never UTF-8.
            var at = bytes.Length == 0 ? 0 : a % bytes.Length;
            return [.. bytes[..at], 0xFF, .. bytes[at..]];
        }

        if (kind == 7)
        {
            return bytes[..(bytes.Length == 0 ? 0 : a % bytes.Length)];
        }

        var text = Encoding.UTF8.GetString(bytes);
        var lines = text.Split('\n').ToList();
        switch (kind)
        {
            case 0:
                return Replace(text, Number(), a, WeirdNumbers[b % WeirdNumbers.Length]);
            case 1:
                return Replace(text, Unit(), a, Units[b % Units.Length]);
            case 2:
                lines.RemoveAt(a % lines.Count);
                break;
            case 3:
                lines.Insert(a % lines.Count, lines[b % lines.Count]);
                break;
            case 4:
                var at = text.Length == 0 ? 0 : a % text.Length;
                return Encoding.UTF8.GetBytes(text[..at] + Junk[b % Junk.Length] + text[at..]);
            default:
                var i = a % lines.Count;
                lines[i] = b % 2 == 0 ? "  " + lines[i] : lines[i].TrimStart();
                break;
        }

        return Encoding.UTF8.GetBytes(string.Join('\n', lines));
    }

    private static byte[] Replace(string text, Regex pattern, int which, string replacement)
    {
        var matches = pattern.Matches(text);
        if (matches.Count == 0)
        {
            return Encoding.UTF8.GetBytes(text);
        }

        var m = matches[which % matches.Count];
        return Encoding.UTF8.GetBytes(text[..m.Index] + replacement + text[(m.Index + m.Length)..]);
    }

    private static string BenchFor(string sequence)
    {
        var line = File.ReadLines(sequence).FirstOrDefault(l => l.StartsWith("# bench:", StringComparison.Ordinal));
        return Repo.File(line is null ? "simulators/handheld-tarnwell-tw18.yaml" : line["# bench:".Length..].Trim());
    }

    private static string SequenceFor(string bench) =>
        Repo.Files("sequences", "*.yaml").FirstOrDefault(s => Path.GetFileName(BenchFor(s)) == Path.GetFileName(bench)) ?? Repo.File("sequences/ci-smoke.yaml");

    [GeneratedRegex(@"-?\d+(\.\d+)?")]
    private static partial Regex Number();

    [GeneratedRegex(@"(?<=\d )(mA|A|uA|µA|V|mV|ohm|mohm|s|ms|Hz|%|ppm|°C|W)\b")]
    private static partial Regex Unit();
}

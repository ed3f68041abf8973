using System.Text;
using System.Text.RegularExpressions;
using CsCheck;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>No input reaches a stack trace: bad files, directories and archives end in a clean exit code with a message.</summary>
public sealed partial class BadInputTests
{
    /// <summary>Cases per shipped file (sequences, simulated benches and profiles, about 20 files).</summary>
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

    /// <summary>Every shipped sequence, simulated bench and instrument profile, mutated at random (numbers, units, lines, junk characters,
    /// bad bytes, truncation), is read through the command line (sequences and benches planned against their partner, profiles checked):
    /// each case ends in exit 0 (the file still made sense), 2 (invalid input) or 3 (unsafe plan), never in an exception, and every
    /// refusal as invalid input names a file it read, so that a crash mapped to exit 2 cannot pass for a clean refusal.</summary>
    [Fact]
    public async Task MutatedShippedFiles_EndInACleanExitCode_NamingTheFile_NeverAnException()
    {
        var files = Repo.Files("sequences", "*.yaml").Select(f => (File: f, Kind: "sequences"))
            .Append((File: Repo.File("bench/full-characterisation.yaml"), Kind: "sequences"))
            .Concat(Repo.Files("simulators", "*.yaml").Select(f => (File: f, Kind: "simulators")))
            .Concat(Repo.Files("profiles", "*.yaml").Select(f => (File: f, Kind: "profiles")))
            .ToList();

        // A copy of the repository's layout, so that a mutated bench still finds its profiles by their relative paths.
        var root = Some.TempDirectory();
        foreach (var kind in new[] { "sequences", "simulators", "profiles" })
        {
            Directory.CreateDirectory(Path.Combine(root, kind));
        }

        foreach (var profile in Repo.Files("profiles", "*.yaml"))
        {
            File.Copy(profile, Path.Combine(root, "profiles", Path.GetFileName(profile)));
        }

        var exits = new Dictionary<int, int>();
        var cases = 0;
        var positioned = 0;
        foreach (var (file, kind) in files)
        {
            var original = File.ReadAllBytes(file);
            var mutated = Path.Combine(root, kind, "mutated-" + Path.GetFileName(file));
            var args = kind switch
            {
                "sequences" => new[] { "plan", mutated, "--bench", BenchFor(file) },
                "simulators" => ["plan", SequenceFor(file), "--bench", mutated],
                _ => ["check-profile", mutated],
            };
            var mutation = Gen.Select(Gen.Int[0, 8], Gen.Int[0, int.MaxValue], Gen.Int[0, int.MaxValue]).Array[1, 3];
            await mutation.SampleAsync(
                async steps =>
                {
                    var bytes = steps.Aggregate(original, (text, s) => Mutate(text, s.Item1, s.Item2, s.Item3));
                    await File.WriteAllBytesAsync(mutated, bytes, TestContext.Current.CancellationToken);
                    var (exit, err) = await Cli.RunStrictCapturingErrorAsync(args);
                    var what = $"{Path.GetFileName(file)} mutated by {string.Join(", ", steps)}";
                    Assert.True(exit is 0 or 2 or 3, $"{what} ended with exit {exit}: {err}");
                    if (exit == 2)
                    {
                        Assert.True(args.Skip(1).Any(a => err.Contains(Path.GetFileName(a), StringComparison.Ordinal)), $"{what} was refused without naming a file: {err}");
                        if (FilePosition().IsMatch(err))
                        {
                            Interlocked.Increment(ref positioned);
                        }
                    }

                    lock (exits)
                    {
                        exits[exit] = exits.GetValueOrDefault(exit) + 1;
                        cases++;
                    }
                },
                iter: CasesPerFile,
                threads: 1);
        }

        var refused = exits.GetValueOrDefault(2);
        TestContext.Current.TestOutputHelper?.WriteLine(
            $"{files.Count} files, {cases} mutated cases: {string.Join(", ", exits.OrderBy(e => e.Key).Select(e => $"exit {e.Key}: {e.Value}"))}; {positioned} of {refused} refusals give line:column");
        Assert.Equal(files.Count * CasesPerFile, cases);

        // Most mutations break something: the test would prove little if nearly all of them still planned cleanly.
        Assert.True(refused > cases / 3, $"only {refused} of {cases} cases were refused as invalid input");

        // A refusal without a position is for a file that cannot be read as text at all (not UTF-8, empty); most give line and column.
        Assert.True(positioned > refused * 3 / 4, $"only {positioned} of {refused} refusals gave a line and column");
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

    /// <summary>The bench a shipped sequence names in its <c>bench:</c> key, else the handheld TW-18 bench.</summary>
    private static string BenchFor(string sequence)
    {
        var line = File.ReadLines(sequence).FirstOrDefault(l => l.StartsWith("bench:", StringComparison.Ordinal));
        var relative = line?["bench:".Length..].Split('#')[0].Trim();
        return relative is null ? Repo.File("simulators/handheld-tarnwell-tw18.yaml") : Path.GetFullPath(Path.Combine(Path.GetDirectoryName(sequence)!, relative));
    }

    /// <summary>A shipped sequence written for <paramref name="bench"/>, else the CI smoke sequence.</summary>
    private static string SequenceFor(string bench) =>
        Repo.Files("sequences", "*.yaml").FirstOrDefault(s => Path.GetFileName(BenchFor(s)) == Path.GetFileName(bench)) ?? Repo.File("sequences/ci-smoke.yaml");

    [GeneratedRegex(@"\.yaml:\d+:\d+:")]
    private static partial Regex FilePosition();

    [GeneratedRegex(@"-?\d+(\.\d+)?")]
    private static partial Regex Number();

    [GeneratedRegex(@"(?<=\d )(mA|A|uA|µA|V|mV|ohm|mohm|s|ms|Hz|%|ppm|°C|W)\b")]
    private static partial Regex Unit();
}

using ShuntSweep.Testing;
using ShuntSweep.Core.Bench;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Sequences;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>Every file shipped in sequences/ and simulators/ loads, and every sequence plans safely on the bench it is written for.</summary>
public sealed class SampleFileTests
{
    public static TheoryData<string> Benches() => new(Repo.Files("simulators", "*.yaml").Select(Path.GetFileName)!);

    /// <summary>Every shipped sequence, the engine's benchmark sequence included, by its path in the repository.</summary>
    public static TheoryData<string> Sequences() =>
        new(Repo.Files("sequences", "*.yaml").Select(f => "sequences/" + Path.GetFileName(f)).Append("bench/full-characterisation.yaml"));

    [Theory]
    [MemberData(nameof(Benches))]
    public void EverySimulatedBench_Loads(string file)
    {
        var bench = BenchReader.Load(Repo.File(Path.Combine("simulators", file)));
        Assert.True(bench.IsSimulated);
        Assert.NotEmpty(bench.Uut.Ranges);
    }

    [Theory]
    [MemberData(nameof(Sequences))]
    public async Task EverySequence_PlansSafely_AndRunsWithNoBenchGiven_OnTheBenchItNames(string file)
    {
        var path = Repo.File(file);
        var sequence = SequenceReader.Load(path);
        Assert.NotNull(sequence.Bench);
        var plan = Planner.Plan(sequence, BenchReader.Load(sequence.Bench));
        Assert.True(plan.IsSafe, string.Join("; ", plan.Violations.Select(v => v.Message)));
        var dir = Testing.Some.TempDirectory();
        Assert.Equal(ExpectedExit(path), await Cli.RunAsync("run", path, "--out", dir, "--no-archive"));
        Assert.True(File.Exists(Path.Combine(dir, "result.json")));
    }

    /// <summary>A fault demo states the exit code it must end with in a comment line <c># expect-exit: N</c>; 0 otherwise.</summary>
    private static int ExpectedExit(string sequence)
    {
        var line = File.ReadLines(sequence).FirstOrDefault(l => l.StartsWith("# expect-exit:", StringComparison.Ordinal));
        return line is null ? 0 : int.Parse(line["# expect-exit:".Length..].Trim(), System.Globalization.CultureInfo.InvariantCulture);
    }

    [Fact]
    public void ReadmeSequenceExample_PlansSafelyOnTheDefaultBench()
    {
        var readme = File.ReadAllText(Repo.File("README.md"));
        var start = readme.IndexOf("```yaml\nsequence:", StringComparison.Ordinal) + "```yaml\n".Length;
        var example = readme[start..readme.IndexOf("```", start, StringComparison.Ordinal)];
        var plan = Planner.Plan(SequenceReader.Parse(example, "README.md"), BenchReader.Load(Repo.File("simulators/handheld-tarnwell-tw18.yaml")));
        Assert.True(plan.IsSafe, string.Join("; ", plan.Violations.Select(v => v.Message)));
    }
}

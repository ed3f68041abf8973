using System.Diagnostics;
using System.Globalization;
using System.Text.RegularExpressions;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests.Served;

/// <summary>The tool against the simulated bench served over TCP in another process, driven through a bench file of socket resources, as a real bench is:
/// hung and vanished instruments, signals, a killed server, prompts, and resume.</summary>
public sealed partial class ServedBenchTests
{
    private const string Sequence = """
        sequence: Served-bench check — TW-18 60mA range
        defaults: { dwell: 50 ms, samples: 2, nplc: 1, read: [drop, reference] }
        limits: { maxDrop: 1.5 V }
        steps:
          - sweep: { range: 60mA, currents: { linear: { from: 10 %, to: 100 %, points: 12 } } }
        """;

    private static readonly TimeSpan Limit = TimeSpan.FromSeconds(90);

    private static string Tw18(params string[] faults)
    {
        var text = File.ReadAllText(Repo.File("simulators/handheld-tarnwell-tw18.yaml")).TrimEnd() + "\n";
        return faults.Length == 0 ? text : text + "  faults:\n" + string.Concat(faults.Select(f => $"    - {f}\n"));
    }

    private static async Task<(string Sequence, string Answers, string Out)> FilesAsync(ServedBench bench, string sequence = Sequence)
    {
        var ct = TestContext.Current.CancellationToken;
        var seq = Path.Combine(bench.Directory, "sequence.yaml");
        var answers = Path.Combine(bench.Directory, "answers.yaml");
        await File.WriteAllTextAsync(seq, sequence, ct);
        await File.WriteAllTextAsync(answers, "otherwise: done\n", ct);
        return (seq, answers, Path.Combine(bench.Directory, "run"));
    }

    private static ToolProcess Run(ServedBench bench, (string Sequence, string Answers, string Out) files, params string[] more) =>
        ToolProcess.Start(["run", files.Sequence, "--bench", bench.BenchFile, "--out", files.Out, "--answers", files.Answers, "--yes", .. more]);

    private static int StepsDone(string runDirectory) =>
        ReadWhileWritten(Path.Combine(runDirectory, "events.jsonl")).Split('\n').Count(l => l.Contains("\"step-done\"", StringComparison.Ordinal));

    /// <summary>Data rows of the run's journal so far (its header left out).</summary>
    private static int SamplesJournaled(string runDirectory) =>
        Math.Max(0, ReadWhileWritten(Path.Combine(runDirectory, "journal.csv")).Split('\n').Count(l => l.Length > 0) - 1);

    /// <summary>What a file the running tool is still writing holds so far; empty while it does not exist yet.</summary>
    private static string ReadWhileWritten(string path)
    {
        try
        {
            using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite);
            using var reader = new StreamReader(stream);
            return reader.ReadToEnd();
        }
        catch (IOException)
        {
            return string.Empty;
        }
    }

    private static Task WaitForStepsAsync(string runDirectory, int steps, ToolProcess process) =>
        process.WaitUntilAsync(() => StepsDone(runDirectory) >= steps, $"{steps} steps done", Limit);

    private static string Events(string runDirectory) => File.ReadAllText(Path.Combine(runDirectory, "events.jsonl"));

    [Theory]
    [InlineData("hang")]
    [InlineData("unplug")]
    public async Task LoadThatHangsOrVanishes_TheSupplyIsSwitchedOffAnyway_AndTheRunEndsAsAnInstrumentFailure(string fault)
    {
        await using var bench = await ServedBench.StartAsync(Tw18($"{{ kind: {fault}, instrument: load, afterCommands: 30 }}"));
        var files = await FilesAsync(bench);
        using var run = Run(bench, files);
        Assert.Equal(5, await run.WaitAsync(Limit));
        Assert.Equal("0", await bench.AskAsync("supply", "OUTP?"));
        Assert.Null(await bench.AskAsync("load", "INP?")); // still hung or gone: it answers nobody
        Assert.Contains("the load (TCPIP::", run.Output, StringComparison.Ordinal);
        Assert.Contains("did not confirm", run.Output, StringComparison.Ordinal);
        Assert.DoesNotContain("[red", run.Output, StringComparison.Ordinal);
        Assert.DoesNotContain("supply (TCPIP::", run.Output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task HungSupply_TheLoadIsSwitchedOffAnyway_AndTheRunEndsAsAnInstrumentFailure()
    {
        await using var bench = await ServedBench.StartAsync(Tw18("{ kind: hang, instrument: supply, afterCommands: 22 }"));
        var files = await FilesAsync(bench);
        using var run = Run(bench, files);
        Assert.Equal(5, await run.WaitAsync(Limit));
        Assert.Equal("0", await bench.AskAsync("load", "INP?"));
        Assert.Contains("the supply (TCPIP::", run.Output, StringComparison.Ordinal);
        Assert.Contains("did not confirm", run.Output, StringComparison.Ordinal);
        Assert.DoesNotContain("[red", run.Output, StringComparison.Ordinal);
        Assert.DoesNotContain("the load (TCPIP::", run.Output, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("INT")]
    [InlineData("TERM")]
    public async Task Signal_AfterTheFirstPoint_Ends130_WithOutputsOff_AndAReportMarkedIncomplete(string signal)
    {
        await using var bench = await ServedBench.StartAsync(Tw18());
        var files = await FilesAsync(bench);
        using var run = Run(bench, files);
        await WaitForStepsAsync(files.Out, 4, run);
        run.Signal(signal);
        Assert.Equal(130, await run.WaitAsync(Limit));
        Assert.Equal("0", await bench.AskAsync("supply", "OUTP?"));
        Assert.Equal("0", await bench.AskAsync("load", "INP?"));
        Assert.Contains("Outputs confirmed off.", run.Output, StringComparison.Ordinal);
        var report = await File.ReadAllTextAsync(Path.Combine(files.Out, "report.html"), TestContext.Current.CancellationToken);
        Assert.Contains("Incomplete run (interrupted)", report, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Interrupt_AfterOneSample_Ends130_WithOutputsOff_AndAReportOfWhatWasMeasuredMarkedIncomplete()
    {
        // A second of dwell per point: the interrupt lands long before the range has the three points a fit needs.
        const string slow = """
            sequence: Served-bench check — TW-18 60mA range, slow points
            defaults: { dwell: 1 s, samples: 2, nplc: 1, read: [drop, reference] }
            limits: { maxDrop: 1.5 V }
            steps:
              - sweep: { range: 60mA, currents: { linear: { from: 10 %, to: 100 %, points: 12 } } }
            """;
        await using var bench = await ServedBench.StartAsync(Tw18());
        var files = await FilesAsync(bench, slow);
        using var run = Run(bench, files);
        await run.WaitUntilAsync(() => SamplesJournaled(files.Out) >= 1, "a sample journaled", Limit);

        run.Signal("INT");
        Assert.Equal(130, await run.WaitAsync(Limit));
        Assert.Equal("0", await bench.AskAsync("supply", "OUTP?"));
        Assert.Equal("0", await bench.AskAsync("load", "INP?"));
        Assert.InRange(SamplesJournaled(files.Out), 1, 5);
        var report = await File.ReadAllTextAsync(Path.Combine(files.Out, "report.html"), TestContext.Current.CancellationToken);
        Assert.Contains("Incomplete run (interrupted)", report, StringComparison.Ordinal);
        Assert.Contains("Analysis incomplete", report, StringComparison.Ordinal);
        var result = Analysis.ResultJson.Read(Path.Combine(files.Out, "result.json"));
        Assert.Equal("Interrupted", result.RunEnd);
        Assert.Empty(result.Ranges);
    }

    [Fact]
    public async Task ServingOnEveryInterface_WithAllowRemote_WarnsThatAnyoneCanDriveIt_AndPrintsUsableResourceStrings()
    {
        var simulated = Some.TempFile(Tw18());
        using var serve = ToolProcess.Start("sim", "serve", simulated, "--host", "0.0.0.0", "--allow-remote", "--port", "0");
        await serve.WaitUntilAsync(() => serve.Output.Contains("Ctrl-C", StringComparison.Ordinal), "sim serve listening", Limit);

        var output = serve.Output;
        Assert.Contains("anyone who can reach these ports over the network can drive this simulated bench", output, StringComparison.Ordinal);
        Assert.DoesNotContain("TCPIP::0.0.0.0::", output, StringComparison.Ordinal);
        Assert.Contains("TCPIP::127.0.0.1::", output, StringComparison.Ordinal);
        serve.Signal("INT");
        await serve.WaitAsync(Limit);
    }

    [Fact]
    public async Task ServingOnEveryInterface_WithoutAllowRemote_IsRefused()
    {
        using var serve = ToolProcess.Start("sim", "serve", Some.TempFile(Tw18()), "--host", "0.0.0.0", "--port", "0");
        Assert.Equal(2, await serve.WaitAsync(Limit));
        Assert.Contains("--allow-remote", serve.Output, StringComparison.Ordinal);
    }

    [Fact]
    public async Task ServerKilled_EndsAsAnInstrumentFailure_NamingEveryOutputNotConfirmedOff()
    {
        await using var bench = await ServedBench.StartAsync(Tw18());
        var files = await FilesAsync(bench);
        using var run = Run(bench, files);
        await WaitForStepsAsync(files.Out, 4, run);
        bench.Kill();
        Assert.Equal(5, await run.WaitAsync(Limit));
        Assert.Contains("the load (TCPIP::", run.Output, StringComparison.Ordinal);
        Assert.Contains("the supply (TCPIP::", run.Output, StringComparison.Ordinal);
        Assert.Contains("\"outputsConfirmedOff\":false", Events(files.Out), StringComparison.Ordinal);
    }

    [Fact]
    public async Task NoTerminalAndNoAnswers_IsRefusedBeforeAnythingIsSwitched()
    {
        await using var bench = await ServedBench.StartAsync(Tw18());
        var files = await FilesAsync(bench);
        using var run = ToolProcess.Start("run", files.Sequence, "--bench", bench.BenchFile, "--out", files.Out);
        Assert.Equal(2, await run.WaitAsync(Limit));
        Assert.Contains("--answers", run.Output, StringComparison.Ordinal);
        Assert.False(File.Exists(Path.Combine(files.Out, "events.jsonl")));
        Assert.Equal("0", await bench.AskAsync("supply", "OUTP?"));
    }

    [Fact]
    public async Task Prompts_AtAPseudoTerminal_AreAnswered_AndTheRunCompletes()
    {
        await using var bench = await ServedBench.StartAsync(Tw18());
        var files = await FilesAsync(bench);
        // script(1) gives the tool a pseudo-terminal; what the test writes to its standard input is what the operator types.
        var command = $"dotnet {ServedBench.Tool} run {files.Sequence} --bench {bench.BenchFile} --out {files.Out} --archive {Path.Combine(bench.Directory, "a.db")}";
        var start = new ProcessStartInfo("script", ["-qfec", command, "/dev/null"])
        {
            RedirectStandardInput = true,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
        };
        start.Environment["TERM"] = "xterm";
        using var script = Process.Start(start)!;
        var output = new System.Text.StringBuilder();
        var reading = Task.Run(async () =>
        {
            var buffer = new char[1024];
            int n;
            while ((n = await script.StandardOutput.ReadAsync(buffer, TestContext.Current.CancellationToken)) > 0)
            {
                lock (output)
                {
                    output.Append(buffer, 0, n);
                }
            }
        }, TestContext.Current.CancellationToken);
        _ = script.StandardError.ReadToEndAsync(TestContext.Current.CancellationToken);

        string Seen()
        {
            lock (output)
            {
                return output.ToString();
            }
        }

        async Task AnswerAsync(string question, int occurrence)
        {
            var waited = Stopwatch.StartNew();
            while (CountOf(Seen(), question) < occurrence)
            {
                Assert.True(waited.Elapsed < Limit, $"no '{question}' (#{occurrence}) on the terminal. Screen:\n{Seen()}");
                await Task.Delay(20, TestContext.Current.CancellationToken);
            }

            await script.StandardInput.WriteAsync("y\r".AsMemory(), TestContext.Current.CancellationToken);
            await script.StandardInput.FlushAsync(TestContext.Current.CancellationToken);
        }

        await AnswerAsync("operator (wire-mA)", 1);
        await AnswerAsync("operator (outputs-on)", 1);
        await script.WaitForExitAsync(TestContext.Current.CancellationToken).WaitAsync(Limit, TestContext.Current.CancellationToken);
        await reading;
        Assert.True(script.ExitCode == 0, $"exit {script.ExitCode}. Screen:\n{Seen()}");
        var events = Events(files.Out);
        Assert.Contains("\"id\":\"wire-mA\",\"answer\":\"done\",\"by\":\"operator at the terminal\"", events, StringComparison.Ordinal);
        Assert.Contains("\"id\":\"outputs-on\",\"answer\":\"done\",\"by\":\"operator at the terminal\"", events, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Resume_OnARealBench_ReusesTheAnswers_ReasksTheWiring_AndRecordsTheDowntime()
    {
        await using var bench = await ServedBench.StartAsync(Tw18());
        var files = await FilesAsync(bench);
        using (var first = Run(bench, files))
        {
            await WaitForStepsAsync(files.Out, 4, first);
            first.Signal("INT");
            Assert.Equal(130, await first.WaitAsync(Limit));
        }

        // The bench stands idle for two seconds: the resumed journal must show them as a gap in its elapsed time.
        await Task.Delay(TimeSpan.FromSeconds(2), TestContext.Current.CancellationToken);
        using var resumed = ToolProcess.Start("run", "--resume", files.Out);
        Assert.Equal(0, await resumed.WaitAsync(Limit));
        var events = Events(files.Out);
        Assert.Contains("\"event\":\"run-resume\"", events, StringComparison.Ordinal);
        var downtime = double.Parse(DowntimeField().Match(events).Groups[1].Value, CultureInfo.InvariantCulture);
        Assert.InRange(downtime, 2, 60);
        var elapsed = File.ReadLines(Path.Combine(files.Out, "journal.csv")).Skip(1)
            .Select(l => double.Parse(l.Split(',')[10], CultureInfo.InvariantCulture)).ToList();
        var largestGap = elapsed.Zip(elapsed.Skip(1), (a, b) => b - a).Max();
        Assert.True(largestGap >= downtime, $"the journal's largest gap is {largestGap} s, the recorded downtime {downtime} s");
        Assert.Contains("\"id\":\"wire-mA\",\"text\":", events[events.IndexOf("run-resume", StringComparison.Ordinal)..], StringComparison.Ordinal);
        Assert.Contains("\"resumed\":true", events, StringComparison.Ordinal);

        using var again = ToolProcess.Start("run", "--resume", files.Out);
        Assert.Equal(2, await again.WaitAsync(Limit));
        Assert.Contains("completed; there is nothing to resume", again.Output, StringComparison.Ordinal);
        Assert.Equal("0", await bench.AskAsync("supply", "OUTP?"));
    }

    [Fact]
    public async Task StalledFetch_IsArmedAgain_AndTheRunCompletes()
    {
        await using var bench = await ServedBench.StartAsync(Tw18("{ kind: lateReply, instrument: dmm, afterCommands: 30, delay: 8 s }"));
        var files = await FilesAsync(bench);
        using var run = Run(bench, files);
        Assert.Equal(0, await run.WaitAsync(Limit));
        Assert.Contains("\"event\":\"re-armed\"", Events(files.Out), StringComparison.Ordinal);

        // --yes answered the confirmation before the outputs first turned on, and the journal says so.
        Assert.Contains("\"id\":\"outputs-on\",\"answer\":\"done\",\"by\":\"--yes\"", Events(files.Out), StringComparison.Ordinal);
    }

    [Fact]
    public async Task SecondWriter_IsRefusedAtOnce_NamingTheHoldersProcess()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Repo.File("sequences/ci-smoke.yaml"), "--bench", Repo.File("simulators/handheld-tarnwell-tw18.yaml"), "--out", dir));
        var events = Events(dir);
        using (Engine.Journal.RunDirectoryLock.Acquire(dir))
        {
            using var second = ToolProcess.Start("run", "--resume", dir);
            Assert.Equal(2, await second.WaitAsync(Limit));
            Assert.Contains($"process id {Environment.ProcessId}", second.Output, StringComparison.Ordinal);
        }

        Assert.Equal(events, Events(dir));
    }

    private static int CountOf(string text, string part)
    {
        var count = 0;
        for (var i = text.IndexOf(part, StringComparison.Ordinal); i >= 0; i = text.IndexOf(part, i + part.Length, StringComparison.Ordinal))
        {
            count++;
        }

        return count;
    }

    [GeneratedRegex(@"""downtimeS"":([0-9.eE+-]+)")]
    private static partial Regex DowntimeField();
}

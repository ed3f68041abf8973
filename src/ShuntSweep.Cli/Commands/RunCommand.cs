using System.CommandLine;
using System.Globalization;
using Serilog;
using Serilog.Formatting.Compact;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Reporting;
using ShuntSweep.Reporting.Archive;
using ShuntSweep.Reporting.Comparison;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep run</c>: plan, run on the bench, journal, analyse and report.</summary>
internal static class RunCommand
{
    public static Command Create()
    {
        var sequenceArg = new Argument<string?>("sequence") { Description = "The sequence file to run (not needed with --resume).", Arity = ArgumentArity.ZeroOrOne };
        var benchOpt = new Option<string?>("--bench") { Description = $"The bench file (default: the sequence's bench: key, else the bundled simulated bench {BenchHost.DefaultBench})." };
        var outOpt = new Option<string?>("--out") { Description = "The run directory (default: runs/<UTC timestamp>)." };
        var seedOpt = new Option<int>("--seed") { Description = "The seed of the simulated bench.", DefaultValueFactory = _ => 1 };
        var answersOpt = new Option<string?>("--answers") { Description = "Answers to operator prompts for unattended runs (prompt id: done|abort, otherwise: done|abort)." };
        var resumeOpt = new Option<string?>("--resume") { Description = "Continue the interrupted run in this directory after its last completed step." };
        var archiveOpt = new Option<string?>("--archive") { Description = $"Where the run is archived: an SQLite file, or a PostgreSQL connection string (default: ${ArchiveLocation.EnvironmentVariable}, else {ArchiveLocation.DefaultSqlitePath})." };
        var noArchiveOpt = new Option<bool>("--no-archive") { Description = "Do not record the run in the archive." };
        var jsonOpt = new Option<string?>("--json") { Description = "Also write a JSON summary of the run to this file; '-' writes it to standard output instead of the tables." };
        var junitOpt = new Option<string?>("--junit") { Description = "Also write the run's checks (completed, outputs off, each range's conformity) as JUnit XML to this file." };
        var reproducibleOpt = new Option<bool>("--reproducible")
        {
            Description = "Date the report, summary and JUnit file by the run's own start and leave folders out of them, so that the same run diffs clean in CI.",
        };
        var command = new Command("run", "Run a sequence on a bench, journal every sample, then fit and report.")
        {
            sequenceArg, benchOpt, outOpt, seedOpt, answersOpt, resumeOpt, archiveOpt, noArchiveOpt, jsonOpt, junitOpt, reproducibleOpt,
        };
        command.SetAction((parse, ct) => Terminal.GuardAsync(() => ExecuteAsync(
            parse.GetValue(sequenceArg), parse.GetValue(benchOpt), parse.GetValue(outOpt), parse.GetValue(seedOpt), parse.GetValue(answersOpt), parse.GetValue(resumeOpt), parse.GetValue(archiveOpt),
            new RunOutputOptions(parse.GetValue(noArchiveOpt), parse.GetValue(jsonOpt), parse.GetValue(junitOpt), parse.GetValue(reproducibleOpt)), ct)));
        return command;
    }

    private static async Task<int> ExecuteAsync(string? sequencePath, string? benchPath, string? outDir, int seed, string? answers, string? resume, string? archive, RunOutputOptions outputs, CancellationToken ct)
    {
        if (outputs.Json == "-")
        {
            // Standard output carries the JSON alone; errors and cautions still go to standard error.
            Terminal.Configure(quiet: true);
        }

        RunManifest? previous = null;
        if (resume is not null)
        {
            if (!File.Exists(Path.Combine(resume, RunManifest.FileName)))
            {
                return Terminal.Fail($"{resume} holds no run to resume (no {RunManifest.FileName}).", ExitCodes.InvalidInput);
            }

            previous = RunManifest.Read(resume);
            sequencePath ??= previous.SequenceFile;
            benchPath ??= previous.BenchFile;
            seed = previous.Seed;
            outDir = resume;
            if (RunManifest.HashFile(sequencePath) != previous.SequenceSha256 || RunManifest.HashFile(BenchHost.Locate(benchPath)) != previous.BenchSha256)
            {
                return Terminal.Fail($"The sequence or bench file changed since the run in {resume} started; resume refused (start a new run instead).", ExitCodes.InvalidInput);
            }
        }

        if (sequencePath is null)
        {
            return Terminal.Fail("Give a sequence file, or --resume DIR.", ExitCodes.InvalidInput);
        }

        sequencePath = BenchHost.Bundled(sequencePath, "sequence file");
        var sequence = SequenceReader.Load(sequencePath);
        benchPath ??= sequence.Bench;
        var benchFile = BenchHost.Locate(benchPath);
        var bench = BenchReader.Load(benchFile);
        var plan = Planner.Plan(sequence, bench);
        if (!PlanCommand.Show(sequence, bench, plan, brief: true))
        {
            return ExitCodes.UnsafePlan;
        }

        if (!bench.IsSimulated)
        {
            foreach (var note in ShuntSweep.Reporting.SafetyNotes.General)
            {
                Terminal.Note("caution", note);
            }
        }

        var clock = BenchHost.ClockFor(bench);
        var start = previous?.Start ?? clock.Now();
        outDir ??= Path.Combine("runs", TimeProvider.System.GetUtcNow().ToString("yyyyMMdd'T'HHmmss'Z'", CultureInfo.InvariantCulture));
        if (resume is null && File.Exists(Path.Combine(outDir, RunJournal.JournalFile)))
        {
            return Terminal.Fail($"{outDir} already holds a run; choose another --out or --resume it.", ExitCodes.InvalidInput);
        }

        Directory.CreateDirectory(outDir);
        using var traffic = new LoggerConfiguration().WriteTo.File(new CompactJsonFormatter(), Path.Combine(outDir, "traffic.jsonl")).CreateLogger();
        IOperator op = answers is not null ? AnswerFileOperator.Load(answers) : bench.IsSimulated ? new SimulatedOperator() : new ConsoleOperator();

        var wall = System.Diagnostics.Stopwatch.StartNew();
        await using var instruments = await BenchHost.ConnectAsync(bench, clock, seed, traffic, ct);
        // The connector asked every instrument for its identity (*IDN?) when it connected.
        var identities = instruments.Instruments.ToDictionary(i => BenchReader.KeyOf(i.Role), i => i.Identity.ToString());
        var onThisBench = Planner.Estimate(plan.Steps, settings => new[]
            {
                instruments.DropMeter.MeasurementTime,
                settings.Read.HasFlag(Readings.Uut) && instruments.UutMeter is { } u ? u.MeasurementTime : TimeSpan.Zero,
                settings.Read.HasFlag(Readings.Reference) && instruments.Reference is { } r ? r.MeasurementTime : TimeSpan.Zero,
            }.Max());
        AnsiConsole.MarkupLineInterpolated($"With these instruments' measurement times: about {onThisBench.TotalSeconds:0.#} s on the bench.");

        if (previous is null)
        {
            new RunManifest(
                $"shuntsweep {typeof(RunCommand).Assembly.GetName().Version}",
                sequencePath,
                RunManifest.HashFile(sequencePath),
                benchPath ?? BenchHost.DefaultBench,
                RunManifest.HashFile(benchFile),
                bench.Name,
                bench.Uut.Manufacturer,
                bench.Uut.Model,
                bench.Uut.Serial,
                bench.Uut.AssetId,
                identities,
                start,
                seed,
                bench.IsSimulated).Write(outDir);
        }

        var resumeAt = 0;
        RunJournal journal;
        if (resume is not null && EventLog.LastStepDone(resume) is { } last)
        {
            resumeAt = last.Step + 1;
            journal = RunJournal.Reopen(resume, last, clock.Time, start);
            AnsiConsole.MarkupLineInterpolated($"Resuming after step {last.Step} of {plan.Steps.Count}.");
        }
        else
        {
            if (resume is not null)
            {
                File.Delete(Path.Combine(resume, RunJournal.JournalFile));
                File.Delete(Path.Combine(resume, RunJournal.EventsFile));
            }

            journal = RunJournal.Create(outDir, clock.Time, start);
        }

        RunOutcome outcome;
        using (journal)
        {
            outcome = await AnsiConsole.Progress()
                .AutoClear(false)
                .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn(), new ElapsedTimeColumn())
                .StartAsync(async context =>
                {
                    var task = context.AddTask(sequence.Title, maxValue: plan.Steps.Count);
                    task.Value = resumeAt;
                    var progress = new SynchronousProgress(p =>
                    {
                        task.Value = p.StepsDone;
                        task.Description = Markup.Escape(p.Activity);
                    });
                    var r = new Runner(instruments, bench, sequence, plan, op, journal, start, progress);
                    return await r.RunAsync(resumeAt, bench.IsSimulated, ct);
                });
        }

        wall.Stop();
        var colour = outcome.End == RunEnd.Completed ? "green" : "red";
        var ended = RunEndWords.Describe(outcome.End.ToString());
        AnsiConsole.MarkupLineInterpolated($"[{colour}]{char.ToUpperInvariant(ended[0]) + ended[1..]}[/]: {outcome.Message}");
        if (!outcome.OutputsConfirmedOff)
        {
            Terminal.Fail("the outputs were NOT confirmed off — check the bench now.", ExitCodes.InstrumentFailure);
        }

        AnsiConsole.MarkupLineInterpolated($"Outputs {(outcome.OutputsConfirmedOff ? "confirmed off" : "NOT confirmed off")}. {(bench.IsSimulated ? "Simulated" : "Bench")} time {(clock.Now() - start).TotalSeconds:0.0} s, wall time {wall.Elapsed.TotalSeconds:0.00} s.");

        var journalPath = Path.Combine(outDir, RunJournal.JournalFile);
        var samples = JournalCsv.Read(journalPath).Samples;
        CharacterisationResult? result = null;
        if (samples.Count > 0)
        {
            result = Characteriser.Analyse(samples, bench.Uut);
            var resultPath = Path.Combine(outDir, "result.json");
            ResultJson.Write(result, resultPath);
            FitCommand.ShowRanges(result);
            AnsiConsole.MarkupLineInterpolated($"Journal: {journalPath} ({samples.Count} samples). Result: {resultPath}.");
        }

        // The report and the archive record whatever the run got, also after an abort: the as-found record matters most then.
        // They run after the outputs are off and must not be interrupted half-way by the Ctrl-C that ended the run.
        // Under --reproducible every date written is the run's own start (virtual time on a simulated bench), not the wall clock.
        var dating = outputs.Reproducible ? new VirtualTimeProvider(start) : TimeProvider.System;
        var report = RunReport.Write(outDir, dating, showPaths: !outputs.Reproducible);
        string? archived = null;
        if (!outputs.NoArchive)
        {
            var location = ArchiveLocation.Resolve(archive);
            await using (var store = await location.OpenAsync(cancellationToken: CancellationToken.None))
            {
                await store.RecordRunAsync(outDir, CancellationToken.None);
            }

            archived = location.Display;
        }

        AnsiConsole.MarkupLineInterpolated($"Report: {report}. {(archived is null ? "Not archived (--no-archive)" : $"Archived in {archived}")}.");

        var exitCode = outcome.End switch
        {
            RunEnd.Completed => ExitCodes.Success,
            RunEnd.SafetyAbort => ExitCodes.SafetyAbort,
            RunEnd.InstrumentFailure => ExitCodes.InstrumentFailure,
            _ => ExitCodes.Interrupted,
        };
        if (outputs.Json is { } json)
        {
            RunOutputs.Summary(sequence.Title, bench, seed, outcome, exitCode, plan.Steps.Count, result, outputs.Reproducible ? null : Path.GetFullPath(outDir), outputs.Reproducible ? null : archived)
                .Write(json);
        }

        if (outputs.Junit is { } junit)
        {
            JUnitReport.Write(JUnitReport.Build("shuntsweep run", sequence.Title, RunOutputs.Checks(outcome, result), dating.GetUtcNow()), junit);
            AnsiConsole.MarkupLineInterpolated($"JUnit XML: {junit}");
        }

        return exitCode;
    }

    /// <summary>What a run writes besides its run directory, and how.</summary>
    private sealed record RunOutputOptions(bool NoArchive, string? Json, string? Junit, bool Reproducible);

    /// <summary>Reports progress on the caller's thread, so the bar always shows the latest step.</summary>
    private sealed class SynchronousProgress(Action<RunProgress> report) : IProgress<RunProgress>
    {
        public void Report(RunProgress value) => report(value);
    }
}

using System.CommandLine;
using System.Globalization;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
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
        var seedOpt = new Option<int>("--seed") { Description = "The seed of the simulated bench's noise and random faults (the unit's parts follow from its serial number).", DefaultValueFactory = _ => 1 };
        var answersOpt = new Option<string?>("--answers") { Description = "Answers to operator prompts for unattended runs (prompt id: done|abort, otherwise: done|abort)." };
        var resumeOpt = new Option<string?>("--resume") { Description = "Continue the interrupted run in this directory after its last completed step." };
        var archiveOpt = new Option<string?>("--archive") { Description = $"Where the run is archived: an SQLite file, or a PostgreSQL connection string (default: ${ArchiveLocation.EnvironmentVariable}, else {ArchiveLocation.DefaultSqlitePath})." };
        var yesOpt = new Option<bool>("--yes") { Description = "Confirm turning the outputs on at a real bench without asking (unattended runs); recorded in the journal." };
        var noArchiveOpt = new Option<bool>("--no-archive") { Description = "Do not record the run in the archive." };
        var jsonOpt = new Option<string?>("--json") { Description = "Also write a JSON summary of the run to this file; '-' writes it to standard output instead of the tables." };
        var junitOpt = new Option<string?>("--junit") { Description = "Also write the run's checks (completed, outputs off, each range's conformity) as JUnit XML to this file." };
        var reproducibleOpt = new Option<bool>("--reproducible")
        {
            Description = "Date the report, summary and JUnit file by the run's own start and leave folders out of them, so that the same run diffs clean in CI.",
        };
        var timingOpt = PlanCommand.TimingFromOption();
        var context = new RecordOptions();
        var command = new Command("run", "Run a sequence on a bench, journal every sample, then fit and report.")
        {
            sequenceArg, benchOpt, outOpt, seedOpt, answersOpt, resumeOpt, archiveOpt, yesOpt, noArchiveOpt, jsonOpt, junitOpt, reproducibleOpt, timingOpt,
        };
        context.AddTo(command);
        command.SetAction((parse, ct) => Terminal.GuardAsync(() => ExecuteAsync(
            parse.GetValue(sequenceArg), parse.GetValue(benchOpt), parse.GetValue(outOpt), parse.GetValue(seedOpt), parse.GetValue(answersOpt), parse.GetValue(resumeOpt), parse.GetValue(archiveOpt), parse.GetValue(yesOpt), parse.GetValue(timingOpt),
            new RunOutputOptions(parse.GetValue(noArchiveOpt), parse.GetValue(jsonOpt), parse.GetValue(junitOpt), parse.GetValue(reproducibleOpt), context.Read(parse)), ct)));
        return command;
    }

    private static async Task<int> ExecuteAsync(string? sequencePath, string? benchPath, string? outDir, int seed, string? answers, string? resume, string? archive, bool yes, string? timingFrom, RunOutputOptions outputs, CancellationToken ct)
    {
        if (outputs.Json == "-")
        {
            // Standard output carries the JSON alone; errors and cautions still go to standard error.
            Terminal.Configure(quiet: true);
        }

        if (resume is not null && !File.Exists(Path.Combine(resume, RunManifest.FileName)))
        {
            return Terminal.Fail($"{resume} holds no run to resume (no {RunManifest.FileName}).", ExitCodes.InvalidInput);
        }

        outDir = resume ?? outDir ?? Path.Combine("runs", TimeProvider.System.GetUtcNow().ToString("yyyyMMdd'T'HHmmss'Z'", CultureInfo.InvariantCulture));
        if (resume is null && File.Exists(Path.Combine(outDir, RunJournal.JournalFile)))
        {
            return Terminal.Fail($"{outDir} already holds a run; choose another --out or --resume it.", ExitCodes.InvalidInput);
        }

        // One writer per run directory, taken before anything in it is read or written.
        RunDirectoryLock directoryLock;
        try
        {
            directoryLock = RunDirectoryLock.Acquire(outDir);
        }
        catch (RunDirectoryBusyException ex)
        {
            return Terminal.Fail(ex.Message, ExitCodes.InvalidInput);
        }

        using (directoryLock)
        {
            if (directoryLock.TakenOverFrom is { } stale)
            {
                Terminal.Note("note", $"process {stale} had ended without releasing {outDir}; its lock was taken over.");
            }

            return await PrepareAsync(sequencePath, benchPath, outDir, seed, answers, resume, archive, yes, timingFrom, outputs, ct);
        }
    }

    private static async Task<int> PrepareAsync(string? sequencePath, string? benchPath, string outDir, int seed, string? answers, string? resume, string? archive, bool yes, string? timingFrom, RunOutputOptions outputs, CancellationToken ct)
    {
        RunManifest? previous = null;
        if (resume is not null)
        {

            previous = RunManifest.Read(resume);
            sequencePath ??= previous.SequenceFile;
            benchPath ??= previous.BenchFile;
            seed = previous.Seed;
            if (RunManifest.HashFile(sequencePath) != previous.SequenceSha256 || RunManifest.HashFile(BenchHost.Locate(benchPath)) != previous.BenchSha256)
            {
                return Terminal.Fail($"The sequence or bench file changed since the run in {resume} started; resume refused (start a new run instead).", ExitCodes.InvalidInput);
            }

            if (EventLog.LastRunEnd(resume) == nameof(RunEnd.Completed))
            {
                return Terminal.Fail($"The run in {resume} completed; there is nothing to resume and no output was touched. Start a new run to measure again.", ExitCodes.InvalidInput);
            }

            // Continue the way the run was started, unless told otherwise now.
            if (LaunchRecord.Read(resume) is { } launched)
            {
                answers ??= launched.Answers;
                yes |= launched.AssumeYes;
                archive ??= launched.Archive;
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
        // Every instrument's profile must have what its role needs before anything is shown, asked or switched.
        ShuntSweep.Instruments.BenchConnector.Validate(bench);
        var learned = PlanCommand.LearnedSettling(timingFrom, sequence);
        var plan = Planner.Plan(sequence, bench, learned?.Waits);
        if (!PlanCommand.Show(sequence, bench, plan, brief: true, learned?.Directory))
        {
            return ExitCodes.UnsafePlan;
        }

        // Each bench instrument's calibration, checked on today's date before anything is connected.
        var calibrations = CalibrationCheck.Assess(bench, DateOnly.FromDateTime(TimeProvider.System.GetUtcNow().UtcDateTime));
        if (!RecordOptions.CheckCalibration(calibrations, bench.CalibrationWarningDays, outputs.Record.OverdueReason))
        {
            return ExitCodes.InvalidInput;
        }

        if (!bench.IsSimulated)
        {
            foreach (var note in ShuntSweep.Reporting.SafetyNotes.General)
            {
                Terminal.Note("caution", note);
            }

            // A real bench needs someone (or something) to answer: refuse now, before anything is connected or switched.
            if (answers is null && !Terminal.CanAsk)
            {
                var ids = plan.Steps.OfType<PromptStep>().Select(p => p.Id).Distinct().ToList();
                if (ids.Count > 0 || !yes)
                {
                    return Terminal.Fail(
                        $"There is no terminal to answer prompts at. For an unattended run give --answers FILE (a YAML mapping of prompt id to done or abort; this plan asks {(ids.Count > 0 ? string.Join(", ", ids) : "nothing")}) and --yes to confirm turning the outputs on. Nothing was touched.",
                        ExitCodes.InvalidInput);
                }
            }
        }

        // A resumed simulated run continues its own virtual time; a new one starts it from the wall clock (the fixed epoch under --reproducible).
        var clock = BenchHost.ClockFor(bench, previous?.Start ?? BenchHost.VirtualStart(outputs.Reproducible));
        var start = previous?.Start ?? clock.Now();
        var downtime = resume is not null && !bench.IsSimulated && EventLog.LastTime(resume) is { } last ? TimeProvider.System.GetUtcNow() - last : (TimeSpan?)null;
        var record = new RecordContext(outputs.Record.Context(bench), calibrations, calibrations.Any(c => c.State == CalibrationState.Overdue) ? outputs.Record.OverdueReason : null);
        return await RunLockedAsync(sequence, sequencePath, bench, benchPath, benchFile, plan, clock, start, outDir, seed, answers, resume, archive, yes, outputs, previous, downtime, record, ct);
    }

    private static async Task<int> RunLockedAsync(
        Sequence sequence, string sequencePath, BenchDescription bench, string? benchPath, string benchFile, RunPlan plan, IBenchClock clock, DateTimeOffset start,
        string outDir, int seed, string? answers, string? resume, string? archive, bool yes, RunOutputOptions outputs, RunManifest? previous, TimeSpan? downtime, RecordContext record, CancellationToken ct)
    {
        using var traffic = TrafficLog.Create(Path.Combine(outDir, "traffic.jsonl"), clock.Time, start);
        await using var display = new RunDisplay(sequence.Title, plan.Steps.Count);
        IOperator op = answers is not null ? AnswerFileOperator.Load(answers) : bench.IsSimulated ? new SimulatedOperator() : new ConsoleOperator(display);
        if (yes)
        {
            op = new AssumeYesOperator(op);
        }

        var wall = System.Diagnostics.Stopwatch.StartNew();
        await using var instruments = await BenchHost.ConnectAsync(bench, clock, seed, traffic, ct);
        // The connector asked every instrument for its identity (*IDN?) when it connected.
        var identities = instruments.Instruments.ToDictionary(i => BenchReader.KeyOf(i.Role), i => i.Identity.ToString());

        if (previous is null)
        {
            new RunManifest(
                SoftwareIdentity.Describe,
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
                bench.IsSimulated)
            {
                FuseDerating = sequence.Limits.FuseDerating,
                ProcedureId = sequence.Id,
                ProcedureVersion = sequence.Version,
                Calibrations = record.Calibrations,
                CalibrationOverride = record.Override,
                Context = record.Context,
            }.Write(outDir);
            new LaunchRecord(answers is null ? null : Path.GetFullPath(answers), yes, archive).Write(outDir);
        }

        var resumeAt = 0;
        RunJournal journal;
        if (resume is not null && EventLog.LastStepDone(resume) is { } lastDone)
        {
            resumeAt = lastDone.Step + 1;
            journal = RunJournal.Reopen(resume, lastDone, clock.Time, start);
            AnsiConsole.MarkupLineInterpolated($"Resuming after step {lastDone.Step} of {plan.Steps.Count}{(downtime is { } d ? $", {QuantityFormatter.Format(d.TotalSeconds, SiUnit.Second, 3)} after it stopped" : string.Empty)}.");
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
        CharacterisationResult result;
        using (journal)
        {
            if (record.Override is { } reason)
            {
                journal.Event("calibration-override", new Dictionary<string, object?>
                {
                    ["reason"] = reason,
                    ["overdue"] = string.Join(", ", record.Calibrations.Where(c => c.State == CalibrationState.Overdue).Select(c => $"{c.Role} {c.Calibration!.Certificate} due {c.Calibration.Due:yyyy-MM-dd}")),
                });
            }

            display.Report(new RunProgress(resumeAt, plan.Steps.Count, "connecting"));
            await display.StartAsync();
            var runner = new Runner(instruments, bench, sequence, plan, op, journal, start, display, new RunnerOptions(ConfirmBeforeOutputs: !bench.IsSimulated, Downtime: downtime, ConcurrentQueries: !bench.IsSimulated));
            outcome = await runner.RunAsync(resumeAt, bench.IsSimulated, ct);
            await display.PauseAsync();

            wall.Stop();
            ShowOutcome(outcome, bench.IsSimulated, clock.Now() - start, wall.Elapsed);
            result = Analyse(outDir, bench, journal, outcome.End);
        }

        var code = outcome.End switch
        {
            RunEnd.Completed => ExitCodes.Success,
            RunEnd.SafetyAbort => ExitCodes.SafetyAbort,
            RunEnd.InstrumentFailure => ExitCodes.InstrumentFailure,
            _ => ExitCodes.Interrupted,
        };

        // The report and the archive record whatever the run got, also after an abort: the as-found record matters most then.
        // They run after the outputs are off and must not be interrupted half-way by the Ctrl-C that ended the run.
        // Under --reproducible every date written is the run's own start (virtual time on a simulated bench), not the wall clock.
        var dating = outputs.Reproducible ? new VirtualTimeProvider(start) : TimeProvider.System;
        var (recorded, archived) = await RecordAsync(outDir, archive, outputs, dating);
        if (code == ExitCodes.Success && !recorded)
        {
            code = ExitCodes.RecordFailed;
        }

        // A stopped run keeps its own code (4, 5, 130) and a record that failed keeps 6: "outside specification" is said only of a run that completed.
        if (code == ExitCodes.Success && result.Verdict == RecordVerdict.Fail)
        {
            code = ExitCodes.CheckFailed;
        }

        if (outputs.Json is { } json)
        {
            RunOutputs.Summary(sequence.Title, bench, seed, outcome, code, plan.Steps.Count, result, outputs.Reproducible ? null : Path.GetFullPath(outDir), outputs.Reproducible ? null : archived)
                .Write(json);
        }

        if (outputs.Junit is { } junit)
        {
            JUnitReport.Write(JUnitReport.Build("shuntsweep run", sequence.Title, RunOutputs.Checks(outcome, result), dating.GetUtcNow()), junit);
            AnsiConsole.MarkupLineInterpolated($"JUnit XML: {junit}");
        }

        return code;
    }

    /// <summary>Prints how the run ended and, in plain words, every instrument whose output could not be confirmed off.</summary>
    private static void ShowOutcome(RunOutcome outcome, bool simulated, TimeSpan benchTime, TimeSpan wallTime)
    {
        var colour = outcome.End == RunEnd.Completed ? "green" : "red";
        var ended = RunEndWords.Describe(outcome.End.ToString());
        AnsiConsole.MarkupLineInterpolated($"[{colour}]{char.ToUpperInvariant(ended[0]) + ended[1..]}[/]: {outcome.Message}");
        foreach (var c in outcome.Off.Where(c => !c.Confirmed))
        {
            Terminal.Fail($"the {c.Role} ({c.Resource}) did not confirm that its output is off: {c.Problem}. Switch it off at the instrument now, before touching the wiring.", ExitCodes.InstrumentFailure);
        }

        AnsiConsole.MarkupLineInterpolated($"Outputs {(outcome.OutputsConfirmedOff ? "confirmed off" : "NOT confirmed off")}. {(simulated ? "Simulated" : "Bench")} time {QuantityFormatter.Format(benchTime.TotalSeconds, SiUnit.Second, 4)}, wall time {QuantityFormatter.Format(wallTime.TotalSeconds, SiUnit.Second, 3)}.");
    }

    /// <summary>Fits what was measured as far as it goes and writes <c>result.json</c>, also when no range could be fitted; ranges that cannot be
    /// fitted are left out and said so (on screen and in the events).</summary>
    private static CharacterisationResult Analyse(string outDir, BenchDescription bench, RunJournal journal, RunEnd end)
    {
        var journalPath = Path.Combine(outDir, RunJournal.JournalFile);
        var samples = JournalCsv.Read(journalPath).Samples;
        var notes = new List<string>();
        var unsettled = EventLog.UnsettledSteps(outDir);
        var result = PartialCharacterisation.Analyse(samples, bench.Uut, notes, new AnalysisOptions { Allowances = bench.Allowances ?? BenchAllowances.None, UnsettledSteps = unsettled })
            with { RunEnd = end.ToString(), LeftOut = notes };
        var resultPath = Path.Combine(outDir, "result.json");
        ResultJson.Write(result, resultPath);
        if (result.Ranges.Count > 0)
        {
            FitCommand.ShowRanges(result);
        }

        FitCommand.ShowVerdict(result);
        AnsiConsole.MarkupLineInterpolated($"Journal: {journalPath} ({samples.Count} samples). Result: {resultPath}.");

        if (notes.Count > 0)
        {
            foreach (var n in notes)
            {
                Terminal.Note("analysis incomplete", n);
            }

            journal.Event("analysis-incomplete", new Dictionary<string, object?> { ["notes"] = string.Join(" ", notes) });
        }

        return result;
    }

    /// <summary>Writes the report and the archive entry; a failure is explained (what failed, where the data are, how to finish it later) and never hides how the run ended.</summary>
    private static async Task<(bool Recorded, string? Archived)> RecordAsync(string outDir, string? archive, RunOutputOptions outputs, TimeProvider dating)
    {
        var ok = true;
        try
        {
            var report = RunReport.Write(outDir, dating, showPaths: !outputs.Reproducible);
            AnsiConsole.MarkupLineInterpolated($"Report: {report}.");
        }
        catch (Exception ex) when (ex is IOException or InvalidDataException or UnauthorizedAccessException or ArgumentException)
        {
            ok = false;
            Terminal.Warn($"the report could not be written ({ex.Message}). The data are safe in {outDir}; write it later with: shuntsweep report {outDir}");
        }

        if (outputs.NoArchive)
        {
            AnsiConsole.MarkupLine("Not archived (--no-archive).");
            return (ok, null);
        }

        ArchiveLocation location;
        try
        {
            location = ArchiveLocation.Resolve(archive);
        }
        catch (Exception ex) when (ex is ArgumentException or FormatException)
        {
            Terminal.Warn($"the archive target is not usable ({ex.Message}). The data are safe in {outDir}; archive them later with: shuntsweep report {outDir} --archive WHERE");
            return (false, null);
        }

        try
        {
            await using var store = await location.OpenAsync(cancellationToken: CancellationToken.None);
            await store.RecordRunAsync(outDir, CancellationToken.None);
            AnsiConsole.MarkupLineInterpolated($"Archived in {location.Display}.");
            return (ok, location.Display);
        }
        catch (Exception ex) when (ex is System.Data.Common.DbException or IOException or InvalidOperationException or UnauthorizedAccessException or ArgumentException or InvalidDataException or System.Net.Sockets.SocketException or TimeoutException)
        {
            Terminal.Warn($"archiving in {location.Display} failed ({ex.Message}). The data are safe in {outDir}; archive them later with: shuntsweep report {outDir} --archive WHERE");
            return (false, null);
        }
    }

    /// <summary>What a run writes besides its run directory, and how, and the context its record states.</summary>
    private sealed record RunOutputOptions(bool NoArchive, string? Json, string? Junit, bool Reproducible, RecordInput Record);
}

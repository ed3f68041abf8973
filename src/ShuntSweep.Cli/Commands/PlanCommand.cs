using System.CommandLine;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Simulation;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep plan</c>: expand and check a sequence on a bench without touching any output.</summary>
internal static class PlanCommand
{
    public static Command Create()
    {
        var sequenceArg = new Argument<string>("sequence") { Description = "The sequence file to plan." };
        var benchOpt = new Option<string?>("--bench") { Description = $"The bench file (default: the sequence's bench: key, else {BenchHost.DefaultBench})." };
        var timingOpt = TimingFromOption();
        var command = new Command("plan", "Expand a sequence into steps, check it against the UUT and the bench, estimate its duration.") { sequenceArg, benchOpt, timingOpt };
        command.SetAction((parse, _) => Terminal.GuardAsync(async () =>
        {
            var sequence = SequenceReader.Load(BenchHost.Bundled(parse.GetValue(sequenceArg)!, "sequence file"));
            var learned = LearnedSettling(parse.GetValue(timingOpt), sequence);
            var bench = BenchReader.Load(BenchHost.Locate(parse.GetValue(benchOpt) ?? sequence.Bench));
            if (bench.Instruments.Values.Any(i => i.Resource.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase)))
            {
                // A simulated bench's 'simulation' section is read when the bench is built: build it once, so a bad value is found now, not at 'run'.
                await using var simulated = SimulatedBench.Create(bench, new VirtualBenchClock(new VirtualTimeProvider()), seed: 1);
            }

            var plan = Planner.Plan(sequence, bench, learned?.Waits);
            return Show(sequence, bench, plan, brief: false, learned?.Directory) ? ExitCodes.Success : ExitCodes.UnsafePlan;
        }));
        return command;
    }

    /// <summary>The <c>--timing-from DIR</c> option of plan and run: the settling waits of an earlier run of the sequence.</summary>
    public static Option<string?> TimingFromOption() =>
        new("--timing-from") { Description = "Count on the settling waits of an earlier run of this sequence (its run directory) in the estimate; without it each adaptive point counts its fewest readings." };

    /// <summary>The settling waits of the earlier run in <paramref name="directory"/>, refused when that run was of another sequence; null without a directory.</summary>
    public static (string Directory, IReadOnlyDictionary<int, TimeSpan> Waits)? LearnedSettling(string? directory, Sequence sequence)
    {
        if (directory is null)
        {
            return null;
        }

        if (!File.Exists(Path.Combine(directory, RunJournal.EventsFile)) || !File.Exists(Path.Combine(directory, RunManifest.FileName)))
        {
            throw new DirectoryNotFoundException($"--timing-from {directory}: not a run directory (it has no {RunJournal.EventsFile} and {RunManifest.FileName}).");
        }

        var manifest = RunManifest.Read(directory);
        if (manifest.SequenceSha256 != RunManifest.HashFile(sequence.File))
        {
            throw new InvalidDataException($"--timing-from {directory}: that run was of another sequence ({manifest.SequenceFile}, SHA-256 {manifest.SequenceSha256[..12]}…), so its settling waits say nothing of this one.");
        }

        return (directory, EventLog.SettlingWaits(directory));
    }

    /// <summary>Prints the plan (per range, or only its totals when <paramref name="brief"/>), its estimate (with the settling waits learned from the
    /// run in <paramref name="learnedFrom"/> where given) and any violation; returns whether it may run.</summary>
    public static bool Show(Sequence sequence, BenchDescription bench, RunPlan plan, bool brief, string? learnedFrom = null)
    {
        AnsiConsole.MarkupLineInterpolated($"[bold]{sequence.Title}[/] on {bench.Name} — UUT {bench.Uut.Manufacturer} {bench.Uut.Model} s/n {bench.Uut.Serial}");
        if (!brief)
        {
            var table = new Table().AddColumns("range", "jack", "points", "from", "to", "samples/point", "holds");
            foreach (var group in plan.Steps.OfType<CurrentStep>().GroupBy(s => s.Range))
            {
                var points = group.OfType<MeasureStep>().ToList();
                table.AddRow(
                    group.Key,
                    group.First().Jack,
                    points.Count.ToString(System.Globalization.CultureInfo.InvariantCulture),
                    points.Count > 0 ? points.Min(p => p.Setpoint).ToString() : "-",
                    points.Count > 0 ? points.Max(p => p.Setpoint).ToString() : "-",
                    points.Count > 0 ? points[0].Settings.Samples.ToString(System.Globalization.CultureInfo.InvariantCulture) : "-",
                    group.OfType<HoldStep>().Count().ToString(System.Globalization.CultureInfo.InvariantCulture));
            }

            AnsiConsole.Write(table);
            foreach (var prompt in plan.Steps.OfType<PromptStep>())
            {
                AnsiConsole.MarkupLineInterpolated($"  step {prompt.Index}: operator — {prompt.Text}");
            }
        }

        AnsiConsole.MarkupLineInterpolated($"{plan.Steps.Count} steps, {plan.SampleCount} samples, about {QuantityFormatter.Format(plan.EstimatedDuration.TotalSeconds, SiUnit.Second, 3)} on the bench (the instruments' reading and command times from the bench file).");
        var estimate = plan.Estimate;
        if (estimate.AdaptivePoints > 0)
        {
            if (estimate.LearnedPoints == estimate.AdaptivePoints)
            {
                AnsiConsole.MarkupLineInterpolated($"  Settling: the waits of its {estimate.AdaptivePoints} adaptive points as the earlier run in {learnedFrom} took them.");
            }
            else
            {
                AnsiConsole.MarkupLineInterpolated($"  Settling: {estimate.AdaptivePoints - estimate.LearnedPoints} of its {estimate.AdaptivePoints} adaptive points counted at their fewest readings; up to {QuantityFormatter.Format(estimate.LongestExtra.TotalSeconds, SiUnit.Second, 3)} more if each waits its maxWait. Give --timing-from with an earlier run of this sequence to count on its waits.");
            }
        }
        if (plan.IsSafe)
        {
            ShowProtection(sequence, bench, plan);
        }
        foreach (var v in plan.Violations)
        {
            Terminal.Error.MarkupLineInterpolated($"[red]unsafe:[/] {sequence.File}:{v.Line}: plan step {v.Step}: {v.Message}");
        }

        if (!plan.IsSafe)
        {
            Terminal.Error.MarkupLineInterpolated($"[red]The plan is refused ({plan.Violations.Count} problem(s)); no output was touched.[/]");
        }

        return plan.IsSafe;
    }

    /// <summary>Prints the supply limits the run sets: the over-voltage level and, per jack, the current limit and what it derives from.</summary>
    private static void ShowProtection(Sequence sequence, BenchDescription bench, RunPlan plan)
    {
        AnsiConsole.MarkupLineInterpolated($"Supply protection: over-voltage {SupplyProtection.OverVoltage(bench)} (where the supply's profile can set it).");
        foreach (var p in SupplyProtection.ForJacks(plan, sequence, bench))
        {
            AnsiConsole.MarkupLineInterpolated(
                $"  {p.Jack} jack: current limit {p.CurrentLimit} (largest planned {p.LargestPlanned} + {QuantityFormatter.FormatPercent(SupplyProtection.Margin)}, at most {QuantityFormatter.FormatPercent(p.Derating)} of its {p.FuseRating} fuse and the bench's {bench.Supply.CurrentLimit}).");
        }
    }
}

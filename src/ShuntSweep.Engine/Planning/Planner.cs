using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;

namespace ShuntSweep.Engine.Planning;

/// <summary>Expands a sequence on a bench into concrete steps and checks every one against the UUT, its fuses and the bench's limits before any output is touched.</summary>
public static class Planner
{
    /// <summary>Expands and checks <paramref name="sequence"/> on <paramref name="bench"/>; its estimate takes the settling waits
    /// <paramref name="learnedSettling"/> from an earlier run of the same sequence (by step index) where given.</summary>
    public static RunPlan Plan(Sequence sequence, BenchDescription bench, IReadOnlyDictionary<int, TimeSpan>? learnedSettling = null)
    {
        ArgumentNullException.ThrowIfNull(sequence);
        ArgumentNullException.ThrowIfNull(bench);
        var uut = bench.Uut;
        var steps = new List<PlanStep>();
        var violations = new List<PlanViolation>();
        var remoteRange = bench.Instruments.ContainsKey(InstrumentRole.UutMeter);
        if (sequence.Limits.FuseDerating is not (> 0 and <= 1))
        {
            violations.Add(new PlanViolation(0, 0, $"the fuse derating is {QuantityFormatter.FormatPercent(sequence.Limits.FuseDerating)}; it must be above 0 % and at most 100 % of the fuse rating (a fuse is never run above its rating)."));
        }

        string? jack = null;
        string? range = null;

        foreach (var item in sequence.Items)
        {
            if (item is PromptItem p)
            {
                steps.Add(new PromptStep(steps.Count, p.Line, p.Id, p.Text, p.OutputsOff, null, null));
                continue;
            }

            var rangeName = item switch
            {
                SweepItem s => s.Range,
                HoldItem h => h.Range,
                RampItem r => r.Range,
                _ => throw new InvalidOperationException($"Unknown sequence item {item.GetType().Name}."),
            };
            var spec = uut.Ranges.FirstOrDefault(r => r.Name == rangeName)
                ?? throw new DocumentException(
                    sequence.File,
                    item.Line,
                    item.Column,
                    $"step {Position(sequence, item)} of the sequence uses range '{rangeName}', but the UUT of bench '{bench.Name}' ({uut.Manufacturer} {uut.Model}) "
                    + $"has no such range; it has {string.Join(", ", uut.Ranges.Select(r => r.Name))}. Is this the bench the sequence is written for (its bench: key, or --bench)?");

            if (spec.Jack != jack)
            {
                steps.Add(new PromptStep(
                    steps.Count,
                    0,
                    $"wire-{spec.Jack}",
                    $"Outputs are off. Connect the loop to the UUT's {spec.Jack} jack ({uut.Jack(spec.Jack).FuseRating} fuse) and the voltmeter across the same jacks.",
                    true,
                    spec.Jack,
                    null));
                jack = spec.Jack;
            }

            if (spec.Name != range && !remoteRange)
            {
                steps.Add(new PromptStep(steps.Count, 0, $"range-{spec.Name}", $"Set the UUT to its {spec.Name} range.", false, null, spec.Name));
            }

            range = spec.Name;
            switch (item)
            {
                case SweepItem s:
                    foreach (var c in s.Currents)
                    {
                        steps.Add(new MeasureStep(steps.Count, s.Line, spec.Name, spec.Jack, c.Resolve(spec.FullScale), s.Settings));
                    }

                    break;
                case HoldItem h:
                    steps.Add(new HoldStep(steps.Count, h.Line, spec.Name, spec.Jack, h.Current.Resolve(spec.FullScale), h.Duration, h.Interval, h.Settings));
                    break;
                case RampItem r:
                    steps.Add(new RampStep(steps.Count, r.Line, spec.Name, spec.Jack, r.From.Resolve(spec.FullScale), r.To.Resolve(spec.FullScale), r.Duration, r.Steps));
                    break;
            }
        }

        foreach (var step in steps.OfType<CurrentStep>())
        {
            foreach (var current in CurrentsOf(step))
            {
                Check(step, current, sequence.Limits, bench, uut, violations);
            }
        }

        var plan = new RunPlan(steps, Estimate(steps, BenchTiming.Of(bench), !bench.IsSimulated, learnedSettling), violations);
        var points = steps.Count(s => s is CurrentStep);
        if (points > PlanLimits.MaxPoints)
        {
            violations.Add(new PlanViolation(0, 0, $"the plan has {points} points (sweep points, holds and ramps); at most {PlanLimits.MaxPoints} are allowed. Split the sequence."));
        }

        if (plan.SampleCount > PlanLimits.MaxSamples)
        {
            violations.Add(new PlanViolation(0, 0, $"the plan records {plan.SampleCount} samples; at most {PlanLimits.MaxSamples} are allowed. Take fewer samples per point or sample the holds more slowly."));
        }

        if (plan.EstimatedDuration > PlanLimits.MaxDuration)
        {
            violations.Add(new PlanViolation(0, 0, $"the plan would take about {QuantityFormatter.Format(plan.EstimatedDuration.TotalDays, SiUnit.None, 3)} days on the bench; at most {PlanLimits.MaxDurationText} are allowed. Split the sequence."));
        }

        return plan;
    }

    /// <summary>The worst-case burden voltage the planner assumes for <paramref name="current"/> on <paramref name="range"/>.</summary>
    /// <remarks>The specified full-scale burden scaled to the current, else twice the nominal shunt's drop, else the sequence's drop limit.</remarks>
    public static Voltage? WorstCaseDrop(RangeSpec range, Current current, SafetyLimits limits)
    {
        ArgumentNullException.ThrowIfNull(range);
        ArgumentNullException.ThrowIfNull(limits);
        var fraction = Math.Abs(current.Amperes) / range.FullScale.Amperes;
        if (range.BurdenAtFullScale is { } b)
        {
            return new Voltage(b.Volts * Math.Max(fraction, 1e-9));
        }

        if (range.NominalShunt is { } r)
        {
            return new Voltage(2 * r.Ohms * Math.Abs(current.Amperes));
        }

        return limits.MaxDrop;
    }

    /// <summary>The 1-based position of <paramref name="item"/> among the sequence's steps, as the author counts them.</summary>
    private static int Position(Sequence sequence, SequenceItem item)
    {
        for (var i = 0; i < sequence.Items.Count; i++)
        {
            if (ReferenceEquals(sequence.Items[i], item))
            {
                return i + 1;
            }
        }

        return 0;
    }

    private static IEnumerable<Current> CurrentsOf(CurrentStep step) => step switch
    {
        MeasureStep m => [m.Setpoint],
        HoldStep h => [h.Setpoint],
        RampStep r => [r.From, r.To],
        _ => [],
    };

    private static void Check(CurrentStep step, Current current, SafetyLimits limits, BenchDescription bench, UutDescription uut, List<PlanViolation> violations)
    {
        var range = uut.Range(step.Range);
        var jack = uut.Jack(range.Jack);
        var line = step.Line;
        var magnitude = current.Abs();
        void Refuse(string message) => violations.Add(new PlanViolation(step.Index, line, message));

        if (current.Amperes < 0)
        {
            Refuse($"{current} on {range.Name}: this bench's supply and constant-current load drive one polarity only; reverse the leads with a prompt and sweep positive currents.");
            return;
        }

        var maxOfRange = range.FullScale.Amperes * limits.MaxFractionOfFullScale;
        if (magnitude.Amperes > maxOfRange * (1 + 1e-9))
        {
            Refuse($"{current} is above the {range.Name} range's limit of {new Current(maxOfRange)} ({QuantityFormatter.FormatPercent(limits.MaxFractionOfFullScale)} of its {range.FullScale} full scale).");
        }

        var fuseLimit = jack.FuseRating.Amperes * limits.FuseDerating;
        if (magnitude.Amperes > fuseLimit * (1 + 1e-9))
        {
            Refuse($"{current} is above the derated fuse rating of the {jack.Name} jack: {QuantityFormatter.FormatPercent(limits.FuseDerating)} of {jack.FuseRating} is {new Current(fuseLimit)}.");
        }

        if (magnitude > bench.Supply.CurrentLimit)
        {
            Refuse($"{current} is above the supply's current limit of {bench.Supply.CurrentLimit}.");
        }

        if (magnitude > bench.Load.MaxCurrent)
        {
            Refuse($"{current} is above the load's rated current of {bench.Load.MaxCurrent}.");
        }

        var drop = WorstCaseDrop(range, current, limits);
        if (drop is null)
        {
            Refuse($"range {range.Name}: the worst-case drop is unknown (no burden or nominal shunt in the UUT description); state limits.maxDrop in the sequence.");
            return;
        }

        var wiring = magnitude * bench.Wiring;
        var atLoad = bench.Supply.Voltage - drop.Value - wiring;
        if (atLoad < bench.Load.MinimumVoltage)
        {
            Refuse($"{current} on {range.Name}: the supply's {bench.Supply.Voltage} minus a worst-case drop of {drop.Value} and {wiring} of wiring leaves {atLoad} at the load, below its {bench.Load.MinimumVoltage} minimum (dropout).");
        }

        var supplyPower = bench.Supply.Voltage.Volts * magnitude.Amperes;
        if (supplyPower > bench.Supply.MaxPower.Watts)
        {
            Refuse($"{current} at {bench.Supply.Voltage} is {new Power(supplyPower)}, above the supply's {bench.Supply.MaxPower}.");
        }

        var loadPower = bench.Supply.Voltage.Volts * magnitude.Amperes;
        if (loadPower > bench.Load.MaxPower.Watts)
        {
            Refuse($"{current} would dissipate up to {new Power(loadPower)} in the load, above its {bench.Load.MaxPower}.");
        }
    }

    /// <summary>The expected duration of <paramref name="steps"/> on a bench of <paramref name="timing"/>: each reading takes as long as the slowest
    /// meter read, each command its instrument's processing time, and each adaptive point the wait <paramref name="learned"/> from an earlier
    /// run (by step index) or else the fewest drop readings its settling rule can decide on.</summary>
    /// <param name="steps">The plan's steps.</param>
    /// <param name="timing">The bench's instrument timing.</param>
    /// <param name="concurrentQueries">True when the end-of-point queries of supply and load overlap (a bench of independent instruments).</param>
    /// <param name="learned">Settling waits of an earlier run of the same sequence, by step index.</param>
    public static RunEstimate Estimate(IReadOnlyList<PlanStep> steps, BenchTiming timing, bool concurrentQueries, IReadOnlyDictionary<int, TimeSpan>? learned = null)
    {
        ArgumentNullException.ThrowIfNull(steps);
        ArgumentNullException.ThrowIfNull(timing);
        var total = TimeSpan.Zero;
        var extra = TimeSpan.Zero;
        var adaptive = 0;
        var fromHistory = 0;

        // Regulation status, supply voltage and load voltage after every point: in turn, or the supply's alongside the load's two.
        var loadQueries = 2 * timing.LoadQuery;
        var endOfPoint = concurrentQueries ? Max(timing.SupplyQuery, loadQueries) : timing.SupplyQuery + loadQueries;
        string? range = null;
        foreach (var step in steps)
        {
            if (step is CurrentStep c && c.Range != range)
            {
                range = c.Range;
                total += timing.RangeEntry;
            }

            switch (step)
            {
                case PromptStep { OutputsOff: true }:
                    total += timing.Rewiring;
                    break;
                case MeasureStep m:
                    var settling = m.Settings.Settling;
                    total += timing.LoadSetpoint + settling.Dwell + (Reading(timing, m.Settings) * m.Settings.Samples) + endOfPoint;
                    if (settling.IsAdaptive)
                    {
                        adaptive++;
                        if (learned is not null && learned.TryGetValue(m.Index, out var wait))
                        {
                            fromHistory++;
                            total += wait;
                        }
                        else
                        {
                            var least = timing.Drop(m.Settings.Nplc) * SettlingDetector.MinimumReadings(settling.AgreeCount);
                            total += least;
                            extra += Max(TimeSpan.Zero, settling.MaxWait - least);
                        }
                    }

                    break;
                case HoldStep h:
                    // Samples are taken on the hold's own clock; one that takes longer than the interval delays the next.
                    var each = Max(h.Interval, Reading(timing, h.Settings));
                    total += timing.LoadSetpoint + h.Settings.Settling.Dwell + (each * RunPlan.HoldSamples(h)) + endOfPoint;
                    break;
                case RampStep r:
                    total += r.Duration + (timing.LoadSetpoint * r.Steps);
                    break;
            }
        }

        return new RunEstimate(total, adaptive, fromHistory, extra);
    }

    /// <summary>One reading of a point: the slowest of the meters it reads.</summary>
    private static TimeSpan Reading(BenchTiming timing, PointSettings settings)
    {
        var reading = timing.Drop(settings.Nplc);
        if (settings.Read.HasFlag(Readings.Uut) && timing.Uut is { } uut)
        {
            reading = Max(reading, uut);
        }

        if (settings.Read.HasFlag(Readings.Reference) && timing.Reference(settings.Nplc) is { } reference)
        {
            reading = Max(reading, reference);
        }

        return reading;
    }

    private static TimeSpan Max(TimeSpan a, TimeSpan b) => a > b ? a : b;
}

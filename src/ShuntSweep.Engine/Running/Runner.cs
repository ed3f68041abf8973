using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Engine.Running;

/// <summary>Progress of a run for a progress bar: steps done of the total, and what is happening now.</summary>
public readonly record struct RunProgress(int StepsDone, int StepsTotal, string Activity);

/// <summary>Executes a checked plan on a connected bench, journals every completed step, watches the safety conditions, and always leaves the outputs off.</summary>
public sealed class Runner
{
    private readonly InstrumentBench _bench;
    private readonly BenchDescription _description;
    private readonly Sequence _sequence;
    private readonly RunPlan _plan;
    private readonly IOperator _operator;
    private readonly RunJournal _journal;
    private readonly IProgress<RunProgress>? _progress;
    private readonly DateTimeOffset _start;
    private readonly RunnerOptions _options;
    private readonly IReadOnlyList<JackProtection> _protection;
    private bool _outputsOn;
    private bool _startConfirmed;
    private string? _range;
    private string? _protectedJack;
    private double _nplc = double.NaN;

    /// <summary>Creates a runner; <paramref name="start"/> is the instant elapsed times count from.</summary>
    public Runner(InstrumentBench bench, BenchDescription description, Sequence sequence, RunPlan plan, IOperator @operator, RunJournal journal, DateTimeOffset start, IProgress<RunProgress>? progress = null, RunnerOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(plan);
        if (!plan.IsSafe)
        {
            throw new ArgumentException("An unsafe plan cannot be run.", nameof(plan));
        }

        _bench = bench;
        _description = description;
        _sequence = sequence;
        _plan = plan;
        _operator = @operator;
        _journal = journal;
        _start = start;
        _progress = progress;
        _options = options ?? new RunnerOptions();
        _protection = SupplyProtection.ForJacks(plan, sequence, description);
    }

    private IBenchClock Clock => _bench.Clock;

    /// <summary>Runs the plan from step <paramref name="resumeAt"/>; earlier steps are replayed unrecorded when <paramref name="replayEarlierSteps"/> (a simulated bench) and skipped otherwise.</summary>
    public async Task<RunOutcome> RunAsync(int resumeAt = 0, bool replayEarlierSteps = false, CancellationToken cancellationToken = default)
    {
        var done = resumeAt;
        RunOutcome outcome;
        try
        {
            var resumeDetails = new Dictionary<string, object?> { ["fromStep"] = resumeAt, ["steps"] = _plan.Steps.Count };
            if (resumeAt > 0 && _options.Downtime is { } downtime)
            {
                resumeDetails["downtimeS"] = downtime.TotalSeconds;
            }

            _journal.Event(resumeAt == 0 ? "run-start" : "run-resume", resumeDetails);
            await PrepareAsync(cancellationToken);
            foreach (var step in _plan.Steps)
            {
                cancellationToken.ThrowIfCancellationRequested();
                var record = step.Index >= resumeAt;
                if (!record && !replayEarlierSteps)
                {
                    continue;
                }

                if (step.Index == resumeAt && resumeAt > 0 && !replayEarlierSteps)
                {
                    await ReconfirmAsync(resumeAt, cancellationToken);
                }

                _progress?.Report(new RunProgress(done, _plan.Steps.Count, Describe(step)));
                var samples = await ExecuteAsync(step, record, cancellationToken);
                if (record && step is MeasureStep or HoldStep)
                {
                    _journal.CompleteStep(step.Index, samples);
                }

                if (record)
                {
                    done = step.Index + 1;
                }
            }

            _progress?.Report(new RunProgress(done, _plan.Steps.Count, "done"));
            outcome = new RunOutcome(RunEnd.Completed, $"All {_plan.Steps.Count} plan steps completed ({_plan.Steps.Count(s => s is MeasureStep or HoldStep)} measurement and hold steps journalled, {_plan.Steps.Count(s => s is not (MeasureStep or HoldStep))} operator and ramp steps).", done, []);
        }
        catch (SafetyAbortException ex)
        {
            outcome = new RunOutcome(RunEnd.SafetyAbort, ex.Message, done, []);
        }
        catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
        {
            outcome = new RunOutcome(RunEnd.Interrupted, "The run was interrupted; the journal holds every completed step and can be resumed.", done, []);
        }
        catch (Exception ex) when (ex is not OutOfMemoryException)
        {
            outcome = new RunOutcome(RunEnd.InstrumentFailure, $"Instrument failure: {ex.Message}", done, []);
            _journal.Event("failure", new Dictionary<string, object?> { ["type"] = ex.GetType().FullName, ["detail"] = ex.ToString() });
        }

        var off = await SafeOffAsync();
        outcome = outcome with { Off = off };
        if (!outcome.OutputsConfirmedOff && outcome.End != RunEnd.InstrumentFailure)
        {
            // An output that may still be on outweighs how the run ended otherwise.
            outcome = outcome with { End = RunEnd.InstrumentFailure, Message = $"{outcome.Message} Then switching the outputs off could not be confirmed." };
        }

        _journal.Event("run-end", new Dictionary<string, object?>
        {
            ["end"] = outcome.End.ToString(),
            ["message"] = outcome.Message,
            ["stepsDone"] = outcome.StepsDone,
            ["outputsConfirmedOff"] = outcome.OutputsConfirmedOff,
        });
        return outcome;
    }

    private async Task PrepareAsync(CancellationToken ct)
    {
        await _bench.Load.SetInputAsync(false, ct);
        await _bench.Supply.SetOutputAsync(false, ct);
        var first = _protection.Count > 0 ? _protection[0].CurrentLimit : _description.Supply.CurrentLimit;
        await _bench.Supply.ConfigureAsync(_description.Supply.Voltage, first, ct);
        var overVoltage = SupplyProtection.OverVoltage(_description);
        var hasOverVoltage = await _bench.Supply.SetOverVoltageProtectionAsync(overVoltage, ct);
        _journal.Event("over-voltage-protection", new Dictionary<string, object?> { ["levelV"] = hasOverVoltage ? overVoltage.Volts : null, ["set"] = hasOverVoltage });
        await _bench.Load.SetConstantCurrentAsync(Current.Zero, ct);
    }

    /// <summary>Sets the supply's current limit for the jack the loop now runs through, with the outputs off, and reads it back.</summary>
    private async Task ProtectJackAsync(string jack, CancellationToken ct)
    {
        var protection = _protection.First(p => p.Jack == jack);
        await _bench.Supply.SetCurrentLimitAsync(protection.CurrentLimit, ct);
        var readBack = await _bench.Supply.ReadCurrentLimitAsync(ct);
        if (readBack is { } actual && actual.Amperes > protection.CurrentLimit.Amperes * (1 + 1e-3) + 1e-6)
        {
            throw new SafetyAbortException($"The supply's current limit reads back as {actual}, above the {protection.CurrentLimit} set to protect the {jack} jack's {protection.FuseRating} fuse.");
        }

        _journal.Event("current-limit", new Dictionary<string, object?>
        {
            ["jack"] = jack,
            ["limitA"] = protection.CurrentLimit.Amperes,
            ["readBackA"] = readBack?.Amperes,
            ["fuseA"] = protection.FuseRating.Amperes,
            ["largestPlannedA"] = protection.LargestPlanned.Amperes,
        });
        _protectedJack = jack;
    }

    /// <summary>On a resumed real bench, asks again for the wiring (and range) of the step the run resumes in, since anything may have been moved meanwhile.</summary>
    private async Task ReconfirmAsync(int resumeAt, CancellationToken ct)
    {
        var earlier = _plan.Steps.Take(resumeAt).OfType<PromptStep>().ToList();
        var wiring = earlier.LastOrDefault(p => p.Jack is not null);
        var range = earlier.LastOrDefault(p => p.Range is not null);
        foreach (var prompt in new[] { wiring, range is not null && (wiring is null || range.Index > wiring.Index) ? range : null })
        {
            if (prompt is null)
            {
                continue;
            }

            await OutputsOffAsync(ct);
            await AskAsync(prompt, resumed: true, ct);
        }
    }

    /// <summary>Asks the operator and journals the question and the answer; a refusal is a safety abort.</summary>
    private async Task AskAsync(PromptStep prompt, bool resumed, CancellationToken ct)
    {
        _journal.Event("prompt", new Dictionary<string, object?> { ["id"] = prompt.Id, ["text"] = prompt.Text, ["resumed"] = resumed ? true : null });
        var yes = await _operator.ConfirmAsync(prompt, ct);
        _journal.Event("prompt-answered", new Dictionary<string, object?> { ["id"] = prompt.Id, ["answer"] = yes ? "done" : "abort", ["by"] = _operator.Describe(prompt) });
        if (!yes)
        {
            throw new SafetyAbortException($"The operator did not confirm '{prompt.Text}' (prompt {prompt.Id}).");
        }
    }

    /// <summary>Before outputs first turn on at a real bench, shows the plan's extremes and asks to go ahead.</summary>
    private async Task ConfirmStartAsync(CancellationToken ct)
    {
        var largest = _protection.MaxBy(p => p.LargestPlanned.Amperes);
        var volts = _description.Supply.Voltage;
        var text = largest is null
            ? $"Outputs turn on now: supply {volts}."
            : $"Outputs turn on now: up to {largest.LargestPlanned} through the {largest.Jack} jack ({largest.FuseRating} fuse), supply {volts} limited to {largest.CurrentLimit}, up to {new Power(volts.Volts * largest.LargestPlanned.Amperes)} from the supply. Go ahead?";
        await AskAsync(new PromptStep(-1, 0, StartPromptId, text, false, null, null), resumed: false, ct);
        _startConfirmed = true;
    }

    /// <summary>The largest current the plan sets on <paramref name="range"/>, so that the reference ammeter can take its most sensitive range that carries it.</summary>
    private Current LargestCurrentOn(string range) =>
        _plan.Steps.OfType<CurrentStep>().Where(s => s.Range == range)
            .SelectMany(s => s switch
            {
                MeasureStep m => [m.Setpoint.Abs()],
                HoldStep h => [h.Setpoint.Abs()],
                RampStep r => new[] { r.From.Abs(), r.To.Abs() },
                _ => [],
            })
            .DefaultIfEmpty(Current.Zero).Max();

    private async Task<IReadOnlyList<Sample>> ExecuteAsync(PlanStep step, bool record, CancellationToken ct)
    {
        switch (step)
        {
            case PromptStep p:
                if (p.OutputsOff)
                {
                    await OutputsOffAsync(ct);
                }

                if (record)
                {
                    await AskAsync(p, resumed: false, ct);
                }

                return [];
            case MeasureStep m:
                await EnterRangeAsync(m.Range, m.Settings.Nplc, ct);
                return await MeasureAsync(m, record, ct);
            case HoldStep h:
                await EnterRangeAsync(h.Range, h.Settings.Nplc, ct);
                return await HoldAsync(h, ct);
            case RampStep r:
                await EnterRangeAsync(r.Range, _nplc is double.NaN ? 1 : _nplc, ct);
                await RampAsync(r, ct);
                return [];
            default:
                throw new InvalidOperationException($"Unknown plan step {step.GetType().Name}.");
        }
    }

    private async Task EnterRangeAsync(string range, double nplc, CancellationToken ct)
    {
        var rangeChanged = range != _range;
        if (rangeChanged)
        {
            if (_bench.UutMeter is { } uut)
            {
                await _bench.Load.SetConstantCurrentAsync(Current.Zero, ct);
                await uut.SelectRangeAsync(_description.Uut.Range(range), ct);
            }

            _range = range;
        }

        if (nplc != _nplc || rangeChanged)
        {
            await _bench.DropMeter.ConfigureAsync(new VoltmeterSettings(null, nplc, true, 1), ct);
            if (_bench.ShuntTap is { } tap)
            {
                await tap.ConfigureAsync(new VoltmeterSettings(null, nplc, true, 1), ct);
            }

            if (_bench.Reference is { } reference)
            {
                await reference.ConfigureAsync(LargestCurrentOn(range), nplc, ct);
            }

            _nplc = nplc;
        }

        if (!_outputsOn)
        {
            var jack = _description.Uut.Range(range).Jack;
            if (_protectedJack != jack)
            {
                await ProtectJackAsync(jack, ct);
            }

            if (_options.ConfirmBeforeOutputs && !_startConfirmed)
            {
                await ConfirmStartAsync(ct);
            }

            await _bench.Load.SetConstantCurrentAsync(Current.Zero, ct);
            await _bench.Supply.SetOutputAsync(true, ct);
            await _bench.Load.SetInputAsync(true, ct);
            _outputsOn = true;
        }
    }

    private async Task<IReadOnlyList<Sample>> MeasureAsync(MeasureStep m, bool record, CancellationToken ct)
    {
        await _bench.Load.SetConstantCurrentAsync(m.Setpoint, ct);
        await Clock.WaitAsync(m.Settings.Settling.Dwell, ct);
        if (m.Settings.Settling.IsAdaptive)
        {
            await SettleAsync(m, record, ct);
        }

        var readings = new List<Reading>(m.Settings.Samples);
        for (var i = 0; i < m.Settings.Samples; i++)
        {
            readings.Add(await ReadTogetherAsync(m.Settings.Read, ct, withTap: true));
        }

        return await FinishPointAsync(m, m.Setpoint, readings, ct);
    }

    /// <summary>Reads the drop (and the shunt tap) until each has settled or the rule's longest wait is over; logs the wait unless replaying.</summary>
    private async Task SettleAsync(MeasureStep m, bool record, CancellationToken ct)
    {
        var rule = m.Settings.Settling;
        var deadline = Clock.Now() + rule.MaxWait;
        var started = Clock.Now();
        var detector = new SettlingDetector(rule.AgreeCount, rule.Tolerance);

        // A shunt tap inside the UUT is waited for too: its slow shunt can still drift when the whole drop, dominated by the fuse, has settled.
        var tapDetector = _bench.ShuntTap is null ? null : new SettlingDetector(rule.AgreeCount, rule.Tolerance);
        for (var count = 1; ; count++)
        {
            var r = await ReadTogetherAsync(Readings.Drop, ct, withTap: tapDetector is not null);
            var dropSettled = detector.Add(r.Drop);
            var tapSettled = tapDetector?.Add(r.Tap) ?? true;
            if (dropSettled && tapSettled)
            {
                if (record)
                {
                    _journal.Event("settled", SettleDetails(m, count, started, detector, tapDetector));
                }

                return;
            }

            if (Clock.Now() >= deadline)
            {
                if (record)
                {
                    _journal.Event("not-settled", SettleDetails(m, count, started, detector, tapDetector));
                }

                return;
            }
        }
    }

    private Dictionary<string, object?> SettleDetails(MeasureStep m, int readings, DateTimeOffset started, SettlingDetector drop, SettlingDetector? tap)
    {
        static double? Finite(double v) => double.IsFinite(v) ? v : null;
        return new Dictionary<string, object?>
        {
            ["step"] = m.Index,
            ["readings"] = readings,
            ["waitedS"] = (Clock.Now() - started).TotalSeconds,
            ["maxWaitS"] = m.Settings.Settling.MaxWait.TotalSeconds,
            ["remainingV"] = Finite(drop.RemainingChange),
            ["limitV"] = Finite(drop.Limit),
            ["tapRemainingV"] = tap is null ? null : Finite(tap.RemainingChange),
            ["tapLimitV"] = tap is null ? null : Finite(tap.Limit),
        };
    }

    private async Task<IReadOnlyList<Sample>> HoldAsync(HoldStep h, CancellationToken ct)
    {
        await _bench.Load.SetConstantCurrentAsync(h.Setpoint, ct);
        var t0 = Clock.Now() + h.Settings.Settling.Dwell;
        var count = RunPlan.HoldSamples(h);
        var readings = new List<Reading>(count);
        for (var k = 0; k < count; k++)
        {
            await Clock.WaitUntilAsync(t0 + (h.Interval * k), ct);
            var r = await ReadTogetherAsync(h.Settings.Read, ct, withTap: true);
            readings.Add(r);
            CheckDrop(r.Drop, h.Range);
        }

        return await FinishPointAsync(h, h.Setpoint, readings, ct);
    }

    private async Task RampAsync(RampStep r, CancellationToken ct)
    {
        for (var k = 1; k <= r.Steps; k++)
        {
            var level = new Current(r.From.Amperes + ((r.To.Amperes - r.From.Amperes) * k / r.Steps));
            await _bench.Load.SetConstantCurrentAsync(level, ct);
            await Clock.WaitAsync(r.Duration / r.Steps, ct);
        }
    }

    private async Task<IReadOnlyList<Sample>> FinishPointAsync(CurrentStep step, Current setpoint, List<Reading> readings, CancellationToken ct)
    {
        var (regulating, supplyVolts, loadVolts, loadCurrent) = await EndOfPointAsync(readings.Any(r => double.IsNaN(r.Reference)), ct);
        var samples = readings.Select((r, i) => new Sample(
            step.Range,
            step.Jack,
            step.Index,
            i,
            setpoint,
            new Current(double.IsNaN(r.Reference) ? loadCurrent.Amperes : r.Reference),
            r.Uut,
            new Voltage(r.Drop),
            supplyVolts,
            loadVolts,
            r.At - _start,
            double.IsNaN(r.Tap) ? null : new Voltage(r.Tap))).ToList();

        if (!regulating)
        {
            throw new SafetyAbortException(await DiagnoseLostRegulationAsync(step, setpoint, supplyVolts, loadVolts, ct));
        }

        var measured = samples.Average(s => s.Reference.Amperes);
        var range = _description.Uut.Range(step.Range);
        // A load's own error at small currents is large (an offset of microamperes is common), so only a loop current that has
        // left the setpoint by half of it, and by a percent of full scale, counts as not following it.
        if (Math.Abs(measured - setpoint.Amperes) > Math.Max(0.5 * Math.Abs(setpoint.Amperes), 0.01 * range.FullScale.Amperes))
        {
            var loadOn = await _bench.Load.IsInputOnAsync(ct);
            var supplyOn = await _bench.Supply.IsOutputOnAsync(ct);
            var cause = !loadOn ? "the load's input is off (was it reset?)"
                : !supplyOn ? "the supply's output is off (was it reset?)"
                : "check the wiring and the load's mode";
            throw new SafetyAbortException($"The loop current ({new Current(measured)}) does not follow the setpoint ({setpoint}) on {step.Range}: {cause}.");
        }

        foreach (var s in samples)
        {
            CheckDrop(s.Burden.Volts, step.Range);
            if (double.IsInfinity(s.UutReading) && setpoint <= range.FullScale)
            {
                throw new SafetyAbortException($"The UUT shows overload at {setpoint} on its {range.Name} range (full scale {range.FullScale}).");
            }
        }

        return samples;
    }

    /// <summary>The end-of-point queries of supply and load; on a bench of independent instruments (sockets) the supply is asked while the load answers, since their order does not matter.</summary>
    /// <remarks>A simulated bench asks them one after the other, so that virtual time, and with it the journal, stays the same from run to run.</remarks>
    private async Task<(bool Regulating, Voltage Supply, Voltage Load, Current LoadCurrent)> EndOfPointAsync(bool needLoadCurrent, CancellationToken ct)
    {
        if (!_options.ConcurrentQueries)
        {
            var regulating = await _bench.Load.IsRegulatingAsync(ct);
            var supplyVolts = await _bench.Supply.MeasureVoltageAsync(ct);
            var loadVolts = await _bench.Load.MeasureVoltageAsync(ct);
            var loadCurrent = needLoadCurrent ? await _bench.Load.MeasureCurrentAsync(ct) : Current.Zero;
            return (regulating, supplyVolts, loadVolts, loadCurrent);
        }

        var supply = _bench.Supply.MeasureVoltageAsync(ct);
        var load = LoadEndOfPointAsync(needLoadCurrent, ct);
        await Task.WhenAll(supply, load);
        var (r, v, i) = await load;
        return (r, await supply, v, i);
    }

    private async Task<(bool Regulating, Voltage Volts, Current Current)> LoadEndOfPointAsync(bool needCurrent, CancellationToken ct)
    {
        var regulating = await _bench.Load.IsRegulatingAsync(ct);
        var volts = await _bench.Load.MeasureVoltageAsync(ct);
        var current = needCurrent ? await _bench.Load.MeasureCurrentAsync(ct) : Current.Zero;
        return (regulating, volts, current);
    }

    /// <summary>Names the likely cause when the load stops regulating, from the current, the drop and the load's voltage as they are now.</summary>
    /// <remarks>A loop current above the setpoint is the load's fault (the supply's limit then holds it); a supply whose output is off or far
    /// below its set voltage (it was reset, or sits in its current limit) leaves nothing to regulate;
    /// an open UUT (blown fuse) leaves almost the whole set supply voltage across the UUT's jacks and none at the load;
    /// dropout leaves the load below its minimum operating voltage; anything else is the load's own doing.</remarks>
    private async Task<string> DiagnoseLostRegulationAsync(CurrentStep step, Current setpoint, Voltage supplyVolts, Voltage loadVolts, CancellationToken ct)
    {
        // The state now, not the average of the samples: a fuse may have opened part-way through the point.
        var current = await _bench.Load.MeasureCurrentAsync(ct);
        var drop = (await ReadTogetherAsync(Readings.Drop, ct)).Drop;
        var collapsed = Math.Abs(current.Amperes) < 0.01 * Math.Abs(setpoint.Amperes);
        var supplySet = _description.Supply.Voltage;
        if (!await _bench.Supply.IsOutputOnAsync(ct))
        {
            return $"The supply's output is off at {setpoint} on {step.Range} although the run had turned it on: the supply was probably reset or tripped its own protection. Check it before running again.";
        }

        var fullScale = _description.Uut.Range(step.Range).FullScale.Amperes;
        if (current.Amperes > (1.05 * setpoint.Amperes) + (0.01 * fullScale))
        {
            var limit = _protection.FirstOrDefault(p => p.Jack == step.Jack)?.CurrentLimit;
            return $"The loop current ({current}) is above the setpoint ({setpoint}) on {step.Range}: the load does not follow its setpoint{(limit is { } l ? $", and the supply's {l} current limit is what held the current" : string.Empty)}. Check the load before using it again.";
        }

        if (supplyVolts.Volts < 0.5 * supplySet.Volts && !(collapsed && Math.Abs(drop) > 0.5 * supplySet.Volts))
        {
            return $"The supply gives {supplyVolts} at {setpoint} on {step.Range}, far below its {supplySet} setting: it was probably reset, or it sits in its current limit. Check its voltage and current limit before running again.";
        }

        if (collapsed && Math.Abs(drop) > 0.5 * supplySet.Volts)
        {
            return $"Open circuit at {setpoint} on {step.Range}: the current collapsed to {current} and {new Voltage(drop)} of the supply's {supplySet} now stands across the UUT's jacks. The UUT's {step.Jack} fuse has probably opened; turn everything off and check it before re-wiring.";
        }

        if (loadVolts < _description.Load.MinimumVoltage)
        {
            return $"The load is out of regulation at {setpoint} on {step.Range}: it has {loadVolts} across it, below its {_description.Load.MinimumVoltage} minimum (dropout); raise the supply voltage or lower the current.";
        }

        return $"The load is out of regulation at {setpoint} on {step.Range} with {loadVolts} across it and {current} flowing: a load fault, or the supply is in its current limit.";
    }

    private void CheckDrop(double drop, string range)
    {
        if (_sequence.Limits.MaxDrop is { } max && Math.Abs(drop) > max.Volts)
        {
            throw new SafetyAbortException($"The drop across the UUT ({new Voltage(drop)}) on {range} is above the {max} limit of the sequence.");
        }
    }

    /// <summary>Arms every meter together, then fetches them together; a lone meter (the drop meter of a settling poll, some fifty
    /// thousand times in the demo) is armed and fetched directly, without the combinators.</summary>
    private static async Task<IReadOnlyList<double>[]> ArmAndFetchAsync(List<ITriggeredMeter> meters, CancellationToken ct)
    {
        if (meters.Count == 1)
        {
            await meters[0].ArmAsync(ct);
            return [await meters[0].FetchAsync(ct)];
        }

        await Task.WhenAll(meters.Select(m => m.ArmAsync(ct)));
        return await Task.WhenAll(meters.Select(m => m.FetchAsync(ct)));
    }

    /// <summary>Arms the drop meter and the meters <paramref name="read"/> names (and the shunt tap, when asked and present) together, then fetches each.</summary>
    private async Task<Reading> ReadTogetherAsync(Readings read, CancellationToken ct, bool withTap = false)
    {
        var meters = new List<ITriggeredMeter> { _bench.DropMeter };
        var uut = read.HasFlag(Readings.Uut) ? _bench.UutMeter : null;
        var reference = read.HasFlag(Readings.Reference) ? _bench.Reference : null;
        var tap = withTap ? _bench.ShuntTap : null;
        if (uut is not null)
        {
            meters.Add(uut);
        }

        if (reference is not null)
        {
            meters.Add(reference);
        }

        if (tap is not null)
        {
            meters.Add(tap);
        }

        var at = Clock.Now();
        IReadOnlyList<double>[] values;
        try
        {
            values = await ArmAndFetchAsync(meters, ct);
        }
        catch (InstrumentTimeoutException ex)
        {
            // One stalled reading is not yet a failed instrument: arm every meter afresh (the late answer is discarded by its session) and fetch once more.
            _journal.Event("re-armed", new Dictionary<string, object?> { ["resource"] = ex.Resource, ["error"] = ex.Message });
            at = Clock.Now();
            values = await ArmAndFetchAsync(meters, ct);
        }

        var drop = values[0][0];
        var index = 1;
        var uutValue = uut is null ? double.NaN : values[index++][0];
        var referenceValue = reference is null ? double.NaN : values[index++][0];
        var tapValue = tap is null ? double.NaN : values[index][0];
        if (double.IsNaN(drop) || (reference is not null && double.IsNaN(referenceValue)))
        {
            throw new InvalidDataException($"The {(double.IsNaN(drop) ? "drop voltmeter" : "reference ammeter")} answered not-a-number (SCPI 9.91E37) at {at:O}; its reading cannot be used.");
        }

        if (double.IsInfinity(drop))
        {
            throw new SafetyAbortException("The drop voltmeter shows overload: the voltage across the UUT's jacks is above its range (an open fuse leaves the full supply voltage there).");
        }

        if (tap is not null && !double.IsFinite(tapValue))
        {
            throw new InvalidDataException($"The shunt tap voltmeter answered {(double.IsNaN(tapValue) ? "not-a-number" : "overload")} at {at:O}; its reading cannot be used.");
        }

        return new Reading(at, drop, uutValue, referenceValue, tapValue);
    }

    private async Task OutputsOffAsync(CancellationToken ct)
    {
        await _bench.Load.SetInputAsync(false, ct);
        await _bench.Supply.SetOutputAsync(false, ct);
        _outputsOn = false;
    }

    /// <summary>Load input and supply output off at once, each with its own deadline and confirmed by query; journals each instrument that was not confirmed; never throws.</summary>
    private async Task<IReadOnlyList<OffCheck>> SafeOffAsync()
    {
        var checks = await SafeOff.SwitchOffAsync(_bench);
        foreach (var c in checks.Where(c => !c.Confirmed))
        {
            _journal.Event("safe-off-failed", new Dictionary<string, object?> { ["instrument"] = c.Role, ["resource"] = c.Resource, ["error"] = c.Problem });
        }

        _outputsOn = false;
        _journal.Event("outputs-off", new Dictionary<string, object?>
        {
            ["confirmed"] = checks.All(c => c.Confirmed),
            ["notConfirmed"] = checks.Where(c => !c.Confirmed).Select(c => c.Role).ToArray(),
        });
        return checks;
    }

    private static string Describe(PlanStep step) => step switch
    {
        MeasureStep m => $"{m.Range} {m.Setpoint}",
        HoldStep h => $"{h.Range} hold {h.Setpoint} for {QuantityFormatter.Format(h.Duration.TotalSeconds, SiUnit.Second)}",
        RampStep r => $"{r.Range} ramp to {r.To}",
        PromptStep p => p.Text,
        _ => step.GetType().Name,
    };

    /// <summary>The id of the confirmation asked before outputs first turn on at a real bench (answer it in an answers file, or pass --yes).</summary>
    public const string StartPromptId = "outputs-on";

    private readonly record struct Reading(DateTimeOffset At, double Drop, double Uut, double Reference, double Tap);
}

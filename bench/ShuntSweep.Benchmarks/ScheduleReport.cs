using System.Diagnostics;
using System.Globalization;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Simulation;

namespace ShuntSweep.Benchmarks;

/// <summary>How well the runner schedules a sweep in virtual time: its simulated duration against the lower bound and a naive schedule, and its wall time.</summary>
/// <remarks>Lower bound: Σ over points of (dwell + samples × the longest measurement of the instruments read together). Naive: fixed dwell and the
/// instruments read one after another, Σ (dwell + samples × Σ measurements). Measurement times are measured on the simulator, one instrument alone.</remarks>
internal static class ScheduleReport
{
    public static async Task<int> RunAsync(string sequencePath, string benchPath)
    {
        var bench = BenchReader.Load(benchPath);
        var sequence = SequenceReader.Load(sequencePath);
        var plan = Planner.Plan(sequence, bench);
        if (!plan.IsSafe)
        {
            Console.Error.WriteLine(string.Join(Environment.NewLine, plan.Violations.Select(v => v.Message)));
            return 3;
        }

        var wall = Stopwatch.StartNew();
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var simulator = SimulatedBench.Create(bench, clock, 1);
        await using var instruments = await BenchConnector.ConnectAsync(bench, clock, simulator.Connect, null, CancellationToken.None);
        var dir = Path.Combine(Path.GetTempPath(), "shuntsweep-schedule-" + Guid.NewGuid().ToString("N"));
        var start = clock.Now();
        RunOutcome outcome;
        using (var journal = RunJournal.Create(dir, clock.Time, start))
        {
            outcome = await new Runner(instruments, bench, sequence, plan, new SimulatedOperator(), journal, start).RunAsync();
        }

        var simulated = clock.Now() - start;
        wall.Stop();

        // One measurement of each meter alone, per range and NPLC, timed in virtual time.
        var lower = TimeSpan.Zero;
        var naive = TimeSpan.Zero;
        foreach (var group in plan.Steps.OfType<CurrentStep>().GroupBy(s => s.Range))
        {
            await instruments.UutMeter!.SelectRangeAsync(bench.Uut.Range(group.Key));
            foreach (var step in group)
            {
                var (settings, samples, read) = step switch
                {
                    MeasureStep m => (m.Settings, m.Settings.Samples, m.Settings.Read),
                    HoldStep h => (h.Settings, 0, h.Settings.Read),
                    _ => (null, 0, Readings.None),
                };
                if (settings is null)
                {
                    lower += ((RampStep)step).Duration;
                    naive += ((RampStep)step).Duration;
                    continue;
                }

                await instruments.DropMeter.ConfigureAsync(new VoltmeterSettings(null, settings.Nplc, true, 1));
                var times = new List<TimeSpan> { await TimeOneAsync(clock, instruments.DropMeter) };
                if (read.HasFlag(Readings.Uut))
                {
                    times.Add(await TimeOneAsync(clock, instruments.UutMeter));
                }

                if (read.HasFlag(Readings.Reference) && instruments.Reference is { } reference)
                {
                    times.Add(await TimeOneAsync(clock, reference));
                }

                if (step is HoldStep hold)
                {
                    lower += hold.Duration;
                    naive += hold.Duration;
                    continue;
                }

                lower += settings.Settling.Dwell + (times.Max() * samples);
                naive += settings.Settling.Dwell + (TimeSpan.FromTicks(times.Sum(t => t.Ticks)) * samples);
            }
        }

        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"""
            sequence:             {sequence.Title}
            outcome:              {outcome.End} ({plan.Steps.Count} steps, {plan.SampleCount} samples)
            simulated duration:   {simulated.TotalSeconds:F2} s
            lower bound:          {lower.TotalSeconds:F2} s   (ratio {simulated / lower:F3})
            naive schedule:       {naive.TotalSeconds:F2} s   (ratio {simulated / naive:F3})
            wall time:            {wall.Elapsed.TotalSeconds:F2} s (connect, run and journal; no analysis)
            """));
        return 0;
    }

    private static async Task<TimeSpan> TimeOneAsync(IBenchClock clock, ITriggeredMeter meter)
    {
        var t0 = clock.Now();
        await meter.ArmAsync();
        await meter.FetchAsync();
        return clock.Now() - t0;
    }
}

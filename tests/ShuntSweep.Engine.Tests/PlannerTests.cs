using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Sequences;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Engine.Tests;

public sealed class PlannerTests
{
    private static RunPlan Plan(string steps, string supplyVolts = "5 V", string fuseA = "500 mA", string limits = "") =>
        Planner.Plan(SequenceReader.Parse($"sequence: t\n{limits}steps:\n{steps}", "t.yaml"), Some.Bench(supplyVolts, fuseA));

    [Fact]
    public void Plan_ExpandsPoints_AndInsertsRewiringPrompts()
    {
        var plan = Plan("  - sweep: { range: 60mA, currents: [1 mA, 2 mA], samples: 4 }\n  - sweep: { range: 10A, currents: [1 A] }\n");
        Assert.True(plan.IsSafe, string.Join("; ", plan.Violations.Select(v => v.Message)));
        Assert.Equal(["wire-mA", "wire-A"], plan.Steps.OfType<PromptStep>().Select(p => p.Id));
        Assert.Equal(3, plan.Steps.OfType<MeasureStep>().Count());
        Assert.Equal(4 + 4 + 5, plan.SampleCount);
        Assert.True(plan.Steps.OfType<PromptStep>().All(p => p.OutputsOff));
    }

    [Fact]
    public void Plan_RefusesSetpointAboveFullScale()
    {
        var plan = Plan("  - sweep: { range: 60mA, currents: [61 mA] }\n");
        Assert.False(plan.IsSafe);
        Assert.Contains(plan.Violations, v => v.Message.Contains("full scale", StringComparison.Ordinal) && v.Line == 3);
    }

    [Fact]
    public void Plan_RefusesSetpointAboveDeratedFuseRating()
    {
        // 400 mA on a 450 mA fuse is under full scale but above 80 % of the fuse rating (360 mA).
        var plan = Plan("  - sweep: { range: 400mA, currents: [400 mA] }\n", fuseA: "450 mA");
        Assert.False(plan.IsSafe);
        Assert.Contains(plan.Violations, v => v.Message.Contains("derated fuse rating", StringComparison.Ordinal));
    }

    [Fact]
    public void Plan_RefusesCurrentThatPushesTheLoadIntoDropout()
    {
        // 2 V supply − 0.4 V worst-case drop at 10 A − 0.2 V of wiring leaves 1.4 V < 1.5 V load minimum.
        var plan = Plan("  - sweep: { range: 10A, currents: [10 A] }\n", supplyVolts: "2 V");
        Assert.False(plan.IsSafe);
        Assert.Contains(plan.Violations, v => v.Message.Contains("dropout", StringComparison.Ordinal));
    }

    [Fact]
    public void Plan_AcceptsTheSameCurrent_WithEnoughSupplyHeadroom()
    {
        var plan = Plan("  - sweep: { range: 10A, currents: [8 A] }\n", supplyVolts: "5 V");
        Assert.True(plan.IsSafe, string.Join("; ", plan.Violations.Select(v => v.Message)));
    }

    [Fact]
    public void Plan_UnknownRange_IsInvalidInputAtItsOwnStep_NamingTheKnownOnes()
    {
        var e = Assert.Throws<Core.Documents.DocumentException>(() => Plan("  - sweep: { range: 60mA, currents: [1 mA] }\n  - sweep: { range: 6A, currents: [1 A] }\n"));
        Assert.Contains("60mA, 400mA, 10A", e.Problem, StringComparison.Ordinal);
        Assert.Contains("step 2 of the sequence", e.Problem, StringComparison.Ordinal);
        Assert.True(e.Line > 0 && e.Column > 0, e.Message);
    }

    [Fact]
    public void Plan_EstimatesDuration_FromDwellTheMetersReadingTimesAndTheEndOfPointQueries()
    {
        // Default driver settings (50 Hz, 10 ms overhead per reading and per query), simulated in-process (settings take no bench time):
        // per point 100 ms dwell + 5 readings × (1 PLC = 20 ms + 10 ms) + supply voltage, load status and load voltage (3 × 10 ms) = 280 ms.
        var plan = Plan("  - sweep: { range: 60mA, currents: [1 mA, 2 mA], dwell: 100 ms, samples: 5, nplc: 1 }\n");
        Assert.Equal(TimeSpan.FromMilliseconds(560), plan.EstimatedDuration);
        Assert.Equal(0, plan.Estimate.AdaptivePoints);
    }

    [Fact]
    public void Plan_CountsAnAdaptivePointsLearnedWait_AndElseItsFewestReadings_WithWhatMaxWaitCouldAdd()
    {
        const string steps = "  - sweep: { range: 60mA, currents: [1 mA, 2 mA], dwell: 100 ms, samples: 5, nplc: 1, settle: { agree: 4, within: 0.001 %, maxWait: 30 s } }\n";
        var unknown = Plan(steps);
        var first = unknown.Steps.OfType<MeasureStep>().First();
        var learned = Planner.Plan(SequenceReader.Parse($"sequence: t\nsteps:\n{steps}", "t.yaml"), Some.Bench(), new Dictionary<int, TimeSpan> { [first.Index] = TimeSpan.FromSeconds(12) });

        // The fewest readings the rule decides on, each a drop reading of 30 ms.
        var least = TimeSpan.FromMilliseconds(30) * Running.SettlingDetector.MinimumReadings(4);
        Assert.Equal((2, 0), (unknown.Estimate.AdaptivePoints, unknown.Estimate.LearnedPoints));
        Assert.Equal(2 * (TimeSpan.FromSeconds(30) - least), unknown.Estimate.LongestExtra);
        Assert.Equal((2, 1), (learned.Estimate.AdaptivePoints, learned.Estimate.LearnedPoints));
        Assert.Equal(TimeSpan.FromSeconds(12) - least, learned.EstimatedDuration - unknown.EstimatedDuration);
    }

    [Fact]
    public void Plan_RefusesADeratingAboveTheFuseRating_EvenWhenTheSequenceWasNotReadFromAFile()
    {
        // 580 mA through a 500 mA fuse is what a 150 % derating would allow: the planner refuses the derating itself.
        var sequence = SequenceReader.Parse("sequence: t\nsteps:\n  - sweep: { range: 400mA, currents: [100 mA] }\n", "t.yaml");
        var plan = Planner.Plan(sequence with { Limits = sequence.Limits with { FuseDerating = 1.5 } }, Some.Bench());
        Assert.False(plan.IsSafe);
        Assert.Contains(plan.Violations, v => v.Message.Contains("at most 100 % of the fuse rating", StringComparison.Ordinal));
    }

    [Fact]
    public void Plan_RefusesMoreSamplesThanTheBound()
    {
        // 60 points of 100 000 samples each: 6 million journal rows, above the 5 million a plan may record.
        var plan = Plan("  - sweep: { range: 60mA, currents: { linear: { from: 1 mA, to: 50 mA, points: 60 } }, samples: 100000, nplc: 0.02 }\n");
        Assert.Equal(6_000_000, plan.SampleCount);
        Assert.Contains(plan.Violations, v => v.Message.Contains("at most 5000000", StringComparison.Ordinal));
    }

    [Fact]
    public void Plan_RefusesAPlannedDurationAboveTheBound()
    {
        // Two holds of 4 days each: 8 days, above the 7 days a plan may take.
        var plan = Plan("  - hold: { range: 60mA, current: 10 mA, duration: 96 h, rate: 1 Hz }\n  - hold: { range: 60mA, current: 10 mA, duration: 96 h, rate: 1 Hz }\n");
        Assert.Contains(plan.Violations, v => v.Message.Contains("at most 7 days", StringComparison.Ordinal));
    }
}

using ShuntSweep.Engine.Running;
using Xunit;

namespace ShuntSweep.Engine.Tests;

/// <summary>One run per fault the simulator can inject: whatever happens, the outputs end off, the journal parses, no completed point is lost, and the message names the cause.</summary>
public sealed class FaultRunTests
{
    [Fact]
    public async Task NoFault_CompletesEveryStep_WithOutputsOff()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults());
        Assert.Equal(RunEnd.Completed, run.Outcome.End);
        Assert.True(run.Outcome.OutputsConfirmedOff);
        Assert.True(run.SupplyOff && run.LoadOff);
        Assert.Equal(16 * 3, run.Journal.Samples.Count);
        run.AssertNoCompletedPointLost();
    }

    [Fact]
    public async Task FuseOpening_AbortsForSafety_SayingTheFuseHasProbablyOpened()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults("{ kind: fuseOpen, jack: mA, at: 3 s }"));
        Assert.Equal(RunEnd.SafetyAbort, run.Outcome.End);
        Assert.Contains("fuse has probably opened", run.Outcome.Message, StringComparison.Ordinal);
        AssertSafeEnd(run);
    }

    [Fact]
    public async Task LoadDropout_AbortsForSafety_NamingRegulation()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults("{ kind: loadDropout, at: 3 s, duration: 60 s }"));
        Assert.Equal(RunEnd.SafetyAbort, run.Outcome.End);
        Assert.Contains("regulation", run.Outcome.Message, StringComparison.Ordinal);
        AssertSafeEnd(run);
    }

    [Fact]
    public async Task PushedInstrumentError_IsAnInstrumentFailure_CarryingItsCode()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults("{ kind: pushError, instrument: load, afterCommands: 30, code: -310, detail: \"overtemperature\" }"));
        Assert.Equal(RunEnd.InstrumentFailure, run.Outcome.End);
        Assert.Contains("-310", run.Outcome.Message, StringComparison.Ordinal);
        AssertSafeEnd(run);
    }

    [Fact]
    public async Task InstrumentReset_MidRun_StopsTheRun_WithOutputsOff()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults("{ kind: reset, instrument: load, afterCommands: 40 }"));
        Assert.Equal(RunEnd.SafetyAbort, run.Outcome.End);
        Assert.Contains("reset", run.Outcome.Message, StringComparison.Ordinal);
        AssertSafeEnd(run);
    }

    [Fact]
    public async Task ShuntTap_IsReadWithEverySample_IntoTheJournal()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithTap());
        Assert.Equal(RunEnd.Completed, run.Outcome.End);
        Assert.All(run.Journal.Samples, s => Assert.True(s.ShuntTap is { } tap && tap.Volts > 0 && tap.Volts < s.Burden.Volts, $"step {s.Step}: tap {s.ShuntTap}, drop {s.Burden}"));
        AssertSafeEnd(run);
    }

    [Fact]
    public async Task ShuntTapError_IsAnInstrumentFailure_WithOutputsOff()
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithTap("{ kind: pushError, instrument: tap, afterCommands: 30, code: -230, detail: \"data stale\" }"));
        Assert.Equal(RunEnd.InstrumentFailure, run.Outcome.End);
        Assert.Contains("SIM::tap", run.Outcome.Message, StringComparison.Ordinal);
        AssertSafeEnd(run);
    }

    [Theory]
    [InlineData("dropConnection", "dmm", "")]
    [InlineData("truncatedReply", "dmm", "")]
    [InlineData("garbledByte", "ref", "")]
    [InlineData("lateReply", "uut", ", delay: 3 s")]
    public async Task CommunicationFault_EitherRecoversOrFails_NeverLosingAPoint(string kind, string instrument, string extra)
    {
        var run = await SimulatedRun.RunAsync(SimulatedRun.BenchWithFaults($"{{ kind: {kind}, instrument: {instrument}, afterCommands: 25{extra} }}"));
        Assert.True(
            run.Outcome.End is RunEnd.Completed or RunEnd.InstrumentFailure,
            $"{run.Outcome.End}: {run.Outcome.Message}");
        if (run.Outcome.End == RunEnd.InstrumentFailure)
        {
            Assert.Contains($"SIM::{instrument}", run.Outcome.Message, StringComparison.Ordinal);
        }

        AssertSafeEnd(run);
    }

    private static void AssertSafeEnd(SimulatedRun run)
    {
        Assert.True(run.SupplyOff, "the supply output was left on");
        Assert.True(run.LoadOff, "the load input was left on");
        run.AssertNoCompletedPointLost();
    }
}

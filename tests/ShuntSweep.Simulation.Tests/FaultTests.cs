using System.Text;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class FaultTests
{
    [Fact]
    public async Task Latency_DelaysEveryReplyOnTheBenchClock()
    {
        await using var rig = Rig.FromText(Bench("- { kind: latency, instrument: supply, delay: 250 ms }"));
        var before = rig.Elapsed;
        await rig.Supply.QueryAsync("*IDN?");
        await rig.Supply.QueryAsync("*IDN?");
        Assert.Equal(TimeSpan.FromMilliseconds(500), rig.Elapsed - before);
    }

    [Fact]
    public async Task LateReply_ArrivesOnlyAfterTheClockPassesItsDelay()
    {
        await using var rig = Rig.FromText(Bench("- { kind: lateReply, instrument: dmm, afterCommands: 2, delay: 10 s }"));
        Assert.Equal("1", await rig.Dmm.QueryAsync("*OPC?"));
        var late = rig.Dmm.QueryAsync("*OPC?");
        await Task.Delay(50, TestContext.Current.CancellationToken);
        Assert.False(late.IsCompleted, "the reply came before its delay");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(11), TestContext.Current.CancellationToken);
        Assert.Equal("1", await late.WaitAsync(TimeSpan.FromSeconds(10), TestContext.Current.CancellationToken));
    }

    [Fact]
    public async Task TruncatedReply_LosesItsTail()
    {
        await using var rig = Rig.FromText(Bench("- { kind: truncatedReply, instrument: uut, afterCommands: 1, keep: 10 }"));
        await rig.Uut.SendAsync("*IDN?");
        await rig.Uut.SendAsync("*OPC?");
        Assert.Equal("Test Maker1", await rig.Uut.ReadLineAsync()); // 10 bytes of the identity, then the next reply
    }

    [Fact]
    public async Task GarbledByte_CorruptsOneByteOfOneReply()
    {
        await using var rig = Rig.FromText(Bench("- { kind: garbledByte, instrument: supply, afterCommands: 1 }"));
        var first = await rig.Supply.QueryAsync("*IDN?");
        var second = await rig.Supply.QueryAsync("*IDN?");
        Assert.Equal(second.Length, first.Length);
        Assert.Equal(1, first.Zip(second).Count(p => p.First != p.Second));
    }

    [Fact]
    public async Task DropConnection_ClosesTheStreamOnTheNthCommand()
    {
        await using var rig = Rig.FromText(Bench("- { kind: dropConnection, instrument: load, afterCommands: 3 }"));
        Assert.Equal("1", await rig.Load.QueryAsync("*OPC?"));
        Assert.Equal("1", await rig.Load.QueryAsync("*OPC?"));
        await rig.Load.SendAsync("*OPC?");
        await Assert.ThrowsAsync<EndOfStreamException>(rig.Load.ReadLineAsync);
        await Assert.ThrowsAsync<IOException>(() => rig.Load.SendAsync("*IDN?"));
    }

    [Fact]
    public async Task PushError_PutsTheDeclaredErrorInTheQueue()
    {
        await using var rig = Rig.FromText(Bench("- { kind: pushError, instrument: dmm, afterCommands: 1, code: -240, detail: \"ADC reference unstable\" }"));
        Assert.Equal("-240,\"Hardware error;ADC reference unstable\"", await rig.Dmm.QueryAsync("SYST:ERR?"));
    }

    [Fact]
    public async Task Reset_TurnsTheSupplyOutputOff()
    {
        await using var rig = Rig.FromText(Bench("- { kind: reset, instrument: supply, afterCommands: 3 }"));
        await rig.Supply.SendAsync("VOLT 3;OUTP ON");
        Assert.Equal("1", await rig.Supply.QueryAsync("OUTP?"));
        Assert.Equal("0", await rig.Supply.QueryAsync("OUTP?"));
        Assert.Equal(0, await rig.Supply.NumberAsync("VOLT?"));
    }

    [Fact]
    public async Task FuseOpen_AtASetTime_OpensTheFuseThenAndThere()
    {
        await using var rig = Rig.FromText(Bench("- { kind: fuseOpen, at: 30 s, jack: IN }"));
        await rig.DriveAsync("10 mA", "0.005");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(29.9), TestContext.Current.CancellationToken);
        Assert.False(rig.Bench.IsFuseOpen("IN"));
        Assert.Equal("0", await rig.Load.QueryAsync("STAT:QUES:COND?"));
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(0.2), TestContext.Current.CancellationToken);
        Assert.True(rig.Bench.IsFuseOpen("IN"));
        Assert.Equal("2", await rig.Load.QueryAsync("STAT:QUES:COND?"));
    }

    [Fact]
    public async Task LoadDropout_StopsTheLoopCurrentForItsDuration()
    {
        await using var rig = Rig.FromText(Bench("- { kind: loadDropout, at: 10 s, duration: 2 s }"));
        await rig.DriveAsync("10 mA", "0.005");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(10.5), TestContext.Current.CancellationToken);
        Assert.Equal(0, rig.Bench.Truth().Current.Amperes);
        Assert.Equal("2", await rig.Load.QueryAsync("STAT:QUES:COND?"));
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(2), TestContext.Current.CancellationToken);
        Assert.Equal(0.005, rig.Bench.Truth().Current.Amperes, 1e-8); // less the few nA the voltmeter takes
        Assert.Equal("0", await rig.Load.QueryAsync("STAT:QUES:COND?"));
    }

    [Fact]
    public void UnknownFaultKind_IsAPositionedErrorWithASuggestion()
    {
        var ex = Assert.Throws<ShuntSweep.Core.Documents.DocumentException>(() => Benches.FromText(Bench("- { kind: latancy, instrument: dmm }")));
        Assert.Contains("did you mean 'latency'", ex.Message, StringComparison.Ordinal);
        Assert.True(ex.Line > 0);
    }

    private static string Bench(string fault)
    {
        var text = new StringBuilder(PhysicsTests.MinimalBench(fuse: "{ coldResistance: 0.2 ohm }"));
        text.AppendLine("  faults:");
        text.AppendLine("    " + fault);
        return text.ToString();
    }
}

using CsCheck;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class RobustnessTests
{
    [Fact]
    public async Task RandomBytes_NeverCrashTheServer_AndTheInstrumentStillAnswers()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        var client = rig.Dmm;
        await Gen.Byte.Array[0, 300].SampleAsync(
            async bytes =>
            {
                await client.SendRawAsync([.. bytes, (byte)'\n']);
                await client.SendAsync("*CLS;*IDN?");

                // Garbage may itself hold queries: read until the identity comes back.
                for (var i = 0; ; i++)
                {
                    var line = await client.ReadLineAsync();
                    if (line.EndsWith("SIM-DMM-65,DMM-00031,1.0", StringComparison.Ordinal))
                    {
                        break;
                    }

                    Assert.True(i < 400, "the instrument stopped answering");
                }
            },
            iter: 400,
            threads: 1);
        Assert.Equal("1", await client.QueryAsync("*OPC?"));
    }

    [Fact]
    public async Task RandomInvalidLines_AlwaysQueueAnError()
    {
        // A line holding a byte outside printable ASCII is never a valid program message: it must queue -101 "Invalid character".
        await using var rig = Rig.Open(Benches.Handheld);
        var client = rig.Supply;
        var line = Gen.Byte.Where(b => b is not ((byte)'\n' or (byte)';')).Array[0, 60]
            .SelectMany(prefix => Gen.Byte[0x80, 0xFF], (prefix, bad) => prefix.Append(bad).ToArray());
        await line.SampleAsync(
            async bytes =>
            {
                await client.SendAsync("*CLS");
                await client.SendRawAsync([.. bytes, (byte)'\n']);
                var error = await client.QueryAsync("SYST:ERR?");
                Assert.StartsWith("-101,", error);
            },
            iter: 400,
            threads: 1);
    }

    [Fact]
    public async Task OverlongLine_QueuesInputBufferOverrun_AndTheNextLineWorks()
    {
        await using var rig = Rig.Open(Benches.Handheld);
        await rig.Load.SendRawAsync([.. Enumerable.Repeat((byte)'A', 70_000), (byte)'\n']);
        Assert.Equal("-363,\"Input buffer overrun\"", await rig.Load.QueryAsync("SYST:ERR?"));
        Assert.Equal("1", await rig.Load.QueryAsync("*OPC?"));
    }
}

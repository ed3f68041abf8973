using System.Net;
using System.Net.Sockets;
using ShuntSweep.Core.Bench;
using ShuntSweep.Simulation.Hosting;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class DeterminismTests
{
    [Fact]
    public async Task SameSeed_GivesIdenticalTranscripts_DifferentSeedDoesNot()
    {
        var a = await TranscriptAsync(seed: 7);
        var b = await TranscriptAsync(seed: 7);
        var c = await TranscriptAsync(seed: 8);
        Assert.Equal(a, b);
        Assert.NotEqual(a, c);
    }

    [Fact]
    public void OneSerial_IsOneUnitWhateverTheSeed_AnotherSerialIsAnotherUnit()
    {
        // A serial number names one physical unit: its parts (shunt and fuse within tolerance, gain and offset errors) must not change
        // with the run's seed, or history would report drift of a unit that never changed.
        var bench = BenchReader.Load(Benches.Handheld);
        static string Parts(BenchDescription b) => string.Join(
            ";",
            SimulationReader.Read(b).Uut.Ranges.Select(r => FormattableString.Invariant($"{r.Spec.Name}:{r.FrontEnd.CurrentAt(0.01):R}:{r.GainError:R}:{r.Offset:R}")));

        var unit = Parts(bench);
        var other = Parts(bench with { Uut = bench.Uut with { Serial = bench.Uut.Serial + "-B" } });

        Assert.Equal(unit, Parts(BenchReader.Load(Benches.Handheld)));
        Assert.NotEqual(unit, other);
    }

    [Fact]
    public async Task TwoSeedsOfOneSerial_HaveTheSameFuses()
    {
        // The fuses' cold resistances are drawn within their 5 % tolerance from the serial; the seeds differ, the fuses do not.
        var (a, _) = Benches.Create(Benches.Handheld, seed: 3);
        var (b, _) = Benches.Create(Benches.Handheld, seed: 4);
        await using (a)
        await using (b)
        {
            foreach (var jack in new[] { "mA", "10A" })
            {
                Assert.Equal(a.FuseColdResistance(jack), b.FuseColdResistance(jack));
            }
        }
    }

    [Fact]
    public async Task TwoInstrumentsOverTcp_AnswerConcurrently()
    {
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var bench = SimulatedBench.Create(BenchReader.Load(Benches.Handheld), clock, 1);
        await using var host = TcpBenchHost.Start(bench, IPAddress.Loopback, 0, allowRemote: false);
        Assert.Equal(["supply", "load", "dmm", "uut", "ref"], host.Endpoints.Select(e => e.Name));
        Assert.All(host.Endpoints, e => Assert.Matches(@"^TCPIP::127\.0\.0\.1::\d+::SOCKET$", e.Resource));

        using var dmmSocket = new TcpClient();
        using var uutSocket = new TcpClient();
        await dmmSocket.ConnectAsync(IPAddress.Loopback, host.Endpoints.Single(e => e.Name == "dmm").Port, TestContext.Current.CancellationToken);
        await uutSocket.ConnectAsync(IPAddress.Loopback, host.Endpoints.Single(e => e.Name == "uut").Port, TestContext.Current.CancellationToken);
        await using var dmm = new ScpiClient(dmmSocket.GetStream());
        await using var uut = new ScpiClient(uutSocket.GetStream());

        // Both ask many questions at once; each must get its own answers, in order.
        var dmmTask = Task.Run(async () =>
        {
            var answers = new List<string>();
            for (var i = 0; i < 50; i++)
            {
                answers.Add(await dmm.QueryAsync("*IDN?;VOLT:NPLC?"));
            }

            return answers;
        });
        var uutTask = Task.Run(async () =>
        {
            var answers = new List<string>();
            for (var i = 0; i < 50; i++)
            {
                answers.Add(await uut.QueryAsync("*IDN?"));
            }

            return answers;
        });
        var results = await Task.WhenAll(dmmTask, uutTask);
        Assert.All(results[0], a => Assert.Equal("ShuntSweep Simulator,SIM-DMM-65,DMM-00031,1.0;+1.000000000E+00", a));
        Assert.All(results[1], a => Assert.Equal("Tarnwell Metrology,TW-18,TW18-240417,1.07", a));
    }

    [Fact]
    public async Task SpedUpRealClock_ServesOverTcp_WithSimulatedTimeRunningAhead()
    {
        // `sim serve --speed 500`: a real clock scaled 500×; a 1 s simulated measurement completes and SIM:TIME? runs ahead.
        var clock = new RealBenchClock(new ShuntSweep.Simulation.Hosting.ScaledTimeProvider(TimeProvider.System, 500));
        await using var bench = SimulatedBench.Create(BenchReader.Load(Benches.Handheld), clock, 1);
        await using var host = TcpBenchHost.Start(bench, IPAddress.Loopback, 0, allowRemote: false);
        using var socket = new TcpClient();
        await socket.ConnectAsync(IPAddress.Loopback, host.Endpoints.Single(e => e.Name == "dmm").Port, TestContext.Current.CancellationToken);
        await using var dmm = new ScpiClient(socket.GetStream());
        await dmm.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 10;:ZERO:AUTO OFF;:SAMP:COUN 5");
        Assert.Equal(5, (await dmm.NumbersAsync("READ?")).Length);
        Assert.True(await dmm.NumberAsync("SIM:TIME?") >= 1.0);
    }

    [Fact]
    public async Task RemoteAddress_IsRefused_WithoutAllowRemote()
    {
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        await using var bench = SimulatedBench.Create(BenchReader.Load(Benches.Handheld), clock, 1);
        Assert.Throws<ArgumentException>(() => TcpBenchHost.Start(bench, IPAddress.Any, 0, allowRemote: false));
    }

    private static async Task<List<string>> TranscriptAsync(int seed)
    {
        await using var rig = Rig.Open(Benches.Handheld, seed);
        var transcript = new List<string>();
        await rig.Dmm.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 1;:SAMP:COUN 3");
        foreach (var (fullScale, current) in new[] { ("6 mA", "0.001"), ("6 mA", "0.005"), ("400 mA", "0.1"), ("400 mA", "0.35"), ("10 A", "3") })
        {
            await rig.DriveAsync(fullScale, current);
            await rig.Clock.WaitAsync(TimeSpan.FromSeconds(2), TestContext.Current.CancellationToken);
            await rig.Dmm.SendAsync("INIT");
            await rig.Uut.SendAsync("INIT");
            await rig.Ref!.SendAsync("INIT");
            transcript.Add(await rig.Dmm.QueryAsync("FETC?"));
            transcript.Add(await rig.Uut.QueryAsync("FETC?"));
            transcript.Add(await rig.Ref.QueryAsync("FETC?"));
            transcript.Add(await rig.Supply.QueryAsync("MEAS:VOLT?"));
            transcript.Add(await rig.Load.QueryAsync("MEAS:CURR?"));
            transcript.Add(rig.Elapsed.Ticks.ToString(System.Globalization.CultureInfo.InvariantCulture));
        }

        return transcript;
    }
}

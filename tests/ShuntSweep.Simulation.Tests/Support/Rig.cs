using ShuntSweep.Core.Timing;

namespace ShuntSweep.Simulation.Tests.Support;

/// <summary>A simulated bench on a virtual clock with one raw SCPI client per instrument.</summary>
internal sealed class Rig : IAsyncDisposable
{
    private Rig(SimulatedBench bench, VirtualBenchClock clock)
    {
        Bench = bench;
        Clock = clock;
        Supply = new ScpiClient(bench.Connect("supply"));
        Load = new ScpiClient(bench.Connect("load"));
        Dmm = new ScpiClient(bench.Connect("dmm"));
        Uut = new ScpiClient(bench.Connect("uut"));
        Ref = bench.Instruments.Contains("ref") ? new ScpiClient(bench.Connect("ref")) : null;
    }

    public SimulatedBench Bench { get; }

    public VirtualBenchClock Clock { get; }

    public ScpiClient Supply { get; }

    public ScpiClient Load { get; }

    public ScpiClient Dmm { get; }

    public ScpiClient Uut { get; }

    public ScpiClient? Ref { get; }

    public TimeSpan Elapsed => Clock.Now() - VirtualTimeProvider.DefaultStart;

    public static Rig Open(string path, int seed = 1)
    {
        var (bench, clock) = Benches.Create(path, seed);
        return new Rig(bench, clock);
    }

    public static Rig FromText(string yaml, int seed = 1)
    {
        var (bench, clock) = Benches.FromText(yaml, seed);
        return new Rig(bench, clock);
    }

    /// <summary>Selects the UUT range by full scale, powers the loop and sets the load current.</summary>
    public async Task DriveAsync(string fullScale, string current, string supplyVolts = "5")
    {
        await Uut.SendAsync($"CONF:CURR {fullScale}");
        await Supply.SendAsync($"VOLT {supplyVolts};CURR MAX;OUTP ON");
        await Load.SendAsync($"FUNC CURR;CURR {current};INP ON");
    }

    /// <summary>One drop reading at <paramref name="nplc"/> on a fixed range.</summary>
    public async Task<double> DropAsync(double nplc = 1, string range = "1")
    {
        await Dmm.SendAsync($"CONF:VOLT:DC {range};:VOLT:NPLC {nplc}");
        return (await Dmm.NumbersAsync("READ?"))[0];
    }

    public async ValueTask DisposeAsync()
    {
        await Supply.DisposeAsync();
        await Load.DisposeAsync();
        await Dmm.DisposeAsync();
        await Uut.DisposeAsync();
        if (Ref is not null)
        {
            await Ref.DisposeAsync();
        }

        await Bench.DisposeAsync();
    }
}

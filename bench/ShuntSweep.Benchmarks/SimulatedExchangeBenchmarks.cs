using System.Text;
using BenchmarkDotNet.Attributes;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Transports;
using ShuntSweep.Simulation;

namespace ShuntSweep.Benchmarks;

/// <summary>One exchange with an instrument of the in-process simulated bench (the README demo's bench, on virtual time), as a simulated run makes it.</summary>
/// <remarks>
/// <see cref="SessionQuery"/> is one query through the message session and the in-process transport to the simulator's SCPI parser and back
/// (no physics, no traffic log). <see cref="SettlePoll"/> is what the runner does some 48 000 times in the demo while it waits for a point to
/// settle: the drop meter armed and fetched through its driver (two exchanges, resilience pipeline, physics stepped over the integration,
/// both exchanges written to the traffic log). The goal is a few microseconds per exchange.
/// </remarks>
[MemoryDiagnoser]
public class SimulatedExchangeBenchmarks : IAsyncDisposable
{
    private string _directory = string.Empty;
    private SimulatedBench? _simulator;
    private TrafficLog? _traffic;
    private InstrumentBench? _instruments;
    private MessageSession? _session;

    [GlobalSetup]
    public async Task SetupAsync()
    {
        var bench = BenchReader.Load(Path.Combine(RepositoryRoot(), "simulators", "handheld-tarnwell-tw18.yaml"));
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        _simulator = SimulatedBench.Create(bench, clock, 1);
        _directory = Path.Combine(Path.GetTempPath(), "shuntsweep-exchange-" + Guid.NewGuid().ToString("N"));
        _traffic = TrafficLog.Create(Path.Combine(_directory, "traffic.jsonl"), clock.Time, clock.Now());
        _instruments = await BenchConnector.ConnectAsync(bench, clock, _simulator.Connect, _traffic, CancellationToken.None);
        _session = new MessageSession(new StreamTransport("SIM::ref", _simulator.Connect("ref")));

        // A live loop, as during a settling wait: 4 mA through the 6 mA range.
        await _instruments.UutMeter!.SelectRangeAsync(bench.Uut.Range("6mA"));
        await _instruments.Supply.ConfigureAsync(bench.Supply.Voltage, new Core.Quantities.Current(0.01));
        await _instruments.Load.SetConstantCurrentAsync(new Core.Quantities.Current(0.004));
        await _instruments.Load.SetInputAsync(true);
        await _instruments.Supply.SetOutputAsync(true);
    }

    [GlobalCleanup]
    public async ValueTask DisposeAsync()
    {
        if (_instruments is not null)
        {
            await _instruments.Load.SetInputAsync(false);
            await _instruments.Supply.SetOutputAsync(false);
            await _instruments.DisposeAsync();
        }

        if (_session is not null)
        {
            await _session.DisposeAsync();
        }

        _traffic?.Dispose();
        if (_simulator is not null)
        {
            await _simulator.DisposeAsync();
        }

        if (Directory.Exists(_directory))
        {
            Directory.Delete(_directory, recursive: true);
        }

        GC.SuppressFinalize(this);
    }

    /// <summary>One query to the simulated reference ammeter's SCPI front through the message session (the transport and parser alone).</summary>
    [Benchmark]
    public ValueTask<string> SessionQuery() => _session!.QueryAsync("SYST:VERS?");

    /// <summary>One settling poll: arm and fetch the drop meter through its driver, physics and traffic log included (two exchanges).</summary>
    [Benchmark]
    public async Task<double> SettlePoll()
    {
        await _instruments!.DropMeter.ArmAsync();
        return (await _instruments.DropMeter.FetchAsync())[0];
    }

    private static string RepositoryRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(Path.Combine(dir.FullName, "ShuntSweep.sln")))
            {
                return dir.FullName;
            }
        }

        throw new DirectoryNotFoundException(new StringBuilder("The repository root (with ShuntSweep.sln) is not above ").Append(AppContext.BaseDirectory).ToString());
    }
}

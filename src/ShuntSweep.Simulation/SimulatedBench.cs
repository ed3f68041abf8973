using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Faults;
using ShuntSweep.Simulation.Hosting;
using ShuntSweep.Simulation.Instruments;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation;

/// <summary>A physics-faithful simulated bench: supply, CC load, voltmeter, UUT and reference coupled through one circuit, each speaking SCPI
/// over its own duplex stream (in process) or TCP port (<see cref="TcpBenchHost"/>).</summary>
/// <remarks>Deterministic: the same bench file, seed and command sequence give the same answers byte for byte. Thread-safe.</remarks>
public sealed class SimulatedBench : IAsyncDisposable
{
    private readonly Dictionary<string, SimulatedInstrument> _instruments;
    private readonly BenchCircuit _circuit;
    private readonly CancellationTokenSource _stop = new();

    private SimulatedBench(BenchDescription description, BenchCircuit circuit, Dictionary<string, SimulatedInstrument> instruments)
    {
        Description = description;
        _circuit = circuit;
        _instruments = instruments;
    }

    /// <summary>The bench the simulation was built from.</summary>
    public BenchDescription Description { get; }

    /// <summary>The simulated instruments' names, in port order (a subset of supply, load, dmm, uut, ref, tap).</summary>
    public IReadOnlyList<string> Instruments => SimulationReader.Served.Where(_instruments.ContainsKey).ToList();

    /// <summary>Builds the simulation of <paramref name="bench"/> on <paramref name="clock"/>: its unit's parts follow from the UUT's serial, its noise and faults from <paramref name="seed"/>.</summary>
    /// <exception cref="Core.Documents.DocumentException">The simulation section is not valid.</exception>
    public static SimulatedBench Create(BenchDescription bench, IBenchClock clock, int seed)
    {
        ArgumentNullException.ThrowIfNull(bench);
        ArgumentNullException.ThrowIfNull(clock);
        var settings = SimulationReader.Read(bench);
        var circuit = new BenchCircuit(settings.Uut, bench.Wiring.Ohms, settings.Dmm, settings.Reference, settings.Supply, settings.Load, clock.Now);
        circuit.SupplyLimit = Math.Min(0.1, settings.Supply.MaxCurrent);
        foreach (var fault in settings.Faults)
        {
            fault.Attach(circuit);
        }

        var instruments = new Dictionary<string, SimulatedInstrument>(StringComparer.Ordinal);
        foreach (var name in SimulationReader.Served)
        {
            if (!bench.Instruments.Values.Any(i => string.Equals(i.Resource, "SIM::" + name, StringComparison.OrdinalIgnoreCase)))
            {
                continue;
            }

            var random = SeededRandom.For(seed, "noise:" + name);
            var scpi = name switch
            {
                "supply" => SupplyInstrument.Create(circuit, clock, random),
                "load" => LoadInstrument.Create(circuit, clock, random),
                "dmm" => VoltmeterInstrument.Create(circuit, settings.Dmm!, op => op.JackVoltage, circuit.SetDmmRange, clock, random),
                "tap" => VoltmeterInstrument.Create(circuit, settings.Tap!, op => op.ShuntVoltage, _ => { }, clock, random),
                "uut" => UutInstrument.Create(circuit, clock, random),
                "ref" => ReferenceInstrument.Create(circuit, clock, random),
                _ => throw new InvalidOperationException($"No simulated instrument is called '{name}'."),
            };
            var faults = settings.Faults.Where(f => f.Instrument == name).ToList();
            var faultRandom = SeededRandom.For(seed, "faults:" + name);
            var (front, lineEnd, replyEnd) = Dialects.FrontFor(bench, name, scpi);
            instruments[name] = new SimulatedInstrument(name, scpi, faults, n => new FaultContext(name, scpi, circuit, clock, faultRandom) { Commands = n }, front, lineEnd, replyEnd);
        }

        return new SimulatedBench(bench, circuit, instruments);
    }

    /// <summary>Opens an in-memory connection to the instrument <paramref name="name"/> (<c>supply</c> or <c>SIM::supply</c>, and so on).</summary>
    /// <returns>The client end: write LF-terminated SCPI (a write returns once its complete commands have been executed), read LF-terminated
    /// responses; dispose it to hang up.</returns>
    public Stream Connect(string name) => new InProcessConnection(Find(name), _stop.Token);

    /// <summary>Serves the instrument <paramref name="name"/> on <paramref name="stream"/> (a TCP connection, say) until either side closes it.</summary>
    /// <remarks>A client that lets more than <see cref="ScpiSession.MaxPendingBytes"/> of replies pile up unread is dropped, and <paramref name="dropped"/> told why.</remarks>
    public async Task ServeAsync(string name, Stream stream, CancellationToken cancellationToken, Action<string>? dropped = null)
    {
        ArgumentNullException.ThrowIfNull(stream);
        var instrument = Find(name);
        if (instrument.IsUnplugged)
        {
            return; // Off the network: the connection is accepted by the host's socket and closed at once.
        }

        using var linked = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken, _stop.Token);
        await using var session = new ScpiSession(instrument, stream, linked.Token, dropped);
        await session.RunAsync(stream);
    }

    /// <summary>The cold series resistance of <paramref name="range"/> between the jacks: front end, fuse and contacts (ground truth for tests).</summary>
    public Resistance ExpectedSeriesResistance(string range)
    {
        var r = _circuit.Uut.Range(range);
        return new Resistance(r.FrontEnd.ColdResistance + r.Jack.Fuse.Element.ColdResistance + r.Jack.Contacts);
    }

    /// <summary>The cold resistance of the fuse of <paramref name="jack"/> (ground truth for tests).</summary>
    public Resistance FuseColdResistance(string jack) => new(_circuit.Uut.Jack(jack).Fuse.Element.ColdResistance);

    /// <summary>The contact and internal wiring resistance in series with <paramref name="jack"/> (ground truth for tests).</summary>
    public Resistance ContactResistance(string jack) => new(_circuit.Uut.Jack(jack).Contacts);

    /// <summary>True when the fuse of <paramref name="jack"/> has opened.</summary>
    public bool IsFuseOpen(string jack) => _circuit.At(c => c.Uut.Jack(jack).Fuse.IsOpen);

    /// <summary>The temperature of the fuse element of <paramref name="jack"/>, in °C, at the clock's present.</summary>
    public double FuseTemperature(string jack) => _circuit.At(c => c.Uut.Jack(jack).Fuse.Celsius);

    /// <summary>Moves the simulated lead to <paramref name="range"/> (what the operator does; <c>SIM::uut CONF:CURR</c> does the same remotely).</summary>
    public void SelectRange(string range)
    {
        var r = _circuit.Uut.Range(range);
        _circuit.Change(c => c.Uut.Selected = r);
    }

    /// <summary>Ground truth for insertion-error checks: puts <paramref name="range"/> in series with a Thevenin source of
    /// <paramref name="volts"/> behind <paramref name="ohms"/> (no bench instruments) and lets every self-heating part reach its steady state.</summary>
    /// <returns>The current, the drop across the jacks, and the UUT's noiseless reading (±infinity on overload).</returns>
    /// <remarks>The loop is solved on the simulator's own physics (front end, clamp diodes, fuse and contacts) by bisection on the range
    /// voltage, alternated with moving each heated part to its steady temperature until the current stops changing. It leaves the simulated
    /// unit in that thermal state, so use a bench of its own for it.</remarks>
    public (Current Current, Voltage Drop, double Reading) SteadyStateInCircuit(string range, Voltage volts, Resistance ohms) => _circuit.At(c =>
    {
        var r = c.Uut.Range(range);
        var fuse = r.Jack.Fuse.Element;
        double Jack(double x) => x + (r.CurrentAt(x) * (fuse.Resistance + r.Jack.Contacts));
        double Loop(double x) => (r.CurrentAt(x) * ohms.Ohms) + Jack(x) - volts.Volts;
        var x = 0.0;
        var current = double.NaN;
        for (var iteration = 0; iteration < 1000; iteration++)
        {
            x = BenchCircuit.Bisect(Loop, 0, volts.Volts);
            var next = r.CurrentAt(x);
            const double forEver = 1e9;
            fuse.Advance(next * next * fuse.Resistance, forEver);
            r.FrontEnd.Advance(x, forEver);
            if (Math.Abs(next - current) <= 1e-13 * Math.Abs(next))
            {
                break;
            }

            current = next;
        }

        return (new Current(r.CurrentAt(x)), new Voltage(Jack(x)), r.NoiselessDisplay(r.FrontEnd.Sensed(x)));
    });

    /// <summary>Whether the supply's output and the load's input are on, as the simulated instruments are (ground truth for safe-off checks,
    /// whatever dialect they are served in).</summary>
    public (bool SupplyOn, bool LoadOn) OutputStates() => _circuit.At(c => (c.SupplyOn, c.LoadOn));

    /// <summary>The true voltage across the UUT's jacks and current through them at the clock's present.</summary>
    public (Voltage Drop, Current Current) Truth()
    {
        var op = _circuit.Present();
        return (new Voltage(op.JackVoltage), new Current(op.UutCurrent));
    }

    /// <inheritdoc />
    public async ValueTask DisposeAsync()
    {
        await _stop.CancelAsync();
        foreach (var i in _instruments.Values)
        {
            i.Scpi.Dispose();
        }

        _stop.Dispose();
    }

    private SimulatedInstrument Find(string name)
    {
        var key = name.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase) ? name[5..] : name;
        return _instruments.TryGetValue(key.ToLowerInvariant(), out var i)
            ? i
            : throw new KeyNotFoundException($"The simulated bench has no instrument '{name}'; it has {string.Join(", ", Instruments)}.");
    }
}

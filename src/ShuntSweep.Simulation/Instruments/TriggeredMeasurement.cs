using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>The INITiate/FETCh? cycle of a simulated meter: arming opens one averaging window per sample, fetching waits on the bench clock until the last window has closed.</summary>
internal sealed class TriggeredMeasurement(BenchCircuit circuit, IBenchClock clock)
{
    private List<Window> _armed = [];
    private Func<double, double>[] _finish = [];
    private DateTimeOffset _ready;
    private double[]? _last;

    /// <summary>True while a measurement is armed and not yet fetched.</summary>
    public bool IsArmed => _armed.Count > 0;

    /// <summary>Arms <paramref name="samples"/> windows of <paramref name="integration"/> each, one per <paramref name="period"/>, after <paramref name="overhead"/>;
    /// each averages what <paramref name="probe"/> picks, and <paramref name="finish"/> turns the average into the reading (noise, offset, quantisation, overload).</summary>
    public void Arm(int samples, TimeSpan integration, TimeSpan period, TimeSpan overhead, Func<OperatingPoint, double> probe, Func<double, double> finish)
    {
        circuit.Cancel(_armed);
        _armed = [.. circuit.Arm(overhead, samples, period, integration, probe)];
        _finish = Enumerable.Repeat(finish, samples).ToArray();
        _ready = _armed.Count > 0 ? _armed[^1].End : clock.Now();
        _last = null;
    }

    /// <summary>Waits until the armed measurement is complete and returns its readings; without an arm, the last readings (-230 when there are none).</summary>
    public async ValueTask<double[]> FetchAsync(CancellationToken cancellationToken)
    {
        if (_armed.Count == 0)
        {
            return _last ?? throw new ScpiException(-230, "no measurement was initiated");
        }

        await WaitAsync(cancellationToken);
        var readings = new double[_armed.Count];
        for (var i = 0; i < readings.Length; i++)
        {
            readings[i] = _finish[i](circuit.Complete(_armed[i]));
        }

        _armed = [];
        _last = readings;
        return readings;
    }

    /// <summary>Waits until an armed measurement has finished integrating (for <c>*OPC?</c> and <c>*WAI</c>).</summary>
    public async ValueTask WaitAsync(CancellationToken cancellationToken)
    {
        if (_armed.Count == 0)
        {
            return;
        }

        while (clock.Now() < _ready)
        {
            await clock.WaitUntilAsync(_ready, cancellationToken);
        }
    }

    /// <summary>Drops any armed measurement and stored readings (<c>*RST</c>).</summary>
    public void Clear()
    {
        circuit.Cancel(_armed);
        _armed = [];
        _last = null;
    }

    /// <summary>Formats readings as comma-separated NR3 values.</summary>
    private static string Format(IEnumerable<double> readings) => string.Join(',', readings.Select(ScpiNumber.Nr3));

    /// <summary>Answers a fetch: waits for the armed readings and replies with them.</summary>
    public async ValueTask ReplyAsync(ScpiCall call)
    {
        ArgumentNullException.ThrowIfNull(call);
        call.Reply(Format(await FetchAsync(CancellationToken.None)));
    }
}

/// <summary>The arm-then-fetch commands every simulated meter serves the same way.</summary>
internal static class TriggeredCommands
{
    /// <summary>Adds <c>INITiate[:IMMediate]</c> (runs <paramref name="arm"/>) and the meter's FETCh? query, both without parameters.</summary>
    public static ScpiCommandSet AddArmAndFetch(this ScpiCommandSet commands, string fetchPattern, TriggeredMeasurement measurement, Action arm) => commands
        .Add("INITiate[:IMMediate]", c =>
        {
            c.Expect(0, 0);
            arm();
        })
        .Add(fetchPattern, async c =>
        {
            c.Expect(0, 0);
            await measurement.ReplyAsync(c);
        });
}

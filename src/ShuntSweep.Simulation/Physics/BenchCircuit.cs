namespace ShuntSweep.Simulation.Physics;

/// <summary>The one coupled circuit of the simulated bench: supply → wiring → reference shunt → UUT (with the voltmeter across its jacks) → CC load,
/// with the thermal state of every self-heating part integrated in time and every armed measurement averaged over its window.</summary>
/// <remarks>Thread-safe: every access advances the physics to the clock's present under one lock, so all instruments see one consistent history.</remarks>
internal sealed class BenchCircuit
{
    private const int BisectionSteps = 200;

    private readonly Lock _gate = new();
    private readonly Func<DateTimeOffset> _now;
    private readonly List<Window> _windows = [];
    private readonly List<(DateTimeOffset At, Action<BenchCircuit> Apply)> _events = [];
    private readonly Dictionary<UutRange, ThermalElement[]> _idleParts = [];
    private DateTimeOffset _time;

    // The operating point at _time, kept while nothing has changed since it was solved (a poll arms and fetches at instants the physics
    // was just brought to); any action run through At forgets it, since an action may change a setting.
    private OperatingPoint? _solved;

    /// <summary>Creates the circuit at the clock's present instant.</summary>
    public BenchCircuit(UutModel uut, double wiring, VoltmeterPhysics? dmm, ReferencePhysics? reference, SupplyPhysics supply, LoadPhysics load, Func<DateTimeOffset> now)
    {
        Uut = uut;
        Wiring = wiring;
        Dmm = dmm;
        Reference = reference;
        Supply = supply;
        Load = load;
        _now = now;
        _time = now();
        Start = _time;
    }

    /// <summary>The instant the simulation started.</summary>
    public DateTimeOffset Start { get; }

    /// <summary>The instant the physics has been integrated to.</summary>
    public DateTimeOffset Now => _time;

    /// <summary>The UUT.</summary>
    public UutModel Uut { get; }

    /// <summary>The loop wiring outside the voltmeter taps, in ohms.</summary>
    public double Wiring { get; }

    /// <summary>The voltmeter across the jacks, when the bench has one.</summary>
    public VoltmeterPhysics? Dmm { get; }

    /// <summary>The reference ammeter in series, when the bench has one.</summary>
    public ReferencePhysics? Reference { get; }

    /// <summary>The supply's physics.</summary>
    public SupplyPhysics Supply { get; }

    /// <summary>The load's physics.</summary>
    public LoadPhysics Load { get; }

    /// <summary>The supply's voltage setpoint.</summary>
    public double SupplySetpoint { get; set; }

    /// <summary>The supply's current limit.</summary>
    public double SupplyLimit { get; set; }

    /// <summary>Whether the supply's output is on.</summary>
    public bool SupplyOn { get; set; }

    /// <summary>The load's current setpoint.</summary>
    public double LoadSetpoint { get; set; }

    /// <summary>Whether the load's input is on.</summary>
    public bool LoadOn { get; set; }

    /// <summary>The voltmeter's present range (sets its input resistance).</summary>
    public double DmmRange { get; set; } = 10;

    /// <summary>Until when an injected fault keeps the load from conducting.</summary>
    public DateTimeOffset LoadFailedUntil { get; set; } = DateTimeOffset.MinValue;

    /// <summary>The current a faulty load sinks whatever its setpoint (a failed regulator), in amperes; null while it follows its setpoint.</summary>
    public double? LoadRunawayCurrent { get; set; }

    /// <summary>Runs <paramref name="action"/> on the circuit brought up to the present instant (a setting change or a read).</summary>
    public T At<T>(Func<BenchCircuit, T> action)
    {
        lock (_gate)
        {
            AdvanceTo(_now());
            try
            {
                return action(this);
            }
            finally
            {
                _solved = null;
            }
        }
    }

    /// <summary>Changes the circuit at the present instant, after integrating the history up to it.</summary>
    public void Change(Action<BenchCircuit> change) => At(c =>
    {
        change(c);
        return 0;
    });

    /// <summary>The operating point at the present instant (the one the advance to it solved).</summary>
    public OperatingPoint Present()
    {
        lock (_gate)
        {
            AdvanceTo(_now());
            return _solved ?? Solve();
        }
    }

    /// <summary>Sets the voltmeter's range at the present instant; the operating point is solved again only when the range changes
    /// (an autoranging voltmeter sets its range on every arm, mostly to the range it is on).</summary>
    public void SetDmmRange(double range)
    {
        lock (_gate)
        {
            AdvanceTo(_now());
            if (DmmRange != range)
            {
                DmmRange = range;
                _solved = null;
            }
        }
    }

    /// <summary>Schedules <paramref name="apply"/> at <paramref name="at"/> (a fault injected at a set time).</summary>
    public void Schedule(DateTimeOffset at, Action<BenchCircuit> apply)
    {
        lock (_gate)
        {
            _events.Add((at, apply));
            _events.Sort((a, b) => a.At.CompareTo(b.At));
        }
    }

    /// <summary>Arms <paramref name="count"/> averaging windows of <paramref name="length"/>, one per <paramref name="period"/>, the first
    /// <paramref name="delay"/> after the present instant, over the quantity <paramref name="probe"/> picks.</summary>
    /// <remarks>The windows are placed from the instant the physics has been brought to under the lock, never from a time read before it:
    /// on a clock that runs on its own (a served bench, faster than real time) a window placed from an earlier reading could start, or even
    /// end, before the physics it averages is integrated, and would average nothing.</remarks>
    public IReadOnlyList<Window> Arm(TimeSpan delay, int count, TimeSpan period, TimeSpan length, Func<OperatingPoint, double> probe)
    {
        lock (_gate)
        {
            AdvanceTo(_now());
            var start = _time + delay;
            var windows = Enumerable.Range(0, count).Select(k => new Window(start + (k * period), start + (k * period) + length, probe)).ToList();
            _windows.AddRange(windows);
            return windows;
        }
    }

    /// <summary>The average over a window whose end the clock has passed; the window is released.</summary>
    public double Complete(Window window)
    {
        ArgumentNullException.ThrowIfNull(window);
        lock (_gate)
        {
            AdvanceTo(_now());
            _windows.Remove(window);
            return window.Average;
        }
    }

    /// <summary>Forgets windows nobody will fetch (a reset, a new arm).</summary>
    public void Cancel(IEnumerable<Window> windows)
    {
        lock (_gate)
        {
            foreach (var w in windows)
            {
                _windows.Remove(w);
            }
        }
    }

    /// <summary>The voltmeter's input resistance across the jacks (infinite without a voltmeter).</summary>
    public double DmmInputResistance => Dmm?.InputResistanceOn(DmmRange) ?? double.PositiveInfinity;

    /// <summary>Solves the loop for the present thermal state.</summary>
    public OperatingPoint Solve()
    {
        var vs = SupplyOn ? SupplySetpoint : 0;
        var loadConducts = LoadOn && _time >= LoadFailedUntil;
        var iset = LoadRunawayCurrent ?? LoadSetpoint;
        if (!loadConducts || !SupplyOn || vs <= 0 || iset <= 0)
        {
            var holding = !LoadOn || iset <= 0 || (loadConducts && SupplyOn && vs > 0);
            return new OperatingPoint(0, 0, 0, 0, Uut.Selected.FrontEnd.Sensed(0), vs, vs, holding, false);
        }

        var external = Supply.OutputResistance + Wiring + (Reference?.Shunt ?? 0);
        var vmin = Load.MinimumVoltage;

        // Regulated: the load sinks exactly its setpoint if the supply can give it and the load keeps its minimum voltage.
        if (iset <= SupplyLimit && TrySolveForCurrent(iset, out var x))
        {
            var p = Branch(x);
            var vload = vs - (p.Total * external) - p.Jack;
            if (vload >= vmin)
            {
                return Point(p, vs - (p.Total * Supply.OutputResistance), vload, true, false);
            }
        }

        // Dropout: below its minimum voltage the load's current falls in proportion to its voltage (I = Iset·V/Vmin).
        var xd = Root(v =>
        {
            var total = BranchTotal(v, out var jack);
            return vs - (total * external) - jack - (vmin * total / iset);
        }, decreasing: true);
        var pd = Branch(xd);
        if (pd.Total <= SupplyLimit)
        {
            var vload = vmin * pd.Total / iset;
            return Point(pd, vs - (pd.Total * Supply.OutputResistance), vload, false, false);
        }

        // Current limit: the supply holds its limit and lowers its voltage; the load, short of current, sits in dropout.
        TrySolveForCurrent(SupplyLimit, out var xl);
        var pl = Branch(xl);
        var vl = vmin * pl.Total / iset;
        var vterm = (pl.Total * (Wiring + (Reference?.Shunt ?? 0))) + pl.Jack + vl;
        return Point(pl, vterm, vl, false, true);
    }

    private static OperatingPoint Point(BranchPoint p, double supplyVoltage, double loadVoltage, bool regulating, bool limited) =>
        new(p.Total, p.Uut, p.Jack, p.Shunt, p.Sensed, supplyVoltage, loadVoltage, regulating, limited);

    /// <summary>The UUT branch (and the voltmeter across it) as a function of one monotonic variable: the range voltage, or the jack voltage once the fuse is open.</summary>
    private BranchPoint Branch(double x)
    {
        var range = Uut.Selected;
        var total = BranchTotal(x, out var jack, out var iuut);
        return range.Jack.Fuse.IsOpen
            ? new BranchPoint(total, 0, x, 0, range.FrontEnd.Sensed(0))
            : new BranchPoint(total, iuut, jack, x, range.FrontEnd.Sensed(x));
    }

    /// <summary>The branch's total current and its jack voltage alone, which is all the root finders need (the sensed value is left out).</summary>
    private double BranchTotal(double x, out double jack) => BranchTotal(x, out jack, out _);

    private double BranchTotal(double x, out double jack, out double uut)
    {
        var range = Uut.Selected;
        var rin = DmmInputResistance;
        if (range.Jack.Fuse.IsOpen)
        {
            jack = x;
            uut = 0;
            return double.IsPositiveInfinity(rin) ? 0 : x / rin;
        }

        uut = range.CurrentAt(x);
        jack = x + (uut * (range.Jack.Fuse.Element.Resistance + range.Jack.Contacts));
        return uut + (double.IsPositiveInfinity(rin) ? 0 : jack / rin);
    }

    private bool TrySolveForCurrent(double target, out double x)
    {
        var lo = 0.0;
        var hi = 1e-3;
        while (BranchTotal(lo, out _) > target && lo > -1e7)
        {
            lo = (lo * 4) - 1e-3;
        }

        while (BranchTotal(hi, out _) < target)
        {
            hi *= 4;
            if (hi > 1e7)
            {
                x = hi;
                return false;
            }
        }

        x = Bisect(v => BranchTotal(v, out _) - target, lo, hi);
        return true;
    }

    private static double Root(Func<double, double> f, bool decreasing)
    {
        var lo = 0.0;
        var hi = 1e-3;
        double Sign(double v) => decreasing ? -f(v) : f(v);
        while (Sign(lo) > 0 && lo > -1e7)
        {
            lo = (lo * 4) - 1e-3;
        }

        while (Sign(hi) < 0 && hi < 1e7)
        {
            hi *= 4;
        }

        return Bisect(Sign, lo, hi);
    }

    /// <summary>The root of an increasing function on [<paramref name="lo"/>, <paramref name="hi"/>], bisected to machine precision.</summary>
    internal static double Bisect(Func<double, double> increasing, double lo, double hi)
    {
        for (var i = 0; i < BisectionSteps; i++)
        {
            var mid = 0.5 * (lo + hi);
            if (mid <= lo || mid >= hi)
            {
                break;
            }

            if (increasing(mid) < 0)
            {
                lo = mid;
            }
            else
            {
                hi = mid;
            }
        }

        return 0.5 * (lo + hi);
    }

    /// <summary>Integrates the thermal ODEs and the armed windows from the last update to <paramref name="target"/>.</summary>
    private void AdvanceTo(DateTimeOffset target)
    {
        var op = _solved ?? Solve();
        _solved = null;
        foreach (var w in _windows)
        {
            w.TakeInstant(_time, op);
        }

        while (_time < target)
        {
            var end = target;
            foreach (var (at, _) in _events)
            {
                if (at > _time && at < end)
                {
                    end = at;
                }
            }

            foreach (var w in _windows)
            {
                if (w.Start > _time && w.Start < end)
                {
                    end = w.Start;
                }

                if (w.End > _time && w.End < end)
                {
                    end = w.End;
                }
            }

            var range = Uut.Selected;
            var fuse = range.Jack.Fuse;
            var settled = (fuse.IsOpen || Math.Abs(fuse.Element.Rise - fuse.Element.SteadyRise(op.UutCurrent * op.UutCurrent * fuse.Element.Resistance)) < 1e-6)
                && range.FrontEnd.IsSettled(op.ShuntVoltage);
            var tau = Math.Min(fuse.IsOpen ? double.PositiveInfinity : fuse.Element.TimeConstant, range.FrontEnd.ShortestTimeConstant);
            var step = settled || double.IsPositiveInfinity(tau) ? (end - _time).TotalSeconds : Math.Min((end - _time).TotalSeconds, tau / 40);
            var next = step >= (end - _time).TotalSeconds ? end : _time + TimeSpan.FromTicks(Math.Max(1, (long)(step * TimeSpan.TicksPerSecond)));
            var dt = (next - _time).TotalSeconds;

            CoolIdleParts(range, dt);
            fuse.Advance(op.UutCurrent, dt);
            range.FrontEnd.Advance(op.ShuntVoltage, dt);

            var previous = op;
            var from = _time;
            _time = next;
            while (_events.Count > 0 && _events[0].At <= _time)
            {
                var e = _events[0];
                _events.RemoveAt(0);
                e.Apply(this);
            }

            op = Solve();
            foreach (var w in _windows)
            {
                w.Accumulate(from, _time, previous, op);
            }
        }

        _solved = op;
    }

    /// <summary>The parts of other ranges that <paramref name="selected"/> does not share, worked out once per range.</summary>
    private ThermalElement[] IdleParts(UutRange selected)
    {
        if (!_idleParts.TryGetValue(selected, out var idle))
        {
            var active = selected.FrontEnd.Parts;
            idle = [.. Uut.Ranges.SelectMany(r => r.FrontEnd.Parts).Distinct().Where(p => !active.Contains(p))];
            _idleParts.Add(selected, idle);
        }

        return idle;
    }

    /// <summary>Lets the parts that carry no current cool; with no power the exponential step is exact for any length of step.</summary>
    private void CoolIdleParts(UutRange selected, double dt)
    {
        foreach (var j in Uut.Jacks)
        {
            if (j != selected.Jack)
            {
                j.Fuse.Advance(0, dt);
            }
        }

        foreach (var p in IdleParts(selected))
        {
            p.Advance(0, dt);
        }
    }

    private readonly record struct BranchPoint(double Total, double Uut, double Jack, double Shunt, double Sensed);
}

/// <summary>An armed measurement's averaging window: the time integral of one quantity between its start and end.</summary>
internal sealed class Window(DateTimeOffset start, DateTimeOffset end, Func<OperatingPoint, double> probe)
{
    private double _integral;
    private double _seconds;
    private double _instant = double.NaN;

    /// <summary>The start of the window.</summary>
    public DateTimeOffset Start { get; } = start;

    /// <summary>The end of the window.</summary>
    public DateTimeOffset End { get; } = end;

    /// <summary>The average of the quantity over the window (its instantaneous value for a zero-length window).</summary>
    public double Average => _seconds > 0 ? _integral / _seconds : _instant;

    /// <summary>Records the value at <paramref name="time"/> if the window starts there (for zero-length windows).</summary>
    public void TakeInstant(DateTimeOffset time, OperatingPoint op)
    {
        if (time == Start && double.IsNaN(_instant))
        {
            _instant = probe(op);
        }
    }

    /// <summary>Adds the trapezoid of [<paramref name="from"/>, <paramref name="to"/>] that overlaps the window.</summary>
    public void Accumulate(DateTimeOffset from, DateTimeOffset to, OperatingPoint before, OperatingPoint after)
    {
        if (to == Start)
        {
            _instant = probe(after);
        }

        var a = from > Start ? from : Start;
        var b = to < End ? to : End;
        if (b <= a)
        {
            return;
        }

        var seconds = (b - a).TotalSeconds;
        var value = 0.5 * (probe(before) + probe(after));
        _integral += value * seconds;
        _seconds += seconds;
    }
}

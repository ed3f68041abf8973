using System.Globalization;

namespace ShuntSweep.Instruments.Tests.Support;

/// <summary>A tiny SCPI instrument for tests: stores settings by header, answers queries, keeps an error queue (SCPI-99 codes), and lets a test inject faults.</summary>
internal sealed class FakeInstrument
{
    private readonly Lock _gate = new();
    private readonly Queue<string> _errors = new();
    private readonly HashSet<string> _settable;

    public FakeInstrument(string identity, params string[] settable)
    {
        Identity = identity;
        _settable = new HashSet<string>(settable, StringComparer.OrdinalIgnoreCase);
    }

    public string Identity { get; }

    public Dictionary<string, string> State { get; } = new(StringComparer.OrdinalIgnoreCase);

    public Dictionary<string, Func<FakeInstrument, string>> Queries { get; } = new(StringComparer.OrdinalIgnoreCase);

    /// <summary>Checks a setting's parameter; false makes the command fail with -222 "Data out of range".</summary>
    public Dictionary<string, Func<string, bool>> Checks { get; } = new(StringComparer.OrdinalIgnoreCase);

    /// <summary>Returns a reply to use instead of the normal one, or null for normal behaviour.</summary>
    public Func<string, Reply?>? Fault { get; set; }

    public static FakeInstrument Supply() => new("Test Bench Co,PS-1,SN100,1.0", "SOUR:VOLT", "SOUR:CURR", "OUTP");

    public static FakeInstrument Load() => new("Test Bench Co,EL-2,SN200,1.0", "SOUR:FUNC", "SOUR:CURR", "INP");

    public static FakeInstrument Voltmeter() => new("Test Bench Co,DV-3,SN300,2.1", "CONF:VOLT:DC", "VOLT:DC:NPLC", "ZERO:AUTO", "SAMP:COUN", "TRIG:SOUR", "INIT");

    public static FakeInstrument CurrentMeter(string identity) => new(identity, "CONF:CURR:DC", "CURR:DC:NPLC", "INIT");

    public static string Nr3(double v) => v.ToString("+0.000000E+00;-0.000000E+00", CultureInfo.InvariantCulture);

    public void PushError(int code, string message)
    {
        lock (_gate)
        {
            _errors.Enqueue($"{code},\"{message}\"");
        }
    }

    public Reply Handle(string command)
    {
        if (Fault?.Invoke(command) is { } fault)
        {
            return fault;
        }

        lock (_gate)
        {
            var c = command.Trim();
            switch (c.ToUpperInvariant())
            {
                case "*IDN?":
                    return Reply.Line(Identity);
                case "SYST:ERR?":
                    return Reply.Line(_errors.Count > 0 ? _errors.Dequeue() : "0,\"No error\"");
                case "*CLS":
                    _errors.Clear();
                    return Reply.None;
                case "*OPC?":
                    return Reply.Line("1");
                case "*RST":
                    State.Clear();
                    return Reply.None;
            }

            if (c.EndsWith('?'))
            {
                if (Queries.TryGetValue(c, out var q))
                {
                    return Reply.Line(q(this));
                }

                if (State.TryGetValue(c[..^1], out var v))
                {
                    return Reply.Line(v);
                }

                _errors.Enqueue("-113,\"Undefined header\"");
                return Reply.None;
            }

            var space = c.IndexOf(' ', StringComparison.Ordinal);
            var header = space < 0 ? c : c[..space];
            var parameter = space < 0 ? string.Empty : c[(space + 1)..].Trim();
            if (!_settable.Contains(header))
            {
                _errors.Enqueue("-113,\"Undefined header\"");
                return Reply.None;
            }

            if (Checks.TryGetValue(header, out var check) && !check(parameter))
            {
                _errors.Enqueue("-222,\"Data out of range\"");
                return Reply.None;
            }

            State[header] = parameter;
            return Reply.None;
        }
    }
}

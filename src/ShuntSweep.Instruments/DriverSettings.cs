using System.IO.Ports;
using System.Text.RegularExpressions;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments;

/// <summary>Line settings of a serial instrument (bench file keys baud, parity, dataBits, stopBits, flowControl).</summary>
/// <param name="Baud">Bits per second; the default value is 9600.</param>
/// <param name="Parity">The parity bit; the default value is none.</param>
/// <param name="DataBits">Data bits per character, 5…8; the default value is 8.</param>
/// <param name="StopBits">Stop bits; the default value is one.</param>
/// <param name="FlowControl">Handshake; the default value is none.</param>
public sealed record SerialSettings(int Baud = 9600, Parity Parity = Parity.None, int DataBits = 8, StopBits StopBits = StopBits.One, Handshake FlowControl = Handshake.None);

/// <summary>A UUT that sends its display as lines of text (a serial "data out" stream), decoded by a pattern.</summary>
/// <param name="Pattern">A regular expression with a group <c>value</c> and optionally a group <c>unit</c> (A, mA, uA, µA, nA).</param>
/// <param name="Overload">A regular expression that, matching a line, means the display shows overload (for example <c>^ *OL\b</c>); null when none.</param>
/// <param name="ReadingInterval">How often the UUT sends a reading; a fetch waits for the first line after the arm.</param>
public sealed record StreamedReadingSettings(Regex Pattern, Regex? Overload, TimeSpan ReadingInterval);

/// <summary>The reference shunt a voltmeter reads across when the reference current is taken as V / R.</summary>
/// <param name="Resistance">The shunt's calibrated value.</param>
/// <param name="StandardUncertainty">The standard uncertainty of that value.</param>
public sealed record ReferenceShunt(Resistance Resistance, Resistance StandardUncertainty);

/// <summary>The driver settings of one instrument, read strictly from its mapping in the bench file.</summary>
/// <param name="Profile">The profile name or file.</param>
/// <param name="Session">Terminators, timeout, what to send after resynchronising.</param>
/// <param name="Timing">Line frequency, overhead and fetch margin of an integrating meter.</param>
/// <param name="Nplc">The integration time the UUT meter is set to (where its profile can set it), in power-line cycles.</param>
/// <param name="Serial">Serial line settings; null unless the bench file gives any.</param>
/// <param name="Resilience">Timeout, retries and circuit breaker of the instrument.</param>
/// <param name="Device">A device file that overrides the automatic mapping of a USB resource to /dev/usbtmcN.</param>
/// <param name="BaseDirectory">The directory of the bench file, against which relative profile paths are resolved.</param>
public sealed record DriverSettings(
    string Profile,
    SessionOptions Session,
    MeterTiming Timing,
    double Nplc,
    SerialSettings? Serial,
    Resilience.ResilienceSettings Resilience,
    string? Device,
    string? BaseDirectory)
{
    /// <summary>The settings used when nothing is configured (probe of a bare resource string).</summary>
    public static DriverSettings Default { get; } = new(Profiles.InstrumentProfile.DefaultName, new SessionOptions(), MeterTiming.Default, 1, null, Instruments.Resilience.ResilienceSettings.Default, null, null);

    /// <summary>How the UUT's reading is obtained, for the UUT role; null means a SCPI meter.</summary>
    public StreamedReadingSettings? StreamedReading { get; init; }

    /// <summary>True when the operator types the UUT's reading.</summary>
    public bool TypedByOperator { get; init; }

    /// <summary>The reference shunt, when the reference is a voltmeter across it.</summary>
    public ReferenceShunt? Shunt { get; init; }

    /// <summary>Reads the settings of an instrument mapping (whose <c>resource</c> was already read) and rejects unknown keys.</summary>
    /// <param name="map">The instrument's mapping in the bench file.</param>
    /// <param name="baseDirectory">The bench file's directory, for relative profile paths.</param>
    /// <param name="role">The instrument's role, which decides what <c>kind</c> may be; null for a role-less probe.</param>
    public static DriverSettings Read(MappingReader map, string? baseDirectory, InstrumentRole? role = null)
    {
        ArgumentNullException.ThrowIfNull(map);
        var kind = role switch
        {
            InstrumentRole.UutMeter => map.Choice("kind", "scpi", "scpi", "stream", "operator"),
            InstrumentRole.Reference => map.Choice("kind", "ammeter", "ammeter", "shunt"),
            _ => map.Optional("kind") is { } k ? throw k.Error($"{k.What}: only the uutMeter and reference roles have a kind.") : "scpi",
        };
        StreamedReadingSettings? streamed = null;
        if (kind == "stream")
        {
            var patternNode = map.Required("pattern");
            var regex = Pattern(patternNode);

            if (!regex.GetGroupNames().Contains("value"))
            {
                throw patternNode.Error($"{patternNode.What}: the pattern needs a group named 'value', for example '(?<value>[-+]?[0-9.]+) *(?<unit>[munµ]?A)'.");
            }

            var overload = map.Optional("overload") is { } o ? Pattern(o) : null;
            var interval = map.QuantityOr("readingInterval", SiUnit.Second, 0.5, Allowed.UpTo(3600, SiUnit.Second));
            streamed = new StreamedReadingSettings(regex, overload, TimeSpan.FromSeconds(interval));
        }

        ReferenceShunt? shunt = null;
        if (kind == "shunt")
        {
            var ohms = map.Quantity("shunt", SiUnit.Ohm);
            var u = map.QuantityOr("shuntUncertainty", SiUnit.Ohm, 0);
            if (ohms <= 0 || u < 0)
            {
                throw map.Required("shunt").Error($"{map.What}.shunt: must be > 0 Ω with shuntUncertainty ≥ 0 Ω.");
            }

            shunt = new ReferenceShunt(new Resistance(ohms), new Resistance(u));
        }

        var profile = map.StringOr("profile", Profiles.InstrumentProfile.DefaultName)!;
        var timeout = map.QuantityOr("timeout", SiUnit.Second, 2);
        if (timeout <= 0 || timeout > 3600)
        {
            throw map.Required("timeout").Error($"{map.What}.timeout: {timeout} s is outside 1 ms…1 h.");
        }

        var termination = Terminator(map.Choice("termination", "lf", "lf", "crlf", "cr"));
        var read = map.Optional("readTermination") is null ? termination : Terminator(map.Choice("readTermination", "lf", "lf", "crlf", "cr"));
        var write = map.Optional("writeTermination") is null ? termination : Terminator(map.Choice("writeTermination", "lf", "lf", "crlf", "cr"));

        var lineFrequency = map.QuantityOr("lineFrequency", SiUnit.Hertz, 50);
        if (lineFrequency is not (>= 10 and <= 1000))
        {
            throw map.Required("lineFrequency").Error($"{map.What}.lineFrequency: {lineFrequency} Hz is not a mains frequency (expected 50 Hz or 60 Hz).");
        }

        var overhead = map.QuantityOr("overhead", SiUnit.Second, 0.010, Allowed.Between(0, 60, SiUnit.Second));
        var margin = map.Optional("timeoutMargin")?.AsQuantity(SiUnit.None) ?? 2;
        if (overhead < 0 || margin < 1)
        {
            throw map.Error($"{map.What}: overhead must be ≥ 0 s and timeoutMargin ≥ 1.");
        }

        var nplc = map.Optional("nplc")?.AsQuantity(SiUnit.None) ?? 1;
        if (nplc <= 0)
        {
            throw map.Required("nplc").Error($"{map.What}.nplc: must be greater than 0.");
        }

        var serial = ReadSerial(map);
        var device = map.StringOr("device", null);
        var resilience = Instruments.Resilience.ResilienceSettings.Read(map.Mapping("resilience"));
        map.Finish();

        var session = new SessionOptions
        {
            Timeout = TimeSpan.FromSeconds(timeout),
            ReadTermination = read,
            WriteTermination = write,
        };
        return new DriverSettings(profile, session, new MeterTiming(lineFrequency, TimeSpan.FromSeconds(overhead), margin), nplc, serial, resilience, device, baseDirectory)
        {
            StreamedReading = streamed,
            TypedByOperator = kind == "operator",
            Shunt = shunt,
        };
    }

    private static readonly string[] SerialKeys = ["baud", "parity", "dataBits", "stopBits", "flowControl"];

    private static SerialSettings? ReadSerial(MappingReader map)
    {
        var given = SerialKeys.Any(k => map.Optional(k) is not null);
        if (!given)
        {
            return null;
        }

        var baud = map.IntOr("baud", 9600, 50, 4_000_000);
        var parity = map.Choice("parity", "none", "none", "odd", "even", "mark", "space") switch
        {
            "odd" => Parity.Odd,
            "even" => Parity.Even,
            "mark" => Parity.Mark,
            "space" => Parity.Space,
            _ => Parity.None,
        };
        var dataBits = map.IntOr("dataBits", 8, 5, 8);
        var stopBits = map.Choice("stopBits", "1", "1", "1.5", "2") switch
        {
            "1.5" => StopBits.OnePointFive,
            "2" => StopBits.Two,
            _ => StopBits.One,
        };
        var flow = map.Choice("flowControl", "none", "none", "xonxoff", "rtscts") switch
        {
            "xonxoff" => Handshake.XOnXOff,
            "rtscts" => Handshake.RequestToSend,
            _ => Handshake.None,
        };
        return new SerialSettings(baud, parity, dataBits, stopBits, flow);
    }

    private static Regex Pattern(NodeReader node)
    {
        try
        {
            return new Regex(node.AsString(), RegexOptions.CultureInvariant, TimeSpan.FromMilliseconds(100));
        }
        catch (ArgumentException ex)
        {
            throw node.Error($"{node.What}: not a valid regular expression: {ex.Message}");
        }
    }

    private static string Terminator(string word) => word switch
    {
        "crlf" => "\r\n",
        "cr" => "\r",
        _ => "\n",
    };
}

using ShuntSweep.Core.Bench;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments;

/// <summary>How long each meter of a bench takes per reading, from the bench file's driver settings alone (nothing is connected), counted
/// as the drivers count it, so that a plan's estimate and the connected run agree.</summary>
/// <remarks>An integrating meter takes NPLC / line frequency plus its <c>overhead</c> per reading; a UUT read over SCPI is not set to an NPLC,
/// so it takes one line cycle plus its <c>overhead</c> (its update interval); a streamed UUT its <c>readingInterval</c>; a UUT read by the
/// operator nothing the bench waits for. The supply's and the load's <c>overhead</c> is their time per command; a profile adds its gap
/// between commands and each operation's processing time, except on an in-process simulated bench, whose virtual time they do not take.</remarks>
public sealed class BenchTiming
{
    private readonly Meter _drop;
    private readonly Meter? _tap;
    private readonly Meter? _reference;

    private BenchTiming(Meter drop, Meter? tap, TimeSpan? uut, Meter? reference, TimeSpan supplyQuery, TimeSpan loadSetpoint, TimeSpan loadQuery)
    {
        _drop = drop;
        _tap = tap;
        Uut = uut;
        _reference = reference;
        SupplyQuery = supplyQuery;
        LoadSetpoint = loadSetpoint;
        LoadQuery = loadQuery;
    }

    /// <summary>One reading of the UUT; null when the bench has no UUT meter.</summary>
    public TimeSpan? Uut { get; }

    /// <summary>One query of the supply: its <c>overhead</c> and its profile's gap between commands.</summary>
    public TimeSpan SupplyQuery { get; }

    /// <summary>Setting the load's current: its <c>overhead</c>, the profile's processing time of the setting, and the error check after it.</summary>
    public TimeSpan LoadSetpoint { get; }

    /// <summary>One query of the load.</summary>
    public TimeSpan LoadQuery { get; }

    /// <summary>The commands around an operator prompt: outputs off and on again, the supply's current limit set and read back.</summary>
    public TimeSpan Rewiring { get; private init; }

    /// <summary>Selecting a range on a UUT read over its interface.</summary>
    public TimeSpan RangeEntry { get; private init; }

    /// <summary>Reads the timing of <paramref name="bench"/>'s instruments from their driver settings and profiles.</summary>
    public static BenchTiming Of(BenchDescription bench)
    {
        ArgumentNullException.ThrowIfNull(bench);
        var baseDirectory = bench.File.Length == 0 ? null : Path.GetDirectoryName(Path.GetFullPath(bench.File));

        // In-process simulated instruments keep a profile's pacing on the wall clock only: it costs no bench time there, nor do settings.
        var paced = !bench.IsSimulated;
        TimeSpan Gap(InstrumentProfile profile) => paced ? profile.InterCommandDelay : TimeSpan.Zero;
        TimeSpan Processing(InstrumentProfile profile, string operation) =>
            paced && profile.Supports(operation) ? profile.Operation(operation).ProcessingTime : TimeSpan.Zero;
        (DriverSettings Settings, InstrumentProfile Profile)? Of(InstrumentRole role)
        {
            if (!bench.Instruments.TryGetValue(role, out var entry))
            {
                return null;
            }

            var settings = DriverSettings.Read(entry.Settings, baseDirectory, role);
            return (settings, InstrumentProfile.Load(settings.Profile, settings.BaseDirectory));
        }

        Meter? MeterOf(InstrumentRole role) => Of(role) is { } m ? new Meter(m.Settings.Timing, 2 * Gap(m.Profile)) : null;

        // A UUT read over SCPI is armed and fetched like a meter but not set to an NPLC: one line cycle and its overhead.
        var uutMeter = Of(InstrumentRole.UutMeter);
        TimeSpan? uut = uutMeter switch
        {
            null => null,
            { Settings.TypedByOperator: true } => TimeSpan.Zero,
            { Settings.StreamedReading: { } streamed } => streamed.ReadingInterval,
            { } scpi => scpi.Settings.Timing.MeasurementTime(1, 1) + (2 * Gap(scpi.Profile)),
        };
        var supply = Of(InstrumentRole.Supply);
        var load = Of(InstrumentRole.Load);
        TimeSpan Query((DriverSettings Settings, InstrumentProfile Profile)? i) => i is { } x ? x.Settings.Timing.OverheadTime + Gap(x.Profile) : TimeSpan.Zero;

        // A setting: the command and the processing its profile gives it, then the error check after it. The in-process simulator applies
        // settings at once, in no bench time; only its readings and readbacks take time there.
        TimeSpan Setting((DriverSettings Settings, InstrumentProfile Profile)? i, string operation) =>
            paced && i is { } x && x.Profile.Supports(operation) ? Query(i) + Processing(x.Profile, operation) + Query(i) : TimeSpan.Zero;

        // Around an operator prompt both outputs go off and on again, and the supply's current limit is set and read back for the jack.
        var rewiring = paced
            ? (2 * (Setting(supply, "supply.setOutput") + Setting(load, "load.setInput"))) + Setting(supply, "supply.setCurrentLimit") + Query(supply) + Setting(load, "load.setCurrent")
            : TimeSpan.Zero;
        return new BenchTiming(MeterOf(InstrumentRole.DropMeter) ?? new Meter(MeterTiming.Default, TimeSpan.Zero), MeterOf(InstrumentRole.ShuntTap), uut, MeterOf(InstrumentRole.Reference), Query(supply), Setting(load, "load.setCurrent"), Query(load))
        {
            Rewiring = rewiring,
            // A UUT's overhead is its update interval, not a command's time: selecting a range costs the processing its profile gives it.
            RangeEntry = uutMeter is { Settings.StreamedReading: null, Settings.TypedByOperator: false } u
                ? Processing(u.Profile, "uut.selectRange") + (2 * Gap(u.Profile))
                : TimeSpan.Zero,
        };
    }

    /// <summary>One reading of the drop (and of the shunt tap, read with it, where the bench has one) at <paramref name="nplc"/>.</summary>
    public TimeSpan Drop(double nplc)
    {
        var drop = _drop.Reading(nplc);
        return _tap is { } tap ? Max(drop, tap.Reading(nplc)) : drop;
    }

    /// <summary>One reading of the reference ammeter at <paramref name="nplc"/>; null when the bench has none.</summary>
    public TimeSpan? Reference(double nplc) => _reference?.Reading(nplc);

    private static TimeSpan Max(TimeSpan a, TimeSpan b) => a > b ? a : b;

    /// <summary>An integrating meter: its timing, and the gaps its profile wants around the arm and the fetch.</summary>
    private sealed record Meter(MeterTiming Timing, TimeSpan Gaps)
    {
        public TimeSpan Reading(double nplc) => Timing.MeasurementTime(nplc, 1) + Gaps;
    }
}

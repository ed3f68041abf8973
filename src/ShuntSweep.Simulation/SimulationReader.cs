using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;
using ShuntSweep.Simulation.Faults;
using ShuntSweep.Simulation.FrontEnds;
using ShuntSweep.Simulation.Physics;

namespace ShuntSweep.Simulation;

/// <summary>Everything the simulation section of a bench file describes, built into models.</summary>
internal sealed record SimulationSettings(
    double AmbientCelsius,
    UutModel Uut,
    SupplyPhysics Supply,
    LoadPhysics Load,
    VoltmeterPhysics? Dmm,
    VoltmeterPhysics? Tap,
    ReferencePhysics? Reference,
    IReadOnlyList<IFault> Faults);

/// <summary>Reads the bench file's <c>simulation</c> section strictly (every mapping is finished, so a misspelt key is an error with its position).</summary>
/// <remarks>Anything the section leaves out gets a plausible default derived from the UUT's specification; per-unit errors and
/// tolerances are drawn from the UUT's serial number, so one serial is one unit whatever the seed (which draws the noise).</remarks>
internal static class SimulationReader
{
    /// <summary>The SIM:: names the simulator serves, in port order.</summary>
    public static readonly string[] Served = ["supply", "load", "dmm", "uut", "ref", "tap"];

    /// <summary>Builds the simulation of <paramref name="bench"/>; its unit's parts follow from the UUT's serial number.</summary>
    public static SimulationSettings Read(BenchDescription bench)
    {
        ArgumentNullException.ThrowIfNull(bench);
        var map = bench.Simulation;
        var served = bench.Instruments.Values
            .Select(i => i.Resource)
            .Where(r => r.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase))
            .Select(r => r[5..].ToLowerInvariant())
            .ToList();
        foreach (var entry in bench.Instruments.Values.Where(i => i.Resource.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase)))
        {
            var name = entry.Resource[5..].ToLowerInvariant();
            if (!Served.Contains(name))
            {
                throw new DocumentException(bench.File, entry.Settings.Line, entry.Settings.Column, $"instruments.{BenchReader.KeyOf(entry.Role)}: unknown simulated instrument '{entry.Resource}'; expected one of {string.Join(", ", Served.Select(s => "SIM::" + s))}.");
            }
        }

        var ambient = map?.QuantityOr("ambient", SiUnit.Celsius, 23, Allowed.Temperature) ?? 23;
        var line = map?.QuantityOr("lineFrequency", SiUnit.Hertz, 50, LineFrequency) ?? 50;
        var uut = ReadUut(bench.Uut, map?.Mapping("uut"), ambient);

        var s = map?.Mapping("supply");
        var supply = new SupplyPhysics(
            Identity(s, "ShuntSweep,SIM-SUPPLY,SUP-0001,1.0"),
            s?.QuantityOr("outputResistance", SiUnit.Ohm, 0.002, Allowed.NonNegative(SiUnit.Ohm)) ?? 0.002,
            s?.QuantityOr("maxVoltage", SiUnit.Volt, Math.Max(60, bench.Supply.Voltage.Volts), Allowed.Positive(SiUnit.Volt)) ?? Math.Max(60, bench.Supply.Voltage.Volts),
            s?.QuantityOr("maxCurrent", SiUnit.Ampere, Math.Max(10, bench.Supply.CurrentLimit.Amperes), Allowed.Positive(SiUnit.Ampere)) ?? Math.Max(10, bench.Supply.CurrentLimit.Amperes),
            s?.QuantityOr("readbackTime", SiUnit.Second, 0.02, MeasurementTime) ?? 0.02,
            s?.QuantityOr("voltageNoise", SiUnit.Volt, 1e-4, Allowed.NonNegative(SiUnit.Volt)) ?? 1e-4,
            s?.QuantityOr("currentNoise", SiUnit.Ampere, 1e-5, Allowed.NonNegative(SiUnit.Ampere)) ?? 1e-5);
        s?.Finish();

        var l = map?.Mapping("load");
        var load = new LoadPhysics(
            Identity(l, "ShuntSweep,SIM-LOAD,LD-0001,1.0"),
            l?.QuantityOr("minimumVoltage", SiUnit.Volt, bench.Load.MinimumVoltage.Volts, Allowed.NonNegative(SiUnit.Volt)) ?? bench.Load.MinimumVoltage.Volts,
            l?.QuantityOr("maxCurrent", SiUnit.Ampere, bench.Load.MaxCurrent.Amperes, Allowed.Positive(SiUnit.Ampere)) ?? bench.Load.MaxCurrent.Amperes,
            l?.QuantityOr("readbackTime", SiUnit.Second, 0.02, MeasurementTime) ?? 0.02,
            l?.QuantityOr("voltageNoise", SiUnit.Volt, 1e-4, Allowed.NonNegative(SiUnit.Volt)) ?? 1e-4,
            l?.QuantityOr("currentNoise", SiUnit.Ampere, 1e-5, Allowed.NonNegative(SiUnit.Ampere)) ?? 1e-5);
        l?.Finish();

        var dmm = ReadVoltmeter(map, "dmm", served, "ShuntSweep,SIM-DMM,DMM-0001,1.0", line, loadsTheCircuit: true);
        var tap = ReadVoltmeter(map, "tap", served, "ShuntSweep,SIM-DMM,DMM-0002,1.0", line, loadsTheCircuit: false);

        var r = map?.Mapping("ref");
        ReferencePhysics? reference = null;
        if (served.Contains("ref"))
        {
            reference = new ReferencePhysics(
                Identity(r, "ShuntSweep,SIM-REF,REF-0001,1.0"),
                r?.QuantityOr("shunt", SiUnit.Ohm, 0.01, Allowed.Positive(SiUnit.Ohm)) ?? 0.01,
                r?.QuantityOr("noiseAt1Plc", SiUnit.None, 0.5e-6, Allowed.NonNegative(SiUnit.None)) ?? 0.5e-6,
                r?.QuantityOr("gainError", SiUnit.None, 0, GainError) ?? 0,
                r?.QuantityOr("overhead", SiUnit.Second, 0.002, MeasurementTime) ?? 0.002,
                line);
        }

        r?.Finish();

        var faults = FaultReader.Read(map?.List("faults") ?? [], served, uut);
        map?.Finish();
        return new SimulationSettings(ambient, uut, supply, load, dmm, tap, reference, faults);
    }

    /// <summary>The physics of the voltmeter served as <c>SIM::name</c> (the drop meter, or the tap across the shunt); null when the bench does not use it.</summary>
    /// <remarks>Only a meter that loads the circuit (the drop meter) has input-resistance keys; the tap's are rejected as unknown.</remarks>
    private static VoltmeterPhysics? ReadVoltmeter(MappingReader? section, string name, List<string> served, string identity, double line, bool loadsTheCircuit)
    {
        var d = section?.Mapping(name);
        VoltmeterPhysics? physics = null;
        if (served.Contains(name))
        {
            physics = new VoltmeterPhysics(
                Identity(d, identity),
                loadsTheCircuit ? d?.QuantityOr("inputResistance", SiUnit.Ohm, 10e6, Allowed.Positive(SiUnit.Ohm)) ?? 10e6 : double.PositiveInfinity,
                loadsTheCircuit ? d?.QuantityOrNull("highImpedance", SiUnit.Ohm, Allowed.Positive(SiUnit.Ohm)) : null,
                d?.QuantityOr("noiseAt1Plc", SiUnit.Volt, 1e-6, Allowed.NonNegative(SiUnit.Volt)) ?? 1e-6,
                d?.QuantityOr("noiseFloor", SiUnit.Volt, 5e-8, Allowed.NonNegative(SiUnit.Volt)) ?? 5e-8,
                d?.QuantityOr("offsetAutoZeroOn", SiUnit.Volt, 2e-7, Finite(SiUnit.Volt)) ?? 2e-7,
                d?.QuantityOr("offsetAutoZeroOff", SiUnit.Volt, 3e-6, Finite(SiUnit.Volt)) ?? 3e-6,
                d?.QuantityOr("overhead", SiUnit.Second, 0.002, MeasurementTime) ?? 0.002,
                d?.QuantityOr("counts", SiUnit.None, 1.2e7, Allowed.Between(1, 1e12, SiUnit.None) with { Text = "from 1 to 10¹² counts" }) ?? 1.2e7,
                line);
        }

        d?.Finish();
        return physics;
    }

    /// <summary>A mains frequency: 50 Hz or 60 Hz as a rule, any other positive value up to 1 kHz when written out (400 Hz aircraft supplies, say).</summary>
    private static readonly Allowed LineFrequency = Allowed.UpTo(1000, SiUnit.Hertz) with { Text = "50 Hz or 60 Hz (or another mains frequency above 0 Hz and at most 1 kHz)" };

    /// <summary>A measurement's dead time or readback time: 0 s to 1 min.</summary>
    private static readonly Allowed MeasurementTime = Allowed.Between(0, 60, SiUnit.Second);

    /// <summary>A relative tolerance drawn per unit: 0 % to 50 %.</summary>
    private static readonly Allowed Tolerance = Allowed.Between(0, 0.5, SiUnit.None) with { Text = "from 0 % to 50 %" };

    /// <summary>A temperature coefficient of resistance: within ±0.1 /K (metals are of order 0.004 /K).</summary>
    private static readonly Allowed Alpha = Allowed.Between(-0.1, 0.1, SiUnit.None) with { Text = "from -0.1 /K to 0.1 /K" };

    /// <summary>A thermal resistance to ambient: zero (no self-heating) or more, in K/W.</summary>
    private static readonly Allowed ThermalResistance = Allowed.NonNegative(SiUnit.None) with { Text = "≥ 0 K/W" };

    /// <summary>A gain error: above −100 % (a reading cannot change sign) and at most +100 %.</summary>
    private static readonly Allowed GainError = new(-1, 1, true, "above -100 % and at most 100 %");

    /// <summary>Any finite value (an offset of either sign).</summary>
    private static Allowed Finite(SiUnit unit) => new(double.MinValue, double.MaxValue, false, $"a finite value in {QuantityFormatter.Format(1, unit)[2..]}");

    private static string Identity(MappingReader? map, string fallback)
    {
        var node = map?.Optional("identity");
        if (node is not { } n)
        {
            return fallback;
        }

        var text = n.AsString();
        return text.Split(',').Length == 4 && !text.Contains('\n', StringComparison.Ordinal) && !text.Contains(';', StringComparison.Ordinal)
            ? text
            : throw n.Error($"{n.What}: expected four comma-separated fields 'maker,model,serial,firmware', found '{text}'.");
    }

    private static UutModel ReadUut(UutDescription description, MappingReader? map, double ambient)
    {
        var jacksMap = map?.Mapping("jacks");
        Known(jacksMap, description.Jacks.Select(j => j.Name), "jack");
        var jacks = new List<UutJack>();
        var rings = new Dictionary<string, Dictionary<string, ThermalElement>>();
        foreach (var spec in description.Jacks)
        {
            var jm = jacksMap?.Mapping(spec.Name);
            var random = SeededRandom.ForUnit(description.Serial, "fuse:" + spec.Name);
            var fm = jm?.Mapping("fuse");
            var rating = spec.FuseRating.Amperes;
            var r0 = (fm?.QuantityOr("coldResistance", SiUnit.Ohm, 0.1 / rating, Allowed.Positive(SiUnit.Ohm)) ?? (0.1 / rating)) * (1 + ((fm?.QuantityOr("tolerance", SiUnit.None, 0, Tolerance) ?? 0) * random.NextSigned()));
            var alpha = fm?.QuantityOr("alpha", SiUnit.None, 0.0039, Alpha) ?? 0.0039;

            // By default the element runs away thermally (α·R_th·R0·I² = 1) at twice its rating.
            var rth = fm?.QuantityOr("thermalResistance", SiUnit.None, 1 / (alpha * r0 * 4 * rating * rating), ThermalResistance) ?? (1 / (alpha * r0 * 4 * rating * rating));
            var tau = fm?.QuantityOr("timeConstant", SiUnit.Second, 1, Allowed.Positive(SiUnit.Second)) ?? 1;
            var melt = fm?.QuantityOr("meltingPoint", SiUnit.Celsius, 960, Allowed.Temperature with { Min = ambient, Text = $"above the ambient of {ambient.ToString(System.Globalization.CultureInfo.InvariantCulture)} °C" }) ?? 960;
            var i2t = fm?.QuantityOr("preArcingI2t", SiUnit.None, 100 * rating * rating * 0.01, Allowed.Positive(SiUnit.None) with { Text = "> 0 A²s" }) ?? (100 * rating * rating * 0.01);
            fm?.Finish();
            var fuse = new Fuse(new ThermalElement(r0, alpha, rth, tau), rating, ambient, melt, i2t);

            var ring = new Dictionary<string, ThermalElement>(StringComparer.Ordinal);
            if (jm?.Mapping("ring") is { } rm)
            {
                var ringAlpha = rm.QuantityOr("alpha", SiUnit.None, 15e-6, Alpha);
                var ringRth = rm.QuantityOr("thermalResistance", SiUnit.None, 0, ThermalResistance);
                var ringTau = rm.QuantityOr("timeConstant", SiUnit.Second, 10, Allowed.Positive(SiUnit.Second));
                var sections = rm.Mapping("sections") ?? throw rm.Error($"{rm.What}: 'sections' (name: resistance) is required.");
                foreach (var (name, value) in sections.Entries())
                {
                    ring[name] = new ThermalElement(value.AsQuantity(SiUnit.Ohm, Allowed.Positive(SiUnit.Ohm)), ringAlpha, ringRth, ringTau);
                }

                sections.Finish();
                rm.Finish();
            }

            rings[spec.Name] = ring;
            jacks.Add(new UutJack(spec, fuse, jm?.QuantityOr("contacts", SiUnit.Ohm, 0.002, Allowed.NonNegative(SiUnit.Ohm)) ?? 0.002));
            jm?.Finish();
        }

        var kelvins = ambient + PhysicalConstants.ZeroCelsius;
        var rangesMap = map?.Mapping("ranges");
        Known(rangesMap, description.Ranges.Select(r => r.Name), "range");
        var ranges = new List<UutRange>();
        foreach (var spec in description.Ranges)
        {
            var rm = rangesMap?.Mapping(spec.Name);
            var random = SeededRandom.ForUnit(description.Serial, "range:" + spec.Name);
            var jack = jacks.First(j => j.Spec.Name == spec.Jack);
            var frontEnd = FrontEnd(spec, rm, rings[spec.Jack], random);
            ClampDiodes? diodes = null;
            if (rm?.Mapping("diodes") is { } dm)
            {
                diodes = new ClampDiodes(
                    dm.Quantity("saturationCurrent", SiUnit.Ampere, Allowed.Positive(SiUnit.Ampere)),
                    dm.QuantityOr("ideality", SiUnit.None, 1.9, Allowed.Between(0.5, 10, SiUnit.None)),
                    dm.IntOr("series", 1, 1, 10),
                    kelvins);
                dm.Finish();
            }

            var gain = rm?.QuantityOrNull("gainError", SiUnit.None, GainError) ?? (0.5 * spec.Accuracy.FractionOfReading * random.NextSigned());
            var offset = rm?.QuantityOrNull("offset", SiUnit.Ampere, Finite(SiUnit.Ampere)) ?? (0.5 * spec.Accuracy.Counts * spec.Resolution.Amperes * random.NextSigned());
            var noise = rm?.QuantityOr("noise", SiUnit.None, 0.3, Allowed.NonNegative(SiUnit.None) with { Text = "≥ 0 counts" }) ?? 0.3;
            rm?.Finish();
            ranges.Add(new UutRange(spec, jack, frontEnd, diodes, gain, offset, noise));
        }

        var firmware = map?.StringOr("firmware", "1.0") ?? "1.0";
        var readingTime = map?.QuantityOr("readingTime", SiUnit.Second, 0.3, Allowed.UpTo(60, SiUnit.Second)) ?? 0.3;
        map?.Finish();
        return new UutModel(description, jacks, ranges, firmware, readingTime);
    }

    private static IFrontEnd FrontEnd(RangeSpec spec, MappingReader? rm, Dictionary<string, ThermalElement> ring, SeededRandom random)
    {
        if (rm?.Mapping("feedback") is { } fb)
        {
            var feedback = new FeedbackFrontEnd(
                fb.Quantity("resistance", SiUnit.Ohm, Allowed.Positive(SiUnit.Ohm)),
                fb.Quantity("openLoopGain", SiUnit.None, Allowed.Positive(SiUnit.None)),
                fb.Quantity("outputSwing", SiUnit.Volt, Allowed.Positive(SiUnit.Volt)),
                fb.QuantityOr("inputOffset", SiUnit.Volt, 0, Finite(SiUnit.Volt)));
            fb.Finish();
            if (rm.Optional("shunt") is { } extra)
            {
                throw extra.Error($"{extra.What}: a range has either a 'shunt' or a 'feedback' amplifier, not both.");
            }

            return feedback;
        }

        var tolerance = rm?.QuantityOr("tolerance", SiUnit.None, 0, Tolerance) ?? 0;
        var alpha = rm?.QuantityOr("alpha", SiUnit.None, 15e-6, Alpha) ?? 15e-6;
        var rth = rm?.QuantityOr("thermalResistance", SiUnit.None, 0, ThermalResistance) ?? 0;
        var tau = rm?.QuantityOr("timeConstant", SiUnit.Second, 10, Allowed.Positive(SiUnit.Second)) ?? 10;
        ShuntFrontEnd shunt;
        var sectionsNode = rm?.Optional("sections");
        if (sectionsNode is { } sn)
        {
            var parts = sn.AsSequence().Select(n => ring.TryGetValue(n.AsString(), out var e)
                ? e
                : throw n.Error($"{n.What}: jack '{spec.Jack}' has no ring section '{n.AsString()}' (it has {string.Join(", ", ring.Keys)}).")).ToList();
            shunt = new ShuntFrontEnd(parts);
        }
        else
        {
            var nominal = rm?.QuantityOrNull("shunt", SiUnit.Ohm, Allowed.Positive(SiUnit.Ohm)) ?? spec.NominalShunt?.Ohms
                ?? (spec.BurdenAtFullScale?.Volts ?? 0.2) / spec.FullScale.Amperes;
            shunt = new ShuntFrontEnd([new ThermalElement(nominal * (1 + (tolerance * random.NextSigned())), alpha, rth, tau)]);
        }

        if (rm?.Mapping("amplifier") is { } am)
        {
            var amplified = new AmplifiedShuntFrontEnd(
                shunt,
                am.Quantity("gain", SiUnit.None, Allowed.Positive(SiUnit.None)),
                am.QuantityOr("inputOffset", SiUnit.Volt, 0, Finite(SiUnit.Volt)),
                am.Quantity("outputSwing", SiUnit.Volt, Allowed.Positive(SiUnit.Volt)));
            am.Finish();
            return amplified;
        }

        return shunt;
    }

    private static void Known(MappingReader? map, IEnumerable<string> names, string what)
    {
        if (map is null)
        {
            return;
        }

        var known = names.ToList();
        foreach (var (key, value) in map.Entries())
        {
            if (!known.Contains(key))
            {
                throw value.Error($"{map.What}: the UUT has no {what} '{key}'; it has {string.Join(", ", known)}.");
            }
        }
    }
}

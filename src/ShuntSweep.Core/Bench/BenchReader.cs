using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Core.Bench;

/// <summary>Reads a bench file strictly; the <c>simulation</c> section and each instrument's settings are kept for their own layers to read.</summary>
public static class BenchReader
{
    private static readonly Dictionary<string, InstrumentRole> RoleKeys = new(StringComparer.Ordinal)
    {
        ["supply"] = InstrumentRole.Supply,
        ["load"] = InstrumentRole.Load,
        ["dropMeter"] = InstrumentRole.DropMeter,
        ["uutMeter"] = InstrumentRole.UutMeter,
        ["reference"] = InstrumentRole.Reference,
        ["shuntTap"] = InstrumentRole.ShuntTap,
    };

    /// <summary>The key a role has in the <c>instruments</c> mapping of a bench file.</summary>
    public static string KeyOf(InstrumentRole role) => RoleKeys.First(kv => kv.Value == role).Key;

    /// <summary>Loads the bench file at <paramref name="path"/>.</summary>
    public static BenchDescription Load(string path)
    {
        var doc = YamlDocument.Load(path);
        var name = doc.Text("bench");

        UutDescription uut;
        var uutNode = doc.Required("uut");
        if (uutNode.IsMapping)
        {
            uut = UutReader.Read(uutNode.AsMapping());
        }
        else
        {
            var uutPath = Path.Combine(Path.GetDirectoryName(Path.GetFullPath(path)) ?? ".", uutNode.AsString());
            if (!System.IO.File.Exists(uutPath))
            {
                throw uutNode.Error($"uut: the file '{uutNode.AsString()}' does not exist (looked for {uutPath}).");
            }

            uut = UutReader.Load(uutPath);
        }

        var supplyMap = doc.Mapping("supply") ?? throw doc.Error("the 'supply' settings (voltage, currentLimit, maxPower) are required.");
        var supply = new SupplySettings(
            new Voltage(supplyMap.Quantity("voltage", SiUnit.Volt, Allowed.Positive(SiUnit.Volt))),
            new Current(supplyMap.Quantity("currentLimit", SiUnit.Ampere, Allowed.Positive(SiUnit.Ampere))),
            new Power(supplyMap.QuantityOr("maxPower", SiUnit.Watt, double.PositiveInfinity, Allowed.Positive(SiUnit.Watt))));
        supplyMap.Finish();

        var loadMap = doc.Mapping("load") ?? throw doc.Error("the 'load' limits (minimumVoltage, maxCurrent, maxPower) are required.");
        var load = new LoadSettings(
            new Voltage(loadMap.Quantity("minimumVoltage", SiUnit.Volt, Allowed.NonNegative(SiUnit.Volt))),
            new Current(loadMap.Quantity("maxCurrent", SiUnit.Ampere, Allowed.Positive(SiUnit.Ampere))),
            new Power(loadMap.QuantityOr("maxPower", SiUnit.Watt, double.PositiveInfinity, Allowed.Positive(SiUnit.Watt))));
        loadMap.Finish();

        var wiring = new Resistance(doc.QuantityOr("wiring", SiUnit.Ohm, 0, Allowed.NonNegative(SiUnit.Ohm)));

        var instruments = new Dictionary<InstrumentRole, InstrumentEntry>();
        var instrumentsMap = doc.Mapping("instruments") ?? throw doc.Error("the 'instruments' mapping (supply, load, dropMeter, uutMeter, reference) is required.");
        foreach (var (key, value) in instrumentsMap.Entries())
        {
            if (!RoleKeys.TryGetValue(key, out var role))
            {
                throw value.Error($"instruments: unknown role '{key}'; expected one of {string.Join(", ", RoleKeys.Keys)}.");
            }

            var settings = value.AsMapping();
            var resource = settings.Text("resource");
            instruments[role] = new InstrumentEntry(role, resource, settings, InstrumentCalibration.Read(settings));
        }

        foreach (var needed in new[] { InstrumentRole.Supply, InstrumentRole.Load, InstrumentRole.DropMeter })
        {
            if (!instruments.ContainsKey(needed))
            {
                throw instrumentsMap.Error($"instruments: the role '{KeyOf(needed)}' is required.");
            }
        }

        var allowances = ReadAllowances(doc);
        var warningDays = doc.IntOr("calibrationWarningDays", 30, 0, 3660);
        var simulation = doc.Mapping("simulation");
        doc.Finish();
        return new BenchDescription(name, path, uut, supply, load, wiring, instruments, simulation, allowances) { CalibrationWarningDays = warningDays };
    }

    /// <summary>Reads the optional <c>uncertainty</c> section (drop meter and reference specifications, thermal EMF and lead allowances) and <c>ambient</c>.</summary>
    private static BenchAllowances ReadAllowances(MappingReader doc)
    {
        var ambient = doc.QuantityOrNull("ambient", SiUnit.Celsius, Allowed.Between(-273.15, 200, SiUnit.Celsius));
        var map = doc.Mapping("uncertainty");
        if (map is null)
        {
            return new BenchAllowances(AmbientCelsius: ambient);
        }

        var allowances = new BenchAllowances(
            Meter(map.Mapping("dropMeter"), SiUnit.Volt),
            Meter(map.Mapping("reference"), SiUnit.Ampere),
            map.QuantityOr("thermalEmf", SiUnit.Volt, 0, Allowed.NonNegative(SiUnit.Volt)),
            map.QuantityOr("leads", SiUnit.Ohm, 0, Allowed.NonNegative(SiUnit.Ohm)),
            ambient);
        map.Finish();
        return allowances;
    }

    private static MeterSpecification? Meter(MappingReader? map, SiUnit unit)
    {
        if (map is null)
        {
            return null;
        }

        var spec = new MeterSpecification(
            map.QuantityOr("reading", SiUnit.None, 0, Allowed.Between(0, 0.1, SiUnit.None) with { Text = "from 0 ppm to 10 % of the reading" }),
            map.QuantityOr("floor", unit, 0, Allowed.NonNegative(unit)),
            map.QuantityOr("resolution", unit, 0, Allowed.NonNegative(unit)));
        map.Finish();
        return spec;
    }
}

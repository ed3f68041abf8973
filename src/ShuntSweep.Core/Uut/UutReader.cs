using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Core.Uut;

/// <summary>Reads a UUT description from YAML, strictly: unknown keys, missing keys and wrong units are errors with their position.</summary>
public static class UutReader
{
    /// <summary>Loads a UUT file whose top level holds the <c>uut</c> mapping, or is that mapping itself, or a bench file's UUT.</summary>
    public static UutDescription Load(string path)
    {
        var doc = YamlDocument.Load(path);
        if (doc.Optional("bench") is not null)
        {
            return Bench.BenchReader.Load(path).Uut;
        }

        var node = doc.Mapping("uut");
        if (node is null)
        {
            return Read(doc);
        }

        doc.Finish();
        return Read(node);
    }

    /// <summary>Reads the <c>uut</c> mapping.</summary>
    public static UutDescription Read(MappingReader map)
    {
        ArgumentNullException.ThrowIfNull(map);
        var jacks = new List<JackSpec>();
        foreach (var n in map.Required("jacks").AsSequence())
        {
            var j = n.AsMapping();
            var nameNode = j.Required("name");
            var jack = new JackSpec(nameNode.AsString(), new Current(j.Quantity("fuseRating", SiUnit.Ampere, Allowed.Positive(SiUnit.Ampere))), j.StringOr("category", null));
            if (jacks.Any(other => other.Name == jack.Name))
            {
                throw nameNode.Error($"{nameNode.What}: a second jack named '{jack.Name}'; jack names must be unique.");
            }

            j.Finish();
            jacks.Add(jack);
        }

        if (jacks.Count == 0)
        {
            throw map.Required("jacks").Error("uut.jacks: at least one jack is required.");
        }

        var ranges = new List<RangeSpec>();
        foreach (var n in map.Required("ranges").AsSequence())
        {
            var r = n.AsMapping();
            var nameNode = r.Required("name");
            var name = nameNode.AsString();
            if (ranges.Any(other => other.Name == name))
            {
                throw nameNode.Error($"{nameNode.What}: a second range named '{name}'; range names must be unique.");
            }

            var jackNode = r.Required("jack");
            var jack = jackNode.AsString();
            if (jacks.All(j => j.Name != jack))
            {
                throw jackNode.Error($"range '{name}' uses jack '{jack}', which is not among the jacks ({string.Join(", ", jacks.Select(j => j.Name))}).");
            }

            var fullScaleNode = r.Required("fullScale");
            var fullScale = fullScaleNode.AsQuantity(SiUnit.Ampere, Allowed.Positive(SiUnit.Ampere));
            var resolution = r.QuantityOrNull("resolution", SiUnit.Ampere, Allowed.Positive(SiUnit.Ampere));
            var counts = r.IntOr("counts", 0, 1);
            if (resolution is null && counts == 0)
            {
                throw r.Error($"range '{name}': give either 'resolution' (one count, e.g. 0.01 mA) or 'counts' (display counts at full scale).");
            }

            var shunt = r.QuantityOrNull("nominalShunt", SiUnit.Ohm, Allowed.NonNegative(SiUnit.Ohm));
            var accuracy = r.Mapping("accuracy");
            var spec = accuracy is null
                ? new AccuracySpec(0, 0)
                : new AccuracySpec(accuracy.Quantity("reading", SiUnit.None, Allowed.Between(0, 1, SiUnit.None) with { Text = "from 0 % to 100 % of the reading" }), accuracy.IntOr("counts", 0, 0));
            accuracy?.Finish();
            var burden = r.QuantityOrNull("burdenAtFullScale", SiUnit.Volt, Allowed.NonNegative(SiUnit.Volt));
            var overRange = r.QuantityOr("overRange", SiUnit.None, 0.1, Allowed.Between(0, 10, SiUnit.None) with { Text = "from 0 % to 1000 % of full scale" });
            var limitCurve = ReadBurdenLimit(r, name);
            ranges.Add(new RangeSpec(
                name,
                jack,
                new Current(fullScale),
                new Current(resolution ?? (fullScale / counts)),
                shunt is null ? null : new Resistance(shunt.Value),
                spec,
                burden is null ? null : new Voltage(burden.Value),
                overRange,
                limitCurve));
            r.Finish();
        }

        if (ranges.Count == 0)
        {
            throw map.Error("uut: at least one range is required.");
        }

        var description = new UutDescription(
            map.Text("manufacturer"),
            map.Text("model"),
            map.Text("serial"),
            map.StringOr("assetId", null),
            jacks,
            ranges);
        map.Finish();
        return description;
    }

    /// <summary>Reads a range's optional <c>burdenLimit</c>: a list of <c>{ current, drop }</c> corners at rising current, at least two.</summary>
    private static List<BurdenLimitPoint>? ReadBurdenLimit(MappingReader range, string name)
    {
        if (range.Optional("burdenLimit") is not { } node)
        {
            return null;
        }

        var corners = new List<BurdenLimitPoint>();
        foreach (var item in node.AsSequence())
        {
            var c = item.AsMapping();
            var corner = new BurdenLimitPoint(
                new Current(c.Quantity("current", SiUnit.Ampere, Allowed.NonNegative(SiUnit.Ampere))),
                new Voltage(c.Quantity("drop", SiUnit.Volt, Allowed.NonNegative(SiUnit.Volt))));
            if (corners.Count > 0 && corner.Current.Amperes <= corners[^1].Current.Amperes)
            {
                throw item.Error($"range '{name}': burdenLimit corners must be at rising current; {corner.Current} follows {corners[^1].Current}.");
            }

            c.Finish();
            corners.Add(corner);
        }

        if (corners.Count < 2)
        {
            throw node.Error($"range '{name}': burdenLimit needs at least two corners ({{ current: 0 A, drop: 0 V }}, {{ current: 1 A, drop: 200 mV }}).");
        }

        return corners;
    }
}

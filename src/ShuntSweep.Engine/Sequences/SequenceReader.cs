using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Engine.Planning;

namespace ShuntSweep.Engine.Sequences;

/// <summary>Reads a sequence file strictly: every unknown key, missing key, wrong unit or impossible value is an error with file, line and column.</summary>
public static class SequenceReader
{
    /// <summary>Loads the sequence at <paramref name="path"/>.</summary>
    public static Sequence Load(string path) => Parse(YamlDocument.ReadText(path), path);

    /// <summary>Parses sequence text; <paramref name="fileName"/> is used in messages.</summary>
    /// <remarks>Values may name a parameter of the file's <c>parameters</c> mapping as <c>$name</c> (<c>$$</c> is a literal <c>$</c>); the parameter's
    /// text stands in its place before the file is read, so a unit mismatch is reported where the parameter is used.</remarks>
    public static Sequence Parse(string text, string fileName)
    {
        ArgumentNullException.ThrowIfNull(text);
        var first = YamlDocument.Parse(text, fileName);
        var parameters = new Dictionary<string, string>(StringComparer.Ordinal);
        if (first.Mapping("parameters") is { } map)
        {
            foreach (var (key, value) in map.Entries())
            {
                parameters[key] = value.AsString();
            }
        }

        return Read(text.Contains('$', StringComparison.Ordinal) ? YamlDocument.Parse(Substitute(text, parameters, fileName), fileName) : first);
    }

    private static string Substitute(string text, Dictionary<string, string> parameters, string fileName)
    {
        var result = new System.Text.StringBuilder(text.Length);
        var line = 1;
        var lineStart = 0;
        for (var i = 0; i < text.Length; i++)
        {
            var c = text[i];
            if (c == '\n')
            {
                line++;
                lineStart = i + 1;
            }

            if (c != '$')
            {
                result.Append(c);
                continue;
            }

            if (i + 1 < text.Length && text[i + 1] == '$')
            {
                result.Append('$');
                i++;
                continue;
            }

            var end = i + 1;
            while (end < text.Length && (char.IsAsciiLetterOrDigit(text[end]) || text[end] == '_'))
            {
                end++;
            }

            var name = text[(i + 1)..end];
            if (name.Length == 0 || !char.IsAsciiLetter(name[0]))
            {
                result.Append(c);
                continue;
            }

            if (!parameters.TryGetValue(name, out var value))
            {
                var known = parameters.Count == 0 ? "the file has no 'parameters'" : $"the parameters are {string.Join(", ", parameters.Keys)}";
                throw new DocumentException(fileName, line, i - lineStart + 1, $"'${name}' names no parameter; {known} (write $$ for a literal $).");
            }

            result.Append(value);
            i = end - 1;
        }

        return result.ToString();
    }

    private static Sequence Read(MappingReader doc)
    {
        var title = doc.Text("sequence");
        doc.StringOr("description", null);
        var bench = doc.StringOr("bench", null) is { } b ? Path.Combine(Path.GetDirectoryName(doc.File) ?? string.Empty, b) : null;
        var procedureId = doc.StringOr("id", null);
        var procedureVersion = doc.StringOr("version", null);
        doc.Optional("parameters");

        var defaultsMap = doc.Mapping("defaults");
        var defaults = ReadSettings(defaultsMap, new PointSettings(
            new Settling(TimeSpan.FromMilliseconds(100), 0, 0, TimeSpan.Zero), 5, 1, Readings.Drop | Readings.Uut | Readings.Reference));
        defaultsMap?.Finish();

        var limitsMap = doc.Mapping("limits");
        var limits = new SafetyLimits(
            limitsMap?.QuantityOrNull("maxDrop", SiUnit.Volt, Allowed.Positive(SiUnit.Volt)) is { } md ? new Voltage(md) : null,
            limitsMap?.QuantityOr("fuseDerating", SiUnit.None, 0.8, Allowed.Percent(100) with { Text = "above 0 % and at most 100 % of the fuse rating (a fuse is never run above its rating)" }) ?? 0.8,
            limitsMap?.QuantityOr("maxOfFullScale", SiUnit.None, 1.0, Allowed.Percent(200) with { Text = "above 0 % and at most 200 % of the range's full scale" }) ?? 1.0);
        limitsMap?.Finish();

        var items = new List<SequenceItem>();
        var budget = new PointBudget();
        var stepsNode = doc.Required("steps");
        var steps = stepsNode.AsSequence();
        if (steps.Count == 0)
        {
            throw stepsNode.Error("steps: the list is empty; add at least one 'sweep' or 'hold'.");
        }

        foreach (var node in steps)
        {
            var map = node.AsMapping();
            var kinds = new[] { "sweep", "hold", "ramp", "prompt" };
            var present = kinds.Where(k => map.Optional(k) is not null).ToList();
            if (present.Count != 1)
            {
                map.Finish();
                throw map.Error($"{node.What}: each step is exactly one of {string.Join(", ", kinds)}; found {(present.Count == 0 ? "none" : string.Join(" and ", present))}.");
            }

            var body = map.Required(present[0]);
            items.Add(present[0] switch
            {
                "sweep" => ReadSweep(body, defaults, budget),
                "hold" => ReadHold(body, defaults, budget),
                "ramp" => ReadRamp(body, budget),
                _ => ReadPrompt(body, items.Count),
            });
            map.Finish();
        }

        doc.Finish();
        return new Sequence(title, doc.File, limits, items) { Bench = bench, Id = procedureId, Version = procedureVersion };
    }

    private static SweepItem ReadSweep(NodeReader node, PointSettings defaults, PointBudget budget)
    {
        var map = node.AsMapping();
        var range = map.Text("range");
        var currentsNode = map.Required("currents");
        var currents = new List<CurrentValue>();
        if (currentsNode.IsSequence)
        {
            currents.AddRange(budget.Take(currentsNode).Select(ReadCurrent));
        }
        else
        {
            var c = currentsNode.AsMapping();
            var list = c.Optional("list");
            var linear = c.Mapping("linear");
            var log = c.Mapping("log");
            var forms = (list is null ? 0 : 1) + (linear is null ? 0 : 1) + (log is null ? 0 : 1);
            if (forms != 1)
            {
                c.Finish();
                throw c.Error($"{c.What}: give exactly one of 'list', 'linear' or 'log'.");
            }

            if (list is { } l)
            {
                currents.AddRange(budget.Take(l).Select(ReadCurrent));
            }
            else
            {
                currents.AddRange(Series((linear ?? log)!, log is not null, budget));
            }

            c.Finish();
        }

        if (currents.Count == 0)
        {
            throw currentsNode.Error($"{currentsNode.What}: no currents given.");
        }

        var settings = ReadSettings(map, defaults);
        map.Finish();
        return new SweepItem(node.Line, range, currents, settings) { Column = node.Column };
    }

    private static List<CurrentValue> Series(MappingReader map, bool logarithmic, PointBudget budget)
    {
        var fromNode = map.Required("from");
        var from = ReadCurrent(fromNode);
        var to = ReadCurrent(map.Required("to"));
        var pointsNode = map.Required("points");
        var points = pointsNode.AsInt(2, PlanLimits.MaxPoints);
        budget.Take(points, pointsNode);
        map.Finish();
        if (from.IsFraction != to.IsFraction)
        {
            throw fromNode.Error($"{map.What}: 'from' and 'to' must both be currents or both be % of full scale.");
        }

        if (logarithmic && (from.Value <= 0 || to.Value <= 0))
        {
            throw fromNode.Error($"{map.What}: a logarithmic series needs 'from' and 'to' above zero.");
        }

        var series = new List<CurrentValue>(points);
        for (var i = 0; i < points; i++)
        {
            var t = i / (double)(points - 1);
            var v = logarithmic
                ? Math.Exp(Math.Log(from.Value) + (t * (Math.Log(to.Value) - Math.Log(from.Value))))
                : from.Value + (t * (to.Value - from.Value));
            series.Add(new CurrentValue(v, from.IsFraction));
        }

        return series;
    }

    private static HoldItem ReadHold(NodeReader node, PointSettings defaults, PointBudget budget)
    {
        var map = node.AsMapping();
        var range = map.Text("range");
        var current = ReadCurrent(map.Required("current"));
        var durationNode = map.Required("duration");
        var duration = TimeSpan.FromSeconds(durationNode.AsQuantity(SiUnit.Second, Allowed.UpTo(PlanLimits.MaxDuration.TotalSeconds, SiUnit.Second) with { Text = $"above 0 s and at most {PlanLimits.MaxDurationText}" }));
        var rateNode = map.Required("rate");
        var rate = rateNode.AsQuantity(SiUnit.Hertz, Allowed.UpTo(PlanLimits.MaxHoldRateHz, SiUnit.Hertz));
        var samples = duration.TotalSeconds * rate;
        if (!(samples >= 1))
        {
            throw rateNode.Error($"{map.What}: {rateNode.AsString()} over {durationNode.AsString()} takes no sample; the rate must be at least one sample per hold ({1 / duration.TotalSeconds:G3} Hz here).");
        }

        if (samples > PlanLimits.MaxSamples)
        {
            throw rateNode.Error($"{map.What}: {durationNode.AsString()} at {rateNode.AsString()} is {samples:0} samples; a plan records at most {PlanLimits.MaxSamples} samples.");
        }

        budget.Take(1, node);

        var settings = ReadSettings(map, defaults with { Samples = 1 });
        map.Finish();
        return new HoldItem(node.Line, range, current, duration, TimeSpan.FromSeconds(1 / rate), settings) { Column = node.Column };
    }

    private static RampItem ReadRamp(NodeReader node, PointBudget budget)
    {
        var map = node.AsMapping();
        budget.Take(1, node);
        var item = new RampItem(
            node.Line,
            map.Text("range"),
            ReadCurrent(map.Required("from")),
            ReadCurrent(map.Required("to")),
            TimeSpan.FromSeconds(map.Quantity("duration", SiUnit.Second, Allowed.Between(0, PlanLimits.MaxDuration.TotalSeconds, SiUnit.Second) with { Text = $"from 0 s to {PlanLimits.MaxDurationText}" })),
            map.IntOr("steps", 10, 1, 10_000)) { Column = node.Column };
        map.Finish();
        return item;
    }

    private static PromptItem ReadPrompt(NodeReader node, int index)
    {
        if (!node.IsMapping)
        {
            return new PromptItem(node.Line, $"prompt-{index + 1}", node.AsString(), true);
        }

        var map = node.AsMapping();
        var item = new PromptItem(node.Line, map.StringOr("id", $"prompt-{index + 1}")!, map.Text("text"), map.BoolOr("outputsOff", true));
        map.Finish();
        return item;
    }

    private static PointSettings ReadSettings(MappingReader? map, PointSettings fallback)
    {
        if (map is null)
        {
            return fallback;
        }

        var dwell = map.QuantityOrNull("dwell", SiUnit.Second, Allowed.Between(0, PlanLimits.MaxWait.TotalSeconds, SiUnit.Second) with { Text = $"from 0 s to {PlanLimits.MaxWaitText}" });
        var settling = fallback.Settling with { Dwell = dwell is null ? fallback.Settling.Dwell : TimeSpan.FromSeconds(dwell.Value) };
        if (map.Optional("settle") is { } settleNode)
        {
            if (settleNode.IsMapping)
            {
                var s = settleNode.AsMapping();
                settling = settling with
                {
                    AgreeCount = s.Required("agree").AsInt(2, 1000),
                    Tolerance = s.Quantity("within", SiUnit.None, Allowed.Percent(100) with { Text = "above 0 % and at most 100 % (the relative spread the readings agree within)" }),
                    MaxWait = TimeSpan.FromSeconds(s.Quantity("maxWait", SiUnit.Second, Allowed.UpTo(PlanLimits.MaxWait.TotalSeconds, SiUnit.Second) with { Text = $"above 0 s and at most {PlanLimits.MaxWaitText}" })),
                };
                s.Finish();
            }
            else if (!string.Equals(settleNode.AsString(), "fixed", StringComparison.OrdinalIgnoreCase))
            {
                throw settleNode.Error($"{settleNode.What}: expected 'fixed' or a mapping {{ agree: N, within: 0.1 %, maxWait: 2 s }}.");
            }
            else
            {
                settling = settling with { AgreeCount = 0 };
            }
        }

        var read = fallback.Read;
        if (map.Optional("read") is { } readNode)
        {
            read = Readings.None;
            foreach (var r in readNode.AsSequence())
            {
                read |= r.AsString() switch
                {
                    "drop" => Readings.Drop,
                    "uut" => Readings.Uut,
                    "reference" => Readings.Reference,
                    var other => throw r.Error($"{r.What}: '{other}' is not a reading; expected drop, uut or reference."),
                };
            }

            if (!read.HasFlag(Readings.Drop))
            {
                throw readNode.Error($"{readNode.What}: 'drop' must be read: the burden voltage is what a characterisation measures.");
            }
        }

        var nplcNode = map.Optional("nplc");
        var nplc = nplcNode?.AsQuantity(SiUnit.None) ?? fallback.Nplc;
        if (nplc is <= 0 or > 1000)
        {
            throw nplcNode!.Value.Error($"{nplcNode.Value.What}: NPLC must be above 0 and at most 1000.");
        }

        return new PointSettings(settling, map.IntOr("samples", fallback.Samples, 1, 100_000), nplc, read);
    }

    private static CurrentValue ReadCurrent(NodeReader node)
    {
        var text = node.AsString().Trim();
        if (text.EndsWith('%'))
        {
            var fraction = node.AsQuantity(SiUnit.None);
            return fraction is < -2 or > 2
                ? throw node.Error($"{node.What}: {text} of full scale is outside ±200 %.")
                : new CurrentValue(fraction, true);
        }

        return new CurrentValue(node.AsQuantity(SiUnit.Ampere), false);
    }

    /// <summary>Counts the points (sweep points, holds and ramps) read so far and refuses the file once they exceed <see cref="PlanLimits.MaxPoints"/>,
    /// before a list is read item by item.</summary>
    private sealed class PointBudget
    {
        private int _taken;

        public IReadOnlyList<NodeReader> Take(NodeReader list)
        {
            Take(list.ItemCount, list);
            return list.AsSequence();
        }

        public void Take(int points, NodeReader where)
        {
            _taken += Math.Min(points, PlanLimits.MaxPoints + 1);
            if (_taken > PlanLimits.MaxPoints)
            {
                throw where.Error($"{where.What}: the sequence now has more than {PlanLimits.MaxPoints} points (sweep points, holds and ramps); a plan holds at most {PlanLimits.MaxPoints}. Split it into several sequences.");
            }
        }
    }
}

using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Simulation.Physics;

namespace ShuntSweep.Simulation.Faults;

/// <summary>Reads the <c>simulation.faults</c> list strictly: each item names its <c>kind</c>, the instrument it watches, and its trigger.</summary>
internal static class FaultReader
{
    /// <summary>The fault kinds a bench file may declare.</summary>
    public static readonly string[] Kinds = ["latency", "lateReply", "truncatedReply", "dropConnection", "garbledByte", "pushError", "reset", "hang", "unplug", "fuseOpen", "loadDropout", "loadRunaway"];

    /// <summary>The instrument names faults may watch.</summary>
    public static readonly string[] InstrumentNames = ["supply", "load", "dmm", "uut", "ref", "tap"];

    /// <summary>Reads every fault of <paramref name="items"/>.</summary>
    public static IReadOnlyList<IFault> Read(IReadOnlyList<NodeReader> items, IReadOnlyCollection<string> served, UutModel uut) =>
        items.Select(item => Read(item.AsMapping(), served, uut)).ToList();

    private static IFault Read(MappingReader map, IReadOnlyCollection<string> served, UutModel uut)
    {
        var kind = map.Choice("kind", string.Empty, Kinds);
        if (kind.Length == 0)
        {
            throw map.Error($"{map.What}: the key 'kind' is required; one of {string.Join(", ", Kinds)}.");
        }

        var physics = kind is "fuseOpen" or "loadDropout" or "loadRunaway";
        var instrumentNode = map.Optional("instrument");
        string? instrument = null;
        if (instrumentNode is { } node)
        {
            instrument = map.Choice("instrument", string.Empty, InstrumentNames);
            if (!served.Contains(instrument))
            {
                throw node.Error($"{node.What}: the bench has no simulated '{instrument}' (it serves {string.Join(", ", served)}).");
            }
        }
        else if (!physics)
        {
            throw map.Error($"{map.What}: a '{kind}' fault needs 'instrument' ({string.Join(", ", InstrumentNames)}).");
        }

        var after = map.Optional("afterCommands")?.AsInt(1);
        var at = map.QuantityOrNull("at", SiUnit.Second, Allowed.Between(0, 365 * 86400, SiUnit.Second) with { Text = "from 0 s to 1 year after the start" });
        if (after is not null && at is not null)
        {
            throw map.Error($"{map.What}: give either 'afterCommands' or 'at', not both.");
        }

        if (physics && at is null && (after is null || instrument is null))
        {
            throw map.Error($"{map.What}: a '{kind}' fault needs 'at' (a time after the start), or 'instrument' with 'afterCommands'.");
        }

        var trigger = new FaultTrigger(after, at is null ? null : TimeSpan.FromSeconds(at.Value));
        IFault fault = kind switch
        {
            "latency" => new LatencyFault(instrument!, trigger, Seconds(map, "delay", 0.05)),
            "lateReply" => new LateReplyFault(instrument!, trigger, Seconds(map, "delay", 30)),
            "truncatedReply" => new TruncatedReplyFault(instrument!, trigger, map.Optional("keep")?.AsInt(0)),
            "dropConnection" => new DropConnectionFault(instrument!, trigger),
            "garbledByte" => new GarbledByteFault(instrument!, trigger),
            "pushError" => new PushErrorFault(instrument!, trigger, map.IntOr("code", -310, -999, -100), map.StringOr("detail", null)),
            "reset" => new ResetFault(instrument!, trigger),
            "hang" => new HangFault(instrument!, trigger),
            "unplug" => new UnplugFault(instrument!, trigger),
            "fuseOpen" => FuseOpen(map, instrument, trigger, uut),
            "loadRunaway" => LoadRunaway(map, instrument, trigger),
            _ => LoadDropout(map, instrument, trigger),
        };
        map.Finish();
        return fault;
    }

    private static PhysicsFault FuseOpen(MappingReader map, string? instrument, FaultTrigger trigger, UutModel uut)
    {
        var jackNode = map.Optional("jack");
        var jack = jackNode?.AsString();
        if (jackNode is { } j && uut.Jacks.All(x => x.Spec.Name != jack))
        {
            throw j.Error($"{j.What}: the UUT has no jack '{jack}'; it has {string.Join(", ", uut.Jacks.Select(x => x.Spec.Name))}.");
        }

        return new PhysicsFault(instrument, trigger, c =>
        {
            var target = jack is null ? c.Uut.Selected.Jack : c.Uut.Jacks.First(j => j.Spec.Name == jack);
            target.Fuse.Open();
        });
    }

    private static PhysicsFault LoadDropout(MappingReader map, string? instrument, FaultTrigger trigger)
    {
        var duration = Seconds(map, "duration", 1);
        return new PhysicsFault(instrument, trigger, c => c.LoadFailedUntil = c.Now + duration);
    }

    private static PhysicsFault LoadRunaway(MappingReader map, string? instrument, FaultTrigger trigger)
    {
        var current = map.QuantityOrNull("current", SiUnit.Ampere);
        if (current is <= 0)
        {
            throw map.Error($"{map.What}: 'current' must be above 0 A.");
        }

        return new PhysicsFault(instrument, trigger, c => c.LoadRunawayCurrent = current ?? c.Load.MaxCurrent);
    }

    private static TimeSpan Seconds(MappingReader map, string key, double fallback) =>
        TimeSpan.FromSeconds(map.QuantityOr(key, SiUnit.Second, fallback, Allowed.Between(0, 86400, SiUnit.Second) with { Text = "from 0 s to 1 day" }));
}

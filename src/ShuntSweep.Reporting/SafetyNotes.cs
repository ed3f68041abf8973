namespace ShuntSweep.Reporting;

/// <summary>The cautions every report carries: a characterisation bench pushes amperes through fuses and jacks.</summary>
public static class SafetyNotes
{
    /// <summary>The general cautions, one sentence each, in the order the report lists them.</summary>
    public static IReadOnlyList<string> General { get; } =
    [
        "Use leads, probes and a UUT rated for the current and the measurement category of the test; check the markings on each jack.",
        "Turn the supply output and the load input off, and confirm they are off, before moving or re-wiring any lead.",
        "Never exceed a range's fuse rating: a fuse that opens leaves the open-circuit supply voltage across the UUT's jacks.",
        "Shunts, fuses and load heat sinks get hot at amperes; let them cool before touching them.",
        "The software's limits (planner checks, the supply's current limit and over-voltage protection) are an aid: a fuse of the right rating, a supply with its own hardware limit set, and a qualified person remain the protection.",
        "Mains-powered instruments: follow local electrical codes and licensed practice; these notes do not replace them.",
    ];
}

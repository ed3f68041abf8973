using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>What a profile must have for the role it drives: the operations a run cannot do without, and a code for every range it selects.</summary>
/// <remarks>Checked when the bench is read, before any prompt or output, so that an empty required operation is never found mid-run.</remarks>
public static class ProfileRequirements
{
    /// <summary>The operations each profile section must have, with why (the table in docs/instruments.md says the same).</summary>
    public static IReadOnlyList<(string Operation, string Why)> Required(string section) => section switch
    {
        "supply" =>
        [
            ("supply.setVoltage", "the loop's voltage is set at the start"),
            ("supply.setCurrentLimit", "the current limit protects the UUT's fuse"),
            ("supply.setOutput", "the output is switched on for each jack and off on every exit"),
            ("supply.queryOutput", "turning the output off is confirmed by asking"),
            ("supply.measureVoltage", "the supply voltage is journalled per point"),
        ],
        "load" =>
        [
            ("load.setCurrent", "the load sets each point's current"),
            ("load.setInput", "the input is switched on for each jack and off on every exit"),
            ("load.queryInput", "turning the input off is confirmed by asking"),
            ("load.measureVoltage", "the load's voltage is journalled per point"),
            ("load.measureCurrent", "the load's current stands in for a missing reference"),
            ("load.queryRegulation", "a load that lost regulation must stop the run"),
            ("load.regulationLostMask", "the bit of the regulation answer that means lost regulation"),
        ],
        "voltmeter" =>
        [
            ("voltmeter.configure", "the meter is put on DC volts with its range"),
            ("voltmeter.setNplc", "the integration time decides the noise and the timing"),
            ("voltmeter.fetch", "the reading"),
        ],
        "uut" => [("uut.fetch", "the UUT's reading")],
        "reference" => [("reference.configure", "the reference is put on DC current with its range"), ("reference.fetch", "the reading")],
        _ => [],
    };

    /// <summary>The profile section that drives <paramref name="role"/> (a shunt reference is a voltmeter).</summary>
    public static string SectionOf(InstrumentRole role, bool shuntReference = false) => role switch
    {
        InstrumentRole.Supply => "supply",
        InstrumentRole.Load => "load",
        InstrumentRole.DropMeter or InstrumentRole.ShuntTap => "voltmeter",
        InstrumentRole.UutMeter => "uut",
        _ => shuntReference ? "voltmeter" : "reference",
    };

    /// <summary>Every problem of <paramref name="profile"/> for the section it drives, each with the position to fix it at.</summary>
    /// <param name="profile">The profile.</param>
    /// <param name="section">The section the instrument is driven by.</param>
    /// <param name="ranges">The UUT's ranges, for the uut section: with more than one, ranges must be selectable, and each needs its code.</param>
    public static IReadOnlyList<DocumentException> Check(InstrumentProfile profile, string section, IReadOnlyList<RangeSpec>? ranges = null)
    {
        ArgumentNullException.ThrowIfNull(profile);
        var problems = new List<DocumentException>();
        foreach (var (operation, why) in Required(section))
        {
            if (!profile.Supports(operation))
            {
                problems.Add(profile.Operation(operation).Position.Error(
                    $"profile '{profile.Name}': {operation} is empty, but a run needs it ({why})."));
            }
        }

        if (section == "uut" && ranges is { Count: > 0 })
        {
            var select = profile.Operation("uut.selectRange");
            if (!select.IsSupported && ranges.Count > 1)
            {
                problems.Add(select.Position.Error(
                    $"profile '{profile.Name}': uut.selectRange is empty, so the UUT would stay on whichever range it is on; give the command, or read the UUT another way (kind: operator)."));
            }
            else if (select.Uses("code"))
            {
                var missing = ranges.Where(r => !select.Codes.ContainsKey(r.Name)).Select(r => r.Name).ToList();
                if (missing.Count > 0)
                {
                    problems.Add(select.Position.Error(
                        $"profile '{profile.Name}': uut.selectRange has no code for the range(s) {string.Join(", ", missing)}; its codes are for {string.Join(", ", select.Codes.Keys)}."));
                }
            }
        }

        return problems;
    }
}

using System.Globalization;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>The simulator-only SIMulation subsystem, served by every simulated instrument (no real instrument has it).</summary>
internal static class SimulationCommands
{
    /// <summary>Adds <c>SIMulation:…</c> commands that reach into the UUT and the bench's truth.</summary>
    public static ScpiCommandSet AddSimulation(this ScpiCommandSet commands, BenchCircuit circuit) => commands
        .Add("SIMulation:FUSE:RESet", c =>
        {
            c.Expect(0, 1);
            var jack = c.Count == 1 ? JackOf(circuit, c.Text(0)) : null;
            circuit.Change(b =>
            {
                foreach (var j in b.Uut.Jacks.Where(j => jack is null || j == jack))
                {
                    j.Fuse.Reclose();
                }
            });
        })
        .Add("SIMulation:FUSE:OPEN?", c =>
        {
            c.Expect(0, 1);
            var jack = c.Count == 1 ? JackOf(circuit, c.Text(0)) : null;
            c.Reply(circuit.At(b => (jack ?? b.Uut.Selected.Jack).Fuse.IsOpen));
        })
        .Add("SIMulation:TEMPerature?", c =>
        {
            c.Expect(0, 1);
            var jack = c.Count == 1 ? JackOf(circuit, c.Text(0)) : null;
            c.Reply(circuit.At(b => (jack ?? b.Uut.Selected.Jack).Fuse.Celsius));
        })
        .Add("SIMulation:UUT:RANGe", c =>
        {
            c.Expect(1, 1);
            var name = c.Text(0);
            var range = circuit.Uut.Ranges.FirstOrDefault(r => string.Equals(r.Spec.Name, name, StringComparison.OrdinalIgnoreCase))
                ?? throw new ScpiException(ScpiErrors.IllegalParameterValue, $"no range '{name}'");
            circuit.Change(b => b.Uut.Selected = range);
        })
        .Add("SIMulation:UUT:RANGe?", c => c.Reply($"\"{circuit.At(b => b.Uut.Selected.Spec.Name)}\""))
        .Add("SIMulation:TIME?", c => c.Reply(circuit.At(b => (b.Now - b.Start).TotalSeconds)))
        .Add("SIMulation:DROP?", c => c.Reply(circuit.Present().JackVoltage))
        .Add("SIMulation:CURRent?", c => c.Reply(circuit.Present().UutCurrent));

    private static UutJack JackOf(BenchCircuit circuit, string name) =>
        circuit.Uut.Jacks.FirstOrDefault(j => string.Equals(j.Spec.Name, name, StringComparison.OrdinalIgnoreCase))
        ?? throw new ScpiException(ScpiErrors.IllegalParameterValue, $"no jack '{name}'");

    /// <summary>Formats an integer register value.</summary>
    public static string Integer(int value) => value.ToString(CultureInfo.InvariantCulture);
}

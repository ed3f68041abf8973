using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>The simulated electronic load in constant-current mode (resource <c>SIM::load</c>), with its regulation flag.</summary>
internal static class LoadInstrument
{
    private const string Level = "[:LEVel][:IMMediate][:AMPLitude]";

    /// <summary>Builds the load's SCPI front on <paramref name="circuit"/>.</summary>
    public static ScpiInstrument Create(BenchCircuit circuit, IBenchClock clock, SeededRandom random)
    {
        var physics = circuit.Load;
        var readback = TimeSpan.FromSeconds(physics.ReadbackTime);
        int Questionable() => circuit.At(b => b.LoadOn && !b.Solve().Regulating) ? 2 : 0;
        var commands = new ScpiCommandSet()
            .Add("[SOURce:]FUNCtion", c =>
            {
                c.Expect(1, 1);
                c.Choice(0, "CURRent");
            })
            .Add("[SOURce:]FUNCtion?", c => c.Reply("CURR"))
            .Add($"[SOURce:]CURRent{Level}", c =>
            {
                c.Expect(1, 1);
                var i = c.Number(0, ScpiUnit.Ampere, 0, physics.MaxCurrent, 0);
                circuit.Change(b => b.LoadSetpoint = i);
            })
            .Add($"[SOURce:]CURRent{Level}?", c => c.Reply(SupplyInstrument.Limits(c, 0, physics.MaxCurrent) ?? circuit.At(b => b.LoadSetpoint)))
            .Add("INPut[:STATe]", c =>
            {
                c.Expect(1, 1);
                var on = c.Boolean(0);
                circuit.Change(b => b.LoadOn = on);
            })
            .Add("INPut[:STATe]?", c => c.Reply(circuit.At(b => b.LoadOn)))
            .Add("MEASure[:SCALar]:VOLTage[:DC]?", async c =>
                c.Reply(await SupplyInstrument.Readback(circuit, clock, readback, op => op.LoadVoltage) + (physics.VoltageNoise * random.NextGaussian())))
            .Add("MEASure[:SCALar]:CURRent[:DC]?", async c =>
                c.Reply(await SupplyInstrument.Readback(circuit, clock, readback, op => op.LoopCurrent) + (physics.CurrentNoise * random.NextGaussian())))
            .Add("STATus:QUEStionable:CONDition?", c => c.Reply(SimulationCommands.Integer(Questionable())))
            .AddSimulation(circuit);
        return new ScpiInstrument(
            physics.Identity,
            commands,
            () => circuit.Change(b =>
            {
                b.LoadOn = false;
                b.LoadSetpoint = 0;
            }),
            questionable: Questionable);
    }
}

using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>The simulated programmable supply (resource <c>SIM::supply</c>): voltage setpoint, current limit, output state and readback.</summary>
internal static class SupplyInstrument
{
    private const string Level = "[:LEVel][:IMMediate][:AMPLitude]";

    /// <summary>Builds the supply's SCPI front on <paramref name="circuit"/>.</summary>
    public static ScpiInstrument Create(BenchCircuit circuit, IBenchClock clock, SeededRandom random)
    {
        var physics = circuit.Supply;
        var readback = TimeSpan.FromSeconds(physics.ReadbackTime);
        var protection = physics.MaxVoltage * 1.1;
        var tripped = false;

        // Over-voltage protection: a setpoint above the level switches the output off and latches the trip, as a real supply's OVP does.
        void Protect(BenchCircuit b)
        {
            if (b.SupplyOn && b.SupplySetpoint > protection)
            {
                b.SupplyOn = false;
                tripped = true;
            }
        }

        var commands = new ScpiCommandSet()
            .Add($"[SOURce:]VOLTage{Level}", c =>
            {
                c.Expect(1, 1);
                var v = c.Number(0, ScpiUnit.Volt, 0, physics.MaxVoltage, 0);
                circuit.Change(b =>
                {
                    b.SupplySetpoint = v;
                    Protect(b);
                });
            })
            .Add("[SOURce:]VOLTage:PROTection[:LEVel]", c =>
            {
                c.Expect(1, 1);
                var v = c.Number(0, ScpiUnit.Volt, 0, physics.MaxVoltage * 1.1, physics.MaxVoltage * 1.1);
                protection = v;
                circuit.Change(Protect);
            })
            .Add("[SOURce:]VOLTage:PROTection[:LEVel]?", c => c.Reply(Limits(c, 0, physics.MaxVoltage * 1.1) ?? protection))
            .Add("[SOURce:]VOLTage:PROTection:TRIPped?", c => c.Reply(tripped))
            .Add($"[SOURce:]VOLTage{Level}?", c => c.Reply(Limits(c, 0, physics.MaxVoltage) ?? circuit.At(b => b.SupplySetpoint)))
            .Add($"[SOURce:]CURRent{Level}", c =>
            {
                c.Expect(1, 1);
                var i = c.Number(0, ScpiUnit.Ampere, 0, physics.MaxCurrent, 0.1);
                circuit.Change(b => b.SupplyLimit = i);
            })
            .Add($"[SOURce:]CURRent{Level}?", c => c.Reply(Limits(c, 0, physics.MaxCurrent) ?? circuit.At(b => b.SupplyLimit)))
            .Add("OUTPut[:STATe]", c =>
            {
                c.Expect(1, 1);
                var on = c.Boolean(0);
                if (on)
                {
                    tripped = false;
                }

                circuit.Change(b =>
                {
                    b.SupplyOn = on;
                    Protect(b);
                });
            })
            .Add("OUTPut[:STATe]?", c => c.Reply(circuit.At(b => b.SupplyOn)))
            .Add("MEASure[:SCALar]:VOLTage[:DC]?", async c =>
                c.Reply(await Readback(circuit, clock, readback, op => op.SupplyVoltage) + (physics.VoltageNoise * random.NextGaussian())))
            .Add("MEASure[:SCALar]:CURRent[:DC]?", async c =>
                c.Reply(await Readback(circuit, clock, readback, op => op.LoopCurrent) + (physics.CurrentNoise * random.NextGaussian())))
            .Add("STATus:QUEStionable:CONDition?", c => c.Reply(SimulationCommands.Integer(circuit.Present().SupplyLimited ? 2 : 0)))
            .AddSimulation(circuit);
        return new ScpiInstrument(
            physics.Identity,
            commands,
            () => circuit.Change(b =>
            {
                b.SupplyOn = false;
                b.SupplySetpoint = 0;
                b.SupplyLimit = Math.Min(0.1, physics.MaxCurrent);
                protection = physics.MaxVoltage * 1.1;
                tripped = false;
            }),
            questionable: () => circuit.Present().SupplyLimited ? 2 : 0);
    }

    /// <summary>Answers <c>MIN</c> or <c>MAX</c> given as the query's parameter; null for the present value.</summary>
    internal static double? Limits(ScpiCall call, double min, double max)
    {
        call.Expect(0, 1);
        return call.Count == 0 ? null : call.Choice(0, "MINimum", "MAXimum") == "MINimum" ? min : max;
    }

    /// <summary>Averages a quantity over the readback time on the bench clock, as a MEASure? of the supply or load does.</summary>
    internal static async ValueTask<double> Readback(BenchCircuit circuit, IBenchClock clock, TimeSpan time, Func<OperatingPoint, double> probe)
    {
        var window = circuit.Arm(TimeSpan.Zero, 1, time, time, probe)[0];
        await clock.WaitUntilAsync(window.End);
        return circuit.Complete(window);
    }
}

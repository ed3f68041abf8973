using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>The simulated reference in series with the loop (resource <c>SIM::ref</c>): a calibrated shunt that is part of the circuit, read either
/// as an ammeter (<c>CONF:CURR</c>) or as a voltmeter across the shunt (<c>CONF:VOLT</c>), for a bench whose reference is a shunt and a voltmeter.</summary>
internal static class ReferenceInstrument
{
    /// <summary>Builds the reference ammeter's SCPI front on <paramref name="circuit"/>.</summary>
    public static ScpiInstrument Create(BenchCircuit circuit, IBenchClock clock, SeededRandom random)
    {
        var physics = circuit.Reference ?? throw new InvalidOperationException("The bench has no reference physics.");
        var ranges = ReferencePhysics.Ranges;
        var measurement = new TriggeredMeasurement(circuit, clock);
        var range = ranges[^1];
        var auto = true;
        var nplc = 1.0;
        var samples = 1;
        var volts = false;
        var voltRange = VoltmeterPhysics.Ranges[0];

        void Arm()
        {
            if (auto)
            {
                var present = Math.Abs(circuit.Present().LoopCurrent);
                range = ranges.FirstOrDefault(r => present <= r * 1.1, ranges[^1]);
                voltRange = VoltmeterPhysics.Ranges.FirstOrDefault(r => present * physics.Shunt <= r * 1.1, VoltmeterPhysics.Ranges[^1]);
            }

            var chosen = volts ? voltRange : range;
            var scale = volts ? physics.Shunt : 1;
            var integration = TimeSpan.FromSeconds(nplc / physics.LineFrequency);
            var sigma = physics.NoiseAt1Plc * chosen / Math.Sqrt(nplc);
            var resolution = chosen * 1e-7;
            measurement.Arm(samples, integration, integration, TimeSpan.FromSeconds(physics.Overhead), op => op.LoopCurrent * scale, i =>
            {
                var reading = Math.Round(((i * (1 + physics.GainError)) + (sigma * random.NextGaussian())) / resolution, MidpointRounding.AwayFromZero) * resolution;
                return Math.Abs(reading) > chosen * 1.2 ? (reading > 0 ? double.PositiveInfinity : double.NegativeInfinity) : reading;
            });
        }

        async ValueTask Read(ScpiCall c)
        {
            c.Expect(0, 0);
            Arm();
            await measurement.ReplyAsync(c);
        }

        var commands = new ScpiCommandSet()
            .Add("CONFigure:CURRent[:DC]", c =>
            {
                c.Expect(0, 2);
                if (c.Count == 0 || c.Is(0, "AUTO"))
                {
                    auto = true;
                }
                else
                {
                    var requested = c.Number(0, ScpiUnit.Ampere, 0, ranges[^1], ranges[^1]);
                    auto = false;
                    range = ranges.First(r => r >= requested * (1 - 1e-9));
                }

                volts = false;
                measurement.Clear();
            })
            .Add("CONFigure:VOLTage[:DC]", c =>
            {
                c.Expect(0, 2);
                if (c.Count == 0 || c.Is(0, "AUTO"))
                {
                    auto = true;
                }
                else
                {
                    var requested = c.Number(0, ScpiUnit.Volt, 0, VoltmeterPhysics.Ranges[^1], 10);
                    auto = false;
                    voltRange = VoltmeterPhysics.Ranges.First(r => r >= requested * (1 - 1e-9));
                }

                volts = true;
                measurement.Clear();
            })
            .Add("[SENSe:]VOLTage[:DC]:NPLCycles", c =>
            {
                c.Expect(1, 1);
                nplc = c.Number(0, ScpiUnit.None, 0.02, 100, 1);
            })
            .Add("[SENSe:]ZERO:AUTO", c =>
            {
                c.Expect(1, 1);
                c.Boolean(0);
            })
            .Add("[SENSe:]CURRent[:DC]:RANGe?", c => c.Reply(range))
            .Add("[SENSe:]CURRent[:DC]:NPLCycles", c =>
            {
                c.Expect(1, 1);
                nplc = c.Number(0, ScpiUnit.None, 0.02, 100, 1);
            })
            .Add("[SENSe:]CURRent[:DC]:NPLCycles?", c => c.Reply(nplc))
            .Add("SAMPle:COUNt", c =>
            {
                c.Expect(1, 1);
                samples = (int)c.Number(0, ScpiUnit.None, 1, 10000, 1);
            })
            .Add("SAMPle:COUNt?", c => c.Reply(samples))
            .Add("TRIGger[:SEQuence]:SOURce", c =>
            {
                c.Expect(1, 1);
                c.Choice(0, "IMMediate");
            })
            .AddArmAndFetch("FETCh[:CURRent][:DC]?", measurement, Arm)
            .Add("READ?", Read)
            .AddSimulation(circuit);
        return new ScpiInstrument(
            physics.Identity,
            commands,
            () =>
            {
                measurement.Clear();
                auto = true;
                volts = false;
                nplc = 1;
                samples = 1;
            },
            measurement.WaitAsync);
    }
}

using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>A simulated DC voltmeter: across the UUT's jacks (resource <c>SIM::dmm</c>) or tapped across the selected range's shunt
/// (<c>SIM::tap</c>); range, NPLC, auto-zero, sample count, INITiate/FETCh?.</summary>
/// <remarks>One sample integrates NPLC/line-frequency seconds (twice that with auto-zero on, which measures the zero too); noise falls as 1/√NPLC.
/// Only the drop meter's input resistance loads the circuit: a tap meter is taken to be high-impedance against the shunt it spans.</remarks>
internal static class VoltmeterInstrument
{
    private const double DefaultNplc = 1;

    /// <summary>Builds the SCPI front of a voltmeter on <paramref name="circuit"/> that reads <paramref name="probe"/> of the operating point.</summary>
    /// <param name="circuit">The bench circuit.</param>
    /// <param name="physics">The meter's noise, offsets and timing.</param>
    /// <param name="probe">The voltage the meter's terminals see.</param>
    /// <param name="rangeChanged">Told the range in use whenever it changes (the drop meter's input resistance depends on it).</param>
    /// <param name="clock">The bench clock.</param>
    /// <param name="random">The meter's noise source.</param>
    public static ScpiInstrument Create(BenchCircuit circuit, VoltmeterPhysics physics, Func<OperatingPoint, double> probe, Action<double> rangeChanged, IBenchClock clock, SeededRandom random)
    {
        var state = new State();
        var measurement = new TriggeredMeasurement(circuit, clock);
        var ranges = VoltmeterPhysics.Ranges;

        void SetRange(ScpiCall c, int index)
        {
            if (c.Count <= index || c.Is(index, "AUTO"))
            {
                state.Auto = true;
                return;
            }

            var requested = c.Number(index, ScpiUnit.Volt, 0, ranges[^1], 10);
            state.Auto = false;
            state.Range = ranges.First(r => r >= requested * (1 - 1e-9));
            rangeChanged(state.Range);
        }

        void Arm()
        {
            if (state.Auto)
            {
                var present = Math.Abs(probe(circuit.Present()));
                state.Range = ranges.FirstOrDefault(r => present <= r * 1.1, ranges[^1]);
                rangeChanged(state.Range);
            }

            var range = state.Range;
            var integration = TimeSpan.FromSeconds(state.Nplc / physics.LineFrequency);
            var period = state.AutoZero ? integration * 2 : integration;
            var sigma = Math.Sqrt(Math.Pow(physics.NoiseAt1Plc * range / Math.Sqrt(state.Nplc), 2) + Math.Pow(physics.NoiseFloor, 2));
            var offset = state.AutoZero ? physics.OffsetAutoZeroOn : physics.OffsetAutoZeroOff;
            var resolution = range / physics.Counts;
            measurement.Arm(
                state.Samples,
                integration,
                period,
                TimeSpan.FromSeconds(physics.Overhead),
                probe,
                v =>
                {
                    var reading = Math.Round((v + offset + (sigma * random.NextGaussian())) / resolution, MidpointRounding.AwayFromZero) * resolution;
                    return Math.Abs(reading) > range * 1.2 ? (reading > 0 ? double.PositiveInfinity : double.NegativeInfinity) : reading;
                });
        }

        async ValueTask Read(ScpiCall c)
        {
            Arm();
            await measurement.ReplyAsync(c);
        }

        var commands = new ScpiCommandSet()
            .Add("CONFigure[:VOLTage][:DC]", c =>
            {
                c.Expect(0, 2);
                SetRange(c, 0);
                measurement.Clear();
            })
            .Add("CONFigure?", c => c.Reply($"\"VOLT {ScpiNumber.Nr3(state.Range)}\""))
            .Add("[SENSe:]VOLTage[:DC]:RANGe", c =>
            {
                c.Expect(1, 1);
                SetRange(c, 0);
            })
            .Add("[SENSe:]VOLTage[:DC]:RANGe?", c => c.Reply(state.Range))
            .Add("[SENSe:]VOLTage[:DC]:RANGe:AUTO", c =>
            {
                c.Expect(1, 1);
                state.Auto = c.Boolean(0);
            })
            .Add("[SENSe:]VOLTage[:DC]:RANGe:AUTO?", c => c.Reply(state.Auto))
            .Add("[SENSe:]VOLTage[:DC]:NPLCycles", c =>
            {
                c.Expect(1, 1);
                state.Nplc = c.Number(0, ScpiUnit.None, 0.02, 100, DefaultNplc);
            })
            .Add("[SENSe:]VOLTage[:DC]:NPLCycles?", c => c.Reply(state.Nplc))
            .Add("[SENSe:]ZERO:AUTO", c =>
            {
                c.Expect(1, 1);
                state.AutoZero = c.Boolean(0);
            })
            .Add("[SENSe:]ZERO:AUTO?", c => c.Reply(state.AutoZero))
            .Add("SAMPle:COUNt", c =>
            {
                c.Expect(1, 1);
                state.Samples = (int)c.Number(0, ScpiUnit.None, 1, 10000, 1);
            })
            .Add("SAMPle:COUNt?", c => c.Reply(state.Samples))
            .Add("TRIGger[:SEQuence]:SOURce", c =>
            {
                c.Expect(1, 1);
                c.Choice(0, "IMMediate");
            })
            .Add("TRIGger[:SEQuence]:SOURce?", c => c.Reply("IMM"))
            .AddArmAndFetch("FETCh[:VOLTage][:DC]?", measurement, Arm)
            .Add("READ?", Read)
            .Add("MEASure[:VOLTage][:DC]?", async c =>
            {
                c.Expect(0, 2);
                SetRange(c, 0);
                await Read(c);
            })
            .AddSimulation(circuit);
        return new ScpiInstrument(
            physics.Identity,
            commands,
            () =>
            {
                state.Reset();
                measurement.Clear();
                rangeChanged(state.Range);
            },
            measurement.WaitAsync);
    }

    private sealed class State
    {
        public double Range { get; set; } = 10;

        public bool Auto { get; set; } = true;

        public double Nplc { get; set; } = DefaultNplc;

        public bool AutoZero { get; set; } = true;

        public int Samples { get; set; } = 1;

        public void Reset()
        {
            Range = 10;
            Auto = true;
            Nplc = DefaultNplc;
            AutoZero = true;
            Samples = 1;
        }
    }
}

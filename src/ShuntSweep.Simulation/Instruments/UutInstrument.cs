using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Instruments;

/// <summary>The UUT's remote interface (resource <c>SIM::uut</c>): range selection by full scale, and its reading in amperes.</summary>
internal static class UutInstrument
{
    /// <summary>Builds the UUT's SCPI front on <paramref name="circuit"/>.</summary>
    public static ScpiInstrument Create(BenchCircuit circuit, IBenchClock clock, SeededRandom random)
    {
        var uut = circuit.Uut;
        var measurement = new TriggeredMeasurement(circuit, clock);
        var time = TimeSpan.FromSeconds(uut.ReadingTime);

        void Arm()
        {
            var range = circuit.At(b => b.Uut.Selected);
            measurement.Arm(1, time, time, TimeSpan.Zero, op => op.SensedCurrent, sensed => range.Display(sensed, random));
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
                c.Expect(1, 1);
                var largest = uut.Ranges.Max(r => r.Spec.FullScale.Amperes);
                var smallest = uut.Ranges.Min(r => r.Spec.FullScale.Amperes);
                var fullScale = c.Number(0, ScpiUnit.Ampere, smallest, largest, largest);
                var range = uut.Ranges.FirstOrDefault(r => Math.Abs(r.Spec.FullScale.Amperes - fullScale) <= 1e-9 * fullScale)
                    ?? throw new ScpiException(
                        ScpiErrors.IllegalParameterValue,
                        $"no range has a full scale of {ScpiNumber.Nr3(fullScale)} A; the ranges are {string.Join(", ", uut.Ranges.Select(r => ScpiNumber.Nr3(r.Spec.FullScale.Amperes)))}");
                measurement.Clear();
                circuit.Change(b => b.Uut.Selected = range);
            })
            .Add("CONFigure?", c => c.Reply($"\"CURR {ScpiNumber.Nr3(circuit.At(b => b.Uut.Selected.Spec.FullScale.Amperes))}\""))
            .AddArmAndFetch("FETCh[:CURRent][:DC]?", measurement, Arm)
            .Add("READ?", Read)
            .AddSimulation(circuit);
        var spec = uut.Description;
        return new ScpiInstrument($"{spec.Manufacturer},{spec.Model},{spec.Serial},{uut.Firmware}", commands, measurement.Clear, measurement.WaitAsync);
    }
}

using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>Runs every bundled sequence on its simulated bench and checks the drop model chosen per range against what the bench's
/// <c>simulation:</c> section builds into that range (diodes, amplifier, feedback, heating), at the currents the sweep reached.</summary>
public sealed class ModelChoiceTests
{
    private static readonly string[] Thermal = ["self-heating", "self-heating-cubic", "heated-element"];
    private static readonly string[] Clamp = ["clamp-diodes", "clamp-diodes-onset"];

    /// <summary>A sweep of every TW-61 range like the demo's (no bundled sequence runs on that bench).</summary>
    private const string Tw61Sweep = """
        sequence: TW-61 — every range, 1 % to 100 % of full scale
        defaults: { dwell: 100 ms, samples: 5, nplc: 1, read: [drop, uut, reference] }
        limits: { maxDrop: 1.5 V, fuseDerating: 80 % }
        steps:
          - sweep: { range: 200uA, currents: { log: { from: 1 %, to: 100 %, points: 20 } } }
          - sweep: { range: 2mA, currents: { log: { from: 1 %, to: 100 %, points: 20 } } }
          - sweep: { range: 20mA, currents: { log: { from: 1 %, to: 100 %, points: 20 } } }
          - sweep: { range: 200mA, currents: { log: { from: 1 %, to: 100 %, points: 20 } }, settle: { agree: 4, within: 0.002 %, maxWait: 30 s } }
          - sweep: { range: 10A, currents: { log: { from: 0.1 A, to: 8 A, points: 20 } }, settle: { agree: 4, within: 0.0005 %, maxWait: 120 s } }
        """;

    public static TheoryData<string, string> Runs() => new()
    {
        { "sequences/demo-handheld.yaml", "simulators/handheld-tarnwell-tw18.yaml" },
        { "sequences/incoming-inspection-tw18.yaml", "simulators/handheld-tarnwell-tw18.yaml" },
        { "bench/full-characterisation.yaml", "simulators/handheld-tarnwell-tw18.yaml" },
        { "sequences/rnd-wide-range-lx1.yaml", "simulators/frontend-kestrel-lx1-proto.yaml" },
        { "tw61", "simulators/benchmeter-tarnwell-tw61.yaml" },
    };

    [Theory]
    [MemberData(nameof(Runs))]
    public async Task Run_ChoosesTheModelTheSimulatedFrontEndCalls_OnEveryRange(string sequence, string bench)
    {
        var dir = Some.TempDirectory();
        var path = sequence == "tw61" ? Some.TempFile(Tw61Sweep) : Repo.File(sequence);
        // The LX-1 prototype is outside its accuracy and burden targets: its run completes with verdict "outside specification".
        Assert.Equal(bench.Contains("lx1", StringComparison.Ordinal) ? 1 : 0, await Cli.RunAsync("run", path, "--bench", Repo.File(bench), "--out", dir, "--seed", "7", "--answers", Some.TempFile("otherwise: done\n")));

        var result = ResultJson.Read(Path.Combine(dir, "result.json"));
        var description = BenchReader.Load(Repo.File(bench));
        var wrong = new List<string>();
        foreach (var range in result.Ranges)
        {
            var truth = FrontEndTruth.Of(description, range.Name, range.FittedUpToA);
            if (!truth.Accepts(range.Model))
            {
                wrong.Add($"{range.Name}: chose {range.Model}, the simulated front end calls for {truth}");
            }

            var limitSeen = double.IsFinite(range.ReadingLimitA);
            if (limitSeen != double.IsFinite(truth.AmplifierLimitA))
            {
                wrong.Add($"{range.Name}: reading limit {range.ReadingLimitA:G4} A, amplifier saturates visibly at {truth.AmplifierLimitA:G4} A");
            }
            else if (limitSeen && (range.ReadingLimitA < truth.AmplifierLimitA * 0.999 || range.ReadingLimitA > truth.AmplifierLimitA * 1.02))
            {
                // The fine sweeps step 1 % of full scale: the first overloaded point lies within 1 % above the amplifier's swing.
                wrong.Add($"{range.Name}: reading limit {range.ReadingLimitA:G5} A, amplifier saturates at {truth.AmplifierLimitA:G5} A");
            }
        }

        Assert.True(wrong.Count == 0, string.Join("; ", wrong));
    }

    [Fact]
    public async Task Tw18Demo_SixMilliampRange_IsClampDiodes_AndSixtyMilliampIsNot()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(0, await Cli.RunAsync("run", Repo.File("sequences/demo-handheld.yaml"), "--bench", Repo.File("simulators/handheld-tarnwell-tw18.yaml"), "--out", dir, "--seed", "7"));
        var ranges = ResultJson.Read(Path.Combine(dir, "result.json")).Ranges.ToDictionary(r => r.Name);

        // The diodes across the 120 Ω shunt steal ~280 ppm of 6 mA at full scale; the 60 mA range has none and only its fuse heats.
        Assert.Equal("clamp-diodes-onset", ranges["6mA"].Model);
        Assert.DoesNotContain(ranges["6mA"].Points, p => p.Outlier);
        Assert.Contains(ranges["60mA"].Model, Thermal);
    }

    [Fact]
    public async Task Lx1RnD_RecoversTheKneeTheFeedbackResistorAndTheHeatingFuse()
    {
        var dir = Some.TempDirectory();
        Assert.Equal(1, await Cli.RunAsync("run", Repo.File("sequences/rnd-wide-range-lx1.yaml"), "--bench", Repo.File("simulators/frontend-kestrel-lx1-proto.yaml"), "--out", dir, "--seed", "7")); // completed, outside specification
        var ranges = ResultJson.Read(Path.Combine(dir, "result.json")).Ranges.ToDictionary(r => r.Name);
        double P(string range, string name) => ranges[range].Parameters!.Single(p => p.Name == name).Value;

        // The bench file: R_f = 10 kΩ and a 1.2 V swing (knee at 120 µA); the IN fuse 60 mΩ with α = 0.0039 /K and R_th = 600 K/W
        // (β = α·R_th·R = 0.1404 A⁻²). Within 0.1 % (measured with seed 7: 0.0001 %, 0.005 %, 0.005 % and 0.004 %).
        Assert.Equal("feedback-knee", ranges["100uA"].Model);
        Assert.Equal(120e-6, P("100uA", "kneeCurrent"), 120e-6 * 1e-3);
        Assert.Equal(10e3, P("100uA", "highResistance"), 10e3 * 1e-3);
        Assert.Equal("heated-element", ranges["1A"].Model);
        Assert.Equal(0.060, P("1A", "heatedResistance"), 0.060 * 1e-3);
        Assert.Equal(0.0039 * 600 * 0.060, P("1A", "heatingCoefficient"), 0.1404 * 1e-3);
    }

    /// <summary>What the simulated range's physics makes visible at the top of its sweep, from the bench file's <c>simulation:</c> section
    /// (the same keys and defaults the simulator reads, docs/simulation.md).</summary>
    /// <param name="Expected">The models the visible behaviour allows; any of them is right.</param>
    /// <param name="Why">The visible behaviour, for the failure message.</param>
    /// <param name="AmplifierLimitA">The current where the amplifier's output swing overloads the reading inside the sweep and the display's
    /// over-range; NaN when no such overload can be seen.</param>
    private sealed record FrontEndTruth(string[] Expected, string Why, double AmplifierLimitA)
    {
        /// <summary>Diode current above this fraction of the current at the top of the sweep is visible in the drop.</summary>
        private const double DiodeVisible = 30e-6, DiodeInvisible = 3e-6;

        /// <summary>Heating that adds more than this to the drop at the top is visible; below the lower bound it is not (drop noise ~1 µV).</summary>
        private const double HeatVisibleVolts = 10e-6, HeatInvisibleVolts = 1e-6;

        public bool Accepts(string model) => Expected.Contains(model);

        public override string ToString() => $"{string.Join(" or ", Expected)} ({Why})";

        public static FrontEndTruth Of(BenchDescription bench, string name, double top)
        {
            var spec = bench.Uut.Range(name);
            var sim = bench.Simulation ?? throw new InvalidOperationException("not a simulated bench");
            var uut = sim.Mapping("uut");
            var rm = uut?.Mapping("ranges")?.Mapping(name);
            var jm = uut?.Mapping("jacks")?.Mapping(spec.Jack);
            var kelvin = sim.QuantityOr("ambient", SiUnit.Celsius, 23) + 273.15;

            if (rm?.Mapping("feedback") is { } fb)
            {
                var knee = fb.Quantity("outputSwing", SiUnit.Volt) / fb.Quantity("resistance", SiUnit.Ohm);
                return top > knee ? new(["feedback-knee"], $"feedback ammeter, knee at {knee:G3} A", double.NaN) : new(["ohmic"], "feedback below its knee", double.NaN);
            }

            var shunt = rm?.QuantityOrNull("shunt", SiUnit.Ohm) ?? spec.NominalShunt?.Ohms ?? ((spec.BurdenAtFullScale?.Volts ?? 0.2) / spec.FullScale.Amperes);
            var heat = HeatingVolts(bench.Uut.Jack(spec.Jack), jm?.Mapping("fuse"), top) + HeatingVolts(shunt, rm?.QuantityOr("alpha", SiUnit.None, 15e-6) ?? 15e-6, rm?.QuantityOr("thermalResistance", SiUnit.None, 0) ?? 0, top);
            var amplifier = AmplifierLimit(rm?.Mapping("amplifier"), shunt, spec, top);

            if (rm?.Mapping("diodes") is { } dm)
            {
                // Shockley: I_d = 2·I_s·sinh(V_sh/(m·n·V_T)) for m diodes in series each way (the onset: the shunt still carries almost all of it).
                var nvt = dm.IntOr("series", 1) * dm.QuantityOr("ideality", SiUnit.None, 1.9) * 1.380649e-23 * kelvin / 1.602176634e-19;
                var stolen = 2 * dm.Quantity("saturationCurrent", SiUnit.Ampere) * Math.Sinh(Math.Min(shunt * top / nvt, 700)) / top;
                if (stolen > DiodeVisible)
                {
                    return new(Clamp, $"diodes steal {stolen * 1e6:G3} ppm at {top:G3} A", amplifier);
                }

                if (stolen > DiodeInvisible)
                {
                    return new([.. Clamp, .. Linear(amplifier), .. Thermal], $"diodes steal {stolen * 1e6:G3} ppm, too close to call", amplifier);
                }
            }

            var why = $"heating adds {heat * 1e6:G3} µV at {top:G3} A" + (double.IsFinite(amplifier) ? $", amplifier saturates at {amplifier:G4} A" : string.Empty);
            return heat > HeatVisibleVolts ? new(Thermal, why, amplifier)
                : heat < HeatInvisibleVolts ? new(Linear(amplifier), why, amplifier)
                : new([.. Linear(amplifier), .. Thermal], why + ", too close to call", amplifier);
        }

        private static string[] Linear(double amplifier) => double.IsFinite(amplifier) ? ["amplified-shunt"] : ["ohmic"];

        /// <summary>The current where G·(V_sh + V_os) reaches the output swing, when that lies inside the sweep and the display's over-range.</summary>
        private static double AmplifierLimit(MappingReader? am, double shunt, RangeSpec spec, double top)
        {
            if (am is null)
            {
                return double.NaN;
            }

            var limit = ((am.Quantity("outputSwing", SiUnit.Volt) / am.Quantity("gain", SiUnit.None)) - am.QuantityOr("inputOffset", SiUnit.Volt, 0)) / shunt;
            return limit < top && limit < spec.FullScale.Amperes * (1 + spec.OverRange) ? limit : double.NaN;
        }

        /// <summary>The fuse's extra drop at <paramref name="i"/>: R·β·I³ with β = α·R_th·R (small heating), defaults as the simulator's.</summary>
        private static double HeatingVolts(JackSpec jack, MappingReader? fm, double i)
        {
            var rating = jack.FuseRating.Amperes;
            var r0 = fm?.QuantityOr("coldResistance", SiUnit.Ohm, 0.1 / rating) ?? (0.1 / rating);
            var alpha = fm?.QuantityOr("alpha", SiUnit.None, 0.0039) ?? 0.0039;
            return HeatingVolts(r0, alpha, fm?.QuantityOr("thermalResistance", SiUnit.None, 1 / (alpha * r0 * 4 * rating * rating)) ?? (1 / (alpha * r0 * 4 * rating * rating)), i);
        }

        private static double HeatingVolts(double r, double alpha, double thermalResistance, double i) => alpha * thermalResistance * r * r * i * i * i;
    }
}

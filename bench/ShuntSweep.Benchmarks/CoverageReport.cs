using System.Globalization;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Benchmarks;

/// <summary>Coverage of the expanded intervals the analysis reports, over many seeded synthetic sweeps with known truth: the
/// fraction of seeds whose interval value ± U holds the true resistance, offset and a predicted current. Too slow for the unit
/// suite; run as <c>coverage [SEEDS]</c>.</summary>
public static class CoverageReport
{
    private const double Offset = 2e-6;

    /// <summary>Runs every scenario for <paramref name="seeds"/> seeds and prints one line per scenario.</summary>
    public static int Run(int seeds)
    {
        Console.WriteLine($"Coverage of the 95 % expanded intervals over {seeds} seeds (target 95 %; binomial SD {QuantityFormatter.Format(100 * Math.Sqrt(0.95 * 0.05 / seeds), SiUnit.None, 2)} %)");
        Console.WriteLine("truth          points  R        offset   predicted I  chosen models");
        foreach (var (truthName, drop) in new (string, Func<double, double>)[]
        {
            // A 100 mΩ shunt with 10 µV noise per sample (invented values).
            ("ohmic", i => 0.1 * i),

            // Self-heating R = R₀/(1 − β·I²) (common practice, no source), β = 0.05 A⁻²: +5 % at 1 A.
            ("self-heating", i => 0.1 * i / (1 - (0.05 * i * i))),
        })
        {
            foreach (var points in new[] { 3, 4, 25 })
            {
                int r = 0, o = 0, p = 0, n = 0;
                var models = new SortedDictionary<string, int>(StringComparer.Ordinal);
                for (var seed = 0; seed < seeds; seed++)
                {
                    var rng = new Random((points * 100_000) + seed + (truthName.Length * 7_777_777));
                    var samples = Sweep(points, i => Offset + drop(i), 10e-6, 4, rng);
                    var result = Characteriser.Analyse(samples, null, new AnalysisOptions { MonteCarloTrials = 0 });
                    var range = result.Ranges[0];
                    models[range.Model] = models.GetValueOrDefault(range.Model) + 1;
                    r += Covers(range.ResistanceOhms.Value, range.ResistanceOhms.Expansion(0.95).U, 0.1) ? 1 : 0;
                    o += Covers(range.OffsetVolts.Value, range.OffsetVolts.Expansion(0.95).U, Offset) ? 1 : 0;

                    // A 0.5 V source behind 1 Ω: the true current solves 0.5 = I·1 + drop(I), the offset being the voltmeter's zero.
                    var truth = Bisect(i => (i * 1.0) + drop(i) - 0.5, 0, 0.5);
                    var predicted = InsertionError.Predict(result, 0.5, 1.0).Ranges[0];
                    if (predicted.Reason is null)
                    {
                        p += Covers(predicted.CurrentA.Value, predicted.CurrentA.Expansion(0.95).U, truth) ? 1 : 0;
                        n++;
                    }
                }

                Console.WriteLine(string.Create(
                    CultureInfo.InvariantCulture,
                    $"{truthName,-14} {points,6}  {Percent(r, seeds),-8} {Percent(o, seeds),-8} {Percent(p, n),-12} {string.Join(", ", models.Select(kv => $"{kv.Key} {kv.Value}"))}"));
            }
        }

        return 0;
    }

    private static bool Covers(double value, double expanded, double truth) => double.IsFinite(expanded) && Math.Abs(value - truth) <= expanded;

    private static string Percent(int hits, int total) => total == 0 ? "—" : $"{QuantityFormatter.Format(100.0 * hits / total, SiUnit.None, 3)} %";

    private static double Bisect(Func<double, double> f, double a, double b)
    {
        for (var k = 0; k < 200; k++)
        {
            var m = (a + b) / 2;
            (a, b) = Math.Sign(f(m)) == Math.Sign(f(a)) ? (m, b) : (a, m);
        }

        return (a + b) / 2;
    }

    /// <summary>A sweep of <paramref name="points"/> currents from 0.1 A to 1 A with Gaussian noise on every drop sample.</summary>
    private static List<Sample> Sweep(int points, Func<double, double> drop, double noise, int perPoint, Random rng)
    {
        var list = new List<Sample>();
        for (var step = 0; step < points; step++)
        {
            var i = 0.1 + (0.9 * step / (points - 1));
            for (var k = 0; k < perPoint; k++)
            {
                var v = drop(i) + (noise * Math.Sqrt(-2.0 * Math.Log(1.0 - rng.NextDouble())) * Math.Cos(2.0 * Math.PI * rng.NextDouble()));
                list.Add(new Sample("1A", "A", step, k, new Current(i), new Current(i), double.NaN, new Voltage(v), new Voltage(5), new Voltage(5 - v), TimeSpan.FromSeconds((step * perPoint) + k)));
            }
        }

        return list;
    }
}

using BenchmarkDotNet.Attributes;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Thermal;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Benchmarks;

/// <summary>The analysis at the sizes a long characterisation produces.</summary>
/// <remarks>Goals: the whole analysis of 6 ranges × 1000 points (model comparison and the per-jack joint fit) under 20 ms;
/// a one-million-point weighted straight-line fit under 200 ms; a 36 000-sample thermal hold fit under 100 ms.</remarks>
[MemoryDiagnoser]
public class AnalysisBenchmarks
{
    private readonly List<Sample> _sixRanges = [];
    private double[] _x = [];
    private double[] _y = [];
    private double[] _w = [];
    private double[] _t = [];
    private double[] _v = [];

    [GlobalSetup]
    public void Setup()
    {
        var rng = new Random(1);
        (string Name, string Jack, double FullScale, double Ohms, double Beta)[] ranges =
        [
            ("600uA", "mA", 600e-6, 100, 0), ("6mA", "mA", 6e-3, 10, 0), ("60mA", "mA", 0.06, 1.1, 0),
            ("600mA", "mA", 0.6, 0.25, 0.05), ("6A", "A", 6, 0.02, 2e-3), ("10A", "A", 10, 0.015, 1.5e-3),
        ];
        var step = 0;
        foreach (var r in ranges)
        {
            for (var k = 0; k < 1000; k++, step++)
            {
                var i = r.FullScale * k / 999;
                for (var s = 0; s < 2; s++)
                {
                    var v = (r.Ohms * i / (1 - (r.Beta * i * i))) + (20e-6 * Gaussian(rng));
                    _sixRanges.Add(new Sample(r.Name, r.Jack, step, s, new Current(i), new Current(i), double.NaN, new Voltage(v), new Voltage(5), new Voltage(4), TimeSpan.FromSeconds(step)));
                }
            }
        }

        const int n = 1_000_000;
        _x = new double[n];
        _y = new double[n];
        _w = new double[n];
        for (var k = 0; k < n; k++)
        {
            _x[k] = 10.0 * k / n;
            _y[k] = 1e-5 + (0.012 * _x[k]) + (10e-6 * Gaussian(rng));
            _w[k] = 1 / (10e-6 * 10e-6);
        }

        _t = Enumerable.Range(0, 36_000).Select(k => k * 0.01).ToArray();
        _v = _t.Select(x => 0.1 - (0.002 * Math.Exp(-x / 2)) - (0.003 * Math.Exp(-x / 60)) + (20e-6 * Gaussian(rng))).ToArray();
    }

    [Benchmark(Description = "analysis, 6 ranges x 1000 points")]
    public object SixRangesThousandPoints() => Characteriser.Analyse(_sixRanges, null);

    [Benchmark(Description = "weighted ohmic fit, 1e6 points")]
    public object OhmicMillionPoints() => LinearLeastSquares.Polynomial(_x, _y, _w, 1);

    [Benchmark(Description = "thermal hold fit, 36 000 samples")]
    public object ThermalHold() => ThermalStepFitter.Fit(_t, _v, 0, 5.0)!;

    private static double Gaussian(Random rng) =>
        Math.Sqrt(-2.0 * Math.Log(1.0 - rng.NextDouble())) * Math.Cos(2.0 * Math.PI * rng.NextDouble());
}

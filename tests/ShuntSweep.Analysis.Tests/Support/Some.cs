using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Analysis.Tests.Support;

/// <summary>Test data built from the physics formulas with a seeded generator (not from the simulator).</summary>
internal static class Some
{
    /// <summary>Samples of one range whose drop is <paramref name="drop"/>(I) plus Gaussian noise of <paramref name="noiseVolts"/>.</summary>
    public static List<Sample> Sweep(
        string range,
        string jack,
        IEnumerable<double> currents,
        Func<double, double> drop,
        double noiseVolts,
        int samplesPerPoint,
        Random rng,
        int firstStep = 0,
        Func<double, double>? reading = null)
    {
        var list = new List<Sample>();
        var step = firstStep;
        foreach (var i in currents)
        {
            for (var k = 0; k < samplesPerPoint; k++)
            {
                var v = drop(i) + (noiseVolts * Gaussian(rng));
                list.Add(new Sample(
                    range,
                    jack,
                    step,
                    k,
                    new Current(i),
                    new Current(i),
                    reading?.Invoke(i) ?? double.NaN,
                    new Voltage(v),
                    new Voltage(5.0),
                    new Voltage(5.0 - v),
                    TimeSpan.FromSeconds((step * samplesPerPoint) + k)));
            }

            step++;
        }

        return list;
    }

    /// <summary>n currents evenly spaced from <paramref name="from"/> to <paramref name="to"/>.</summary>
    public static IEnumerable<double> Linear(double from, double to, int n) =>
        Enumerable.Range(0, n).Select(k => from + ((to - from) * k / (n - 1)));

    /// <summary>A standard normal deviate by Box–Muller.</summary>
    public static double Gaussian(Random rng)
    {
        var u1 = 1.0 - rng.NextDouble();
        var u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2.0 * Math.PI * u2);
    }
}

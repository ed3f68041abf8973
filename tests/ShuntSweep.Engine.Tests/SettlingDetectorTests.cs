using ShuntSweep.Engine.Running;
using Xunit;

namespace ShuntSweep.Engine.Tests;

public sealed class SettlingDetectorTests
{
    // A first-order thermal step (common practice, no source): V(t) = V∞ − A·e^(−t/τ), here a fuse with τ = 2 s read every 22 ms,
    // 70 µV still to come on a 0.14 V drop; the tolerance is 20 ppm of the drop (2.8 µV).
    private const double Final = 0.14, Step = 70e-6, Tau = 2, Interval = 0.022, Tolerance = 2e-5;

    [Fact]
    public void NoiselessExponential_IsDeclaredSettled_OnlyOnceWhatIsLeftIsWithinTheTolerance()
    {
        var (k, _) = Settle(seed: null);

        Assert.True(k > 0, "never settled");
        Assert.True(Left(k) <= Tolerance * Final, $"settled at reading {k} with {Left(k) * 1e6:0.00} µV still to come");
    }

    [Fact]
    public void NoisyExponential_IsNeverDeclaredSettledWithMoreThanTheToleranceToCome()
    {
        for (var seed = 1; seed <= 30; seed++)
        {
            var (k, _) = Settle(seed);
            Assert.True(k > 0, $"seed {seed}: never settled");
            Assert.True(Left(k) <= Tolerance * Final, $"seed {seed}: settled at reading {k} with {Left(k) * 1e6:0.00} µV still to come");
        }
    }

    [Fact]
    public void FastAndSlowElementTogether_AreFollowedUntilTheSlowOneIsWithinTheTolerance()
    {
        // A 10 A step on a fused jack: the fuse's 7 mV (τ = 2 s) and the shunt's 95 µV (τ = 20 s) on a 0.56 V drop; 5 ppm tolerance.
        const double final = 0.56, tolerance = 5e-6;
        static double Left(int k) => (7e-3 * Math.Exp(-k * Interval / 2)) + (95e-6 * Math.Exp(-k * Interval / 20));
        for (var seed = 1; seed <= 5; seed++)
        {
            var rng = new Random(seed);
            var detector = new SettlingDetector(4, tolerance);
            var k = 0;
            while (!detector.Add(final - Left(k) + (0.8e-6 * Gaussian(rng))))
            {
                k++;
                Assert.True(k < 20000, "never settled");
            }

            Assert.True(Left(k) <= tolerance * final, $"seed {seed}: settled after {k * Interval:0.0} s with {Left(k) * 1e6:0.0} µV still to come");
        }
    }

    [Fact]
    public void AgreementAlone_WouldStopLongBeforeTheDriftIsOver()
    {
        // The plain rule "the last 4 readings agree within the tolerance" is met almost at once on this slow step.
        var rng = new Random(3);
        var readings = Enumerable.Range(0, 2000).Select(k => Reading(k, rng)).ToList();
        var agreeAt = Enumerable.Range(3, readings.Count - 3).First(k => readings.Skip(k - 3).Take(4).Max() - readings.Skip(k - 3).Take(4).Min() <= Tolerance * Final);
        var (settledAt, _) = Settle(seed: 3);

        Assert.True(Left(agreeAt) > 5 * Tolerance * Final, $"agreement at reading {agreeAt} leaves {Left(agreeAt) * 1e6:0.0} µV");
        Assert.True(settledAt > 5 * agreeAt, $"detector {settledAt}, agreement {agreeAt}");
    }

    [Fact]
    public void SteadyNoisyLevel_SettlesAsSoonAsFourWindowsAreIn()
    {
        var rng = new Random(5);
        var detector = new SettlingDetector(4, Tolerance);
        var k = 0;
        while (!detector.Add(Final + (0.8e-6 * Gaussian(rng))))
        {
            k++;
            Assert.True(k < 100, "a steady level did not settle");
        }

        // Four windows of four readings after the first third of the wait: 23 readings.
        Assert.Equal(22, k);
    }

    [Fact]
    public void ToleranceFinerThanTheNoise_IsReplacedByTheNoise_SoASteadyLevelStillSettles()
    {
        // 1 ppb of 10 µV is far below the 30 nV noise of each reading: the noise is all that can be shown.
        var rng = new Random(6);
        var detector = new SettlingDetector(4, 1e-9);
        var k = 0;
        while (!detector.Add(10e-6 + (30e-9 * Gaussian(rng))))
        {
            k++;
            Assert.True(k < 200, "a steady level never settled under a tolerance finer than the noise");
        }
    }

    [Fact]
    public void MinimumReadings_IsTheFirstCountOnWhichASteadyLevelCanSettle()
    {
        // Four windows of max(N, 3) readings after the first third of the wait; a flat, noiseless level settles on the first of them.
        foreach (var window in new[] { 1, 3, 4, 10 })
        {
            var detector = new SettlingDetector(window, Tolerance);
            var k = 1;
            while (!detector.Add(Final))
            {
                k++;
            }

            Assert.Equal(SettlingDetector.MinimumReadings(window), k);
        }
    }

    [Fact]
    public void LinearRamp_NeverSettles()
    {
        var detector = new SettlingDetector(4, Tolerance);
        for (var k = 0; k < 5000; k++)
        {
            // 0.1 µV per reading: every window agrees, but the drift has no end.
            Assert.False(detector.Add(Final + (1e-7 * k)), $"settled at reading {k}");
        }
    }

    private static (int Reading, double Remaining) Settle(int? seed)
    {
        var rng = seed is { } s ? new Random(s) : null;
        var detector = new SettlingDetector(4, Tolerance);
        for (var k = 0; k < 20000; k++)
        {
            if (detector.Add(Reading(k, rng)))
            {
                return (k, detector.RemainingChange);
            }
        }

        return (-1, double.NaN);
    }

    private static double Reading(int k, Random? rng) => Final - (Step * Math.Exp(-k * Interval / Tau)) + (rng is null ? 0 : 0.8e-6 * Gaussian(rng));

    private static double Left(int k) => Step * Math.Exp(-k * Interval / Tau);

    private static double Gaussian(Random rng) => Math.Sqrt(-2.0 * Math.Log(1.0 - rng.NextDouble())) * Math.Cos(2.0 * Math.PI * rng.NextDouble());
}

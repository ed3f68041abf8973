using ShuntSweep.Analysis.Tests.Support;
using ShuntSweep.Analysis.Thermal;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Analysis.Tests.Thermal;

public sealed class ThermalStepTests
{
    [Fact]
    public void Fit_ResolvesFastFuseAndSlowShunt_InATwoElementHold()
    {
        // Two first-order thermal RC elements heated by a current step: the fuse (τ = 2 s) and the shunt and body (τ = 60 s).
        var rng = new Random(9);
        var t = Enumerable.Range(0, 36_000).Select(k => k * 0.01).ToArray();
        var v = t.Select(x => 0.100 - (0.002 * Math.Exp(-x / 2)) - (0.003 * Math.Exp(-x / 60)) + (20e-6 * Some.Gaussian(rng))).ToArray();

        var hold = ThermalStepFitter.Fit(t, v, 3, 5.0);

        Assert.NotNull(hold);
        Assert.Equal("two-exponential", hold.Model);
        Check.Within(2, hold.Terms[0].TimeConstantSeconds, 4);
        Check.Within(60, hold.Terms[1].TimeConstantSeconds, 4);
        Check.Within(-0.002, hold.Terms[0].AmplitudeVolts, 4);
        Check.Within(0.100, hold.SettledDropVolts, 4);
        Assert.StartsWith("fuse", hold.Terms[0].AttributedTo, StringComparison.Ordinal);
    }

    [Fact]
    public void Fit_KeepsOneTerm_WhenOnlyOneElementHeats()
    {
        // τ = 63.2 % settling time of one thermal RC element.
        var rng = new Random(10);
        var t = Enumerable.Range(0, 3000).Select(k => k * 0.1).ToArray();
        var v = t.Select(x => 0.05 - (0.001 * Math.Exp(-x / 30)) + (10e-6 * Some.Gaussian(rng))).ToArray();

        var hold = ThermalStepFitter.Fit(t, v, 0, 1.0);

        Assert.NotNull(hold);
        Assert.Equal("one-exponential", hold.Model);
        Check.Within(30, Assert.Single(hold.Terms).TimeConstantSeconds, 4);
    }

    [Fact]
    public void Fit_ReturnsNull_WhenTheDropDoesNotSettle()
    {
        var rng = new Random(12);
        var t = Enumerable.Range(0, 500).Select(k => k * 0.1).ToArray();
        var v = t.Select(_ => 0.05 + (10e-6 * Some.Gaussian(rng))).ToArray();

        Assert.Null(ThermalStepFitter.Fit(t, v, 0, 1.0));
    }

    [Fact]
    public void Analyse_UsesTheSettledDropOfAHold_AsItsPoint()
    {
        var rng = new Random(13);
        var samples = Some.Sweep("10A", "A", Some.Linear(0, 10, 11), i => 0.01 * i, 10e-6, 5, rng);
        var hold = Enumerable.Range(0, 600).Select(k => new Sample(
            "10A", "A", 100, k, new Current(5), new Current(5), double.NaN,
            new Voltage(0.05 - (0.004 * Math.Exp(-k * 0.5 / 20)) + (10e-6 * Some.Gaussian(rng))),
            new Voltage(5), new Voltage(4.9), TimeSpan.FromSeconds(1000 + (k * 0.5)))).ToList();

        var range = Characteriser.Analyse([.. samples, .. hold], null).Ranges[0];

        var thermal = Assert.Single(range.Thermal!);
        Assert.Equal(100, thermal.Step);
        var point = range.Points.Single(p => p.Step == 100);
        Assert.Equal(thermal.SettledDropVolts.Value, point.DropVolts, 12);
        Assert.Equal(0.05, point.DropVolts, 4);
        Assert.False(point.Outlier);
    }
}

using CsCheck;
using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Uncertainty;

namespace ShuntSweep.Analysis.Tests;

/// <summary>Property tests of the mathematics over generated inputs.</summary>
public sealed class PropertyTests
{
    [Fact]
    public void Brent_FindsTheRootOfAnyIncreasingCubic()
    {
        Gen.Select(Gen.Double[-1e3, 1e3], Gen.Double[0, 100], Gen.Double[0.01, 1e3], Gen.Double[0.01, 1e3], (r, c, below, above) => (r, c, below, above))
            .Sample((r, c, below, above) =>
            {
                var x = RootFinder.Brent(v => (v - r) + (c * Math.Pow(v - r, 3)), r - below, r + above);
                Assert.True(Math.Abs(x - r) <= 1e-9 * (1 + Math.Abs(r)), $"root {r}, found {x}");
            });
    }

    [Fact]
    public void MonteCarloQuantile_BySelection_EqualsTheSortedInterpolation()
    {
        // The interpolated order statistic of JCGM 101 7.7, computed from a full sort, is the reference for the selection the check uses.
        Gen.Select(Gen.Double[-1e6, 1e6].Array[1, 400], Gen.Double[0, 1], (values, q) => (values, q))
            .Sample((values, q) =>
            {
                var sorted = values.Order().ToArray();
                var pos = q * (sorted.Length - 1);
                var lo = (int)Math.Floor(pos);
                var hi = Math.Min(lo + 1, sorted.Length - 1);
                var expected = sorted[lo] + ((pos - lo) * (sorted[hi] - sorted[lo]));
                Assert.Equal(expected, MonteCarloCheck.Quantile((double[])values.Clone(), q), 1e-9 * (1 + Math.Abs(expected)));
            });
    }

    [Fact]
    public void LinearFit_RecoversAnExactLine()
    {
        Gen.Select(Gen.Double[-10, 10], Gen.Double[-1e3, 1e3], Gen.Double[1e-6, 1e3], (b0, b1, span) => (b0, b1, span))
            .Sample((b0, b1, span) =>
            {
                var x = Enumerable.Range(0, 7).Select(k => span * k / 6).ToArray();
                var y = x.Select(v => b0 + (b1 * v)).ToArray();
                var fit = LinearLeastSquares.Polynomial(x, y, [], 1);
                Assert.Equal(b0, fit.Parameters[0], 1e-9 * (Math.Abs(b0) + (Math.Abs(b1) * span) + 1));
                Assert.Equal(b1, fit.Parameters[1], 1e-9 * (Math.Abs(b1) + ((Math.Abs(b0) + 1) / span)));
            });
    }

    [Fact]
    public void ClampDiodeShuntVoltage_SolvesItsImplicitEquation()
    {
        var nvtPerN = PhysicalConstants.ThermalVoltage(296.15);
        Gen.Select(Gen.Double[1e-6, 1], Gen.Double[0.01, 100], Gen.Double[-30, -10], Gen.Double[1, 2], (i, rsh, lnIs, n) => (i, rsh, lnIs, n))
            .Sample((i, rsh, lnIs, n) =>
            {
                var twoIs = 2 * Math.Exp(lnIs);
                var nvt = n * nvtPerN;
                var v = ClampDiodeModel.ShuntVoltage(i, rsh, twoIs, nvt);
                var residual = (v / rsh) + (twoIs * Math.Sinh(v / nvt)) - i;
                Assert.True(Math.Abs(residual) <= 1e-9 * i, $"I = {i}, V = {v}, residual {residual}");
                Assert.Equal(-v, ClampDiodeModel.ShuntVoltage(-i, rsh, twoIs, nvt));
            });
    }

    [Fact]
    public void Correct_InvertsPredict_ForAnyOhmicCircuit()
    {
        Gen.Select(Gen.Double[0.01, 100], Gen.Double[1, 1e5], Gen.Double[1e-3, 100], (volts, ohms, meter) => (volts, ohms, meter))
            .Sample((volts, ohms, meter) =>
            {
                var result = new CharacterisationResult(
                [
                    new RangeResult("R", "J", 1e6, "ohmic", new Estimate(meter, 0), new Estimate(0, 0), 0, 0, [],
                        [new ParameterResult("offset", "V", 0, 0, ""), new ParameterResult("resistance", "Ω", meter, 0, "")], FittedUpToA: 1e6),
                ]);
                var p = InsertionError.Predict(result, volts, ohms).Ranges[0];
                var c = InsertionError.Correct(result, "R", p.CurrentA.Value, ohms);
                Assert.Equal(volts / (ohms + meter), p.CurrentA.Value, 1e-12 * volts / ohms);
                Assert.Equal(volts / ohms, c.UndisturbedCurrentA.Value, 1e-12 * volts / ohms);
            });
    }

    [Fact]
    public void WelchSatterthwaite_LiesBetweenTheSmallestAndTheSumOfTheDegreesOfFreedom()
    {
        // JCGM 100:2008 G.4.1 (bound from memory): min νᵢ ≤ ν_eff ≤ Σ νᵢ for positive contributions.
        Gen.Select(Gen.Double[0.01, 10].Array[1, 6], Gen.Double[1, 100].Array[6], (u, nu) => (u, nu))
            .Sample((u, nu) =>
            {
                var parts = u.Select((ui, i) => (ui, nu[i])).ToArray();
                var uc = Math.Sqrt(u.Sum(x => x * x));
                var eff = GumBudget.WelchSatterthwaite(uc, parts);
                var used = nu.Take(u.Length).ToArray();
                Assert.InRange(eff, used.Min() * (1 - 1e-9), used.Sum() * (1 + 1e-9));
            });
    }

    [Fact]
    public void ResultJson_WritesNonFiniteNumbersAsNull_AndReadsThemBackAsNaN()
    {
        Gen.Double.Sample(v =>
        {
            var result = new CharacterisationResult([new RangeResult("R", "J", 1, "ohmic", new Estimate(v, 1), new Estimate(0, 0), v, 0, [])]);
            var back = ResultJson.Deserialize(ResultJson.Serialize(result));
            var got = back.Ranges[0].ResistanceOhms.Value;
            Assert.True(double.IsFinite(v) ? got == v : double.IsNaN(got), $"{v} came back as {got}");
        });
    }
}

using MathNet.Numerics.Distributions;
using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis;

/// <summary>Separates each jack's common series part (fuse, contacts, leads) from its ranges' shunts, under stated hypotheses, each with a χ² check.</summary>
internal static class JackDecomposer
{
    /// <summary>Every separation the data and the UUT description allow, per jack; the tap separation first where the bench had a shunt tap.</summary>
    public static List<JackDecomposition> Decompose(IReadOnlyList<RangeAnalysis> ranges, IReadOnlyList<TapFit> taps, UutDescription? uut, AnalysisOptions options)
    {
        var list = new List<JackDecomposition>();
        foreach (var jack in ranges.GroupBy(r => r.Result.Jack))
        {
            var members = jack.ToList();
            var separations = new List<Separation>();
            var tapped = taps.Where(t => members.Any(m => m.Result.Name == t.Range)).ToList();
            if (tapped.Count > 0)
            {
                separations.Add(TapSeparation.Separate(tapped));
            }

            var nominals = members
                .Select(r => (Range: r, Nominal: uut?.Ranges.FirstOrDefault(s => s.Name == r.Result.Name)?.NominalShunt?.Ohms))
                .Where(t => t.Nominal is > 0)
                .Select(t => (t.Range, Nominal: t.Nominal!.Value))
                .ToList();
            if (nominals.Count >= 1)
            {
                separations.Add(NominalShunts(nominals));
            }

            if (nominals.Select(n => n.Nominal).Distinct().Count() >= 2)
            {
                separations.Add(ShuntRatio(nominals));
            }

            if (members.Any(r => r.Result.Model is "self-heating" or "self-heating-cubic" or "heated-element") && SharedHeating(members, options) is { } heating)
            {
                separations.Add(heating);
            }

            if (ThermalStep(members, options) is { } step)
            {
                separations.Add(step);
            }

            list.Add(new JackDecomposition(jack.Key, members.Select(m => m.Result.Name).ToList(), separations));
        }

        return list;
    }

    /// <summary>Hypothesis: every shunt is at its nominal value, so R_range − R_nominal is the jack's common series part, the same for every range.</summary>
    private static Separation NominalShunts(List<(RangeAnalysis Range, double Nominal)> ranges)
    {
        var (common, chi2) = WeightedMean(ranges.Select(t => new Estimate(t.Range.Result.ResistanceOhms.Value - t.Nominal, t.Range.Result.ResistanceOhms.StandardUncertainty)).ToList());
        var (mean, u) = (common.Value, common.StandardUncertainty);
        var dof = ranges.Count - 1;
        var shunts = ranges.ToDictionary(
            t => t.Range.Result.Name,
            t => new Estimate(t.Range.Result.ResistanceOhms.Value - mean, Math.Sqrt(Math.Max(Square(t.Range.Result.ResistanceOhms.StandardUncertainty) - (u * u), 0))));
        return Make("nominal-shunts", "each shunt is at its nominal value; the rest of each range's resistance is the jack's common series part", common, shunts, chi2, dof, null);
    }

    /// <summary>Hypothesis: the shunts keep the ratios of their nominal values (one common scale factor S), R_range = S·R_nominal + R_common.</summary>
    private static Separation ShuntRatio(List<(RangeAnalysis Range, double Nominal)> ranges)
    {
        var x = ranges.Select(t => t.Nominal).ToArray();
        var y = ranges.Select(t => t.Range.Result.ResistanceOhms.Value).ToArray();
        var w = ranges.Select(t => 1 / Square(t.Range.Result.ResistanceOhms.StandardUncertainty)).ToArray();
        var fit = ranges.Count > 2
            ? LinearLeastSquares.Polynomial(x, y, w, 1)
            : ExactLine(x, y, w);
        var s2 = fit.DegreesOfFreedom > 0 ? fit.ChiSquare / fit.DegreesOfFreedom : 1;
        var cov = new double[2, 2];
        for (var i = 0; i < 2; i++)
        {
            for (var j = 0; j < 2; j++)
            {
                cov[i, j] = s2 > 0 ? fit.Covariance[i, j] / s2 : fit.Covariance[i, j];
            }
        }

        var common = new Estimate(fit.Parameters[0], Math.Sqrt(cov[0, 0]));
        var scale = new Estimate(fit.Parameters[1], Math.Sqrt(cov[1, 1]));
        var shunts = ranges.ToDictionary(t => t.Range.Result.Name, t => new Estimate(fit.Parameters[1] * t.Nominal, t.Nominal * scale.StandardUncertainty));
        return Make(
            "shunt-ratio",
            "the shunts keep the ratios of their nominal values (one scale factor S); R_range = S·R_nominal + R_common",
            common,
            shunts,
            fit.ChiSquare,
            fit.DegreesOfFreedom,
            new Dictionary<string, Estimate> { ["shuntScale"] = scale });
    }

    /// <summary>Hypothesis: only the jack's common element heats (the shunts are manganin-like); V = V₀ᵣ + R_sh,r·I + R_c·I/(1 − β·I²)
    /// with R_c and β shared by the jack's heating ranges, separable through the higher-order (I⁵) heating term.</summary>
    /// <remarks>For fixed β the model is linear in (V₀ᵣ, R_sh,r, R_c), so β is found by a golden-section search of the profile χ²(β)
    /// (the β-free columns factored once by QR); the covariance of all parameters then comes from the QR of the full Jacobian at the optimum.
    /// Ranges that show no heating add nothing to R_c or β and are left out.</remarks>
    private static Separation? SharedHeating(List<RangeAnalysis> ranges, AnalysisOptions options)
    {
        var heated = ranges.Where(r => r.Result.Model is "self-heating" or "self-heating-cubic" or "heated-element").ToList();
        var betaStart = heated.Select(r => r.Fits.FirstOrDefault(f => f.Succeeded && f.Model is SelfHeatingModel)?.Parameters[2] ?? 0).Max();
        var k = heated.Count;
        var n = heated.Sum(r => r.Data.Current.Length);
        var x = new double[n];
        var y = new double[n];
        var sw = new double[n];
        var index = new int[n];
        var o = 0;
        for (var r = 0; r < k; r++)
        {
            var d = heated[r].Data;
            for (var i = 0; i < d.Current.Length; i++, o++)
            {
                x[o] = d.Current[i];
                y[o] = d.Drop[i];
                sw[o] = Math.Sqrt(d.Weight[i]);
                index[o] = r;
            }
        }

        var imax = x.Max(Math.Abs);
        var upper = SelfHeatingModel.MaxHeatingFraction / (imax * imax);
        if (!(betaStart > 0) || betaStart >= upper || n <= (2 * k) + 2)
        {
            return null;
        }

        var m = (2 * k) + 1;
        double Profile(double beta, out double[] coefficients)
        {
            var a = new double[n * m];
            var b = new double[n];
            for (var i = 0; i < n; i++)
            {
                var r = index[i];
                a[((2 * r) * n) + i] = sw[i];
                a[(((2 * r) + 1) * n) + i] = x[i] * sw[i];
                a[((2 * k) * n) + i] = x[i] / (1 - (beta * x[i] * x[i])) * sw[i];
                b[i] = y[i] * sw[i];
            }

            var qr = new HouseholderQr(a, n, m);
            coefficients = qr.Solve(b);
            var chi = 0.0;
            for (var i = m; i < n; i++)
            {
                chi += b[i] * b[i];
            }

            return chi;
        }

        // The per-range columns (V₀ᵣ, R_sh,r) do not depend on β: factor them once, then each trial only projects the R_c column,
        // χ²(β) = ‖P⊥b‖² − (cᵀP⊥b)²/‖P⊥c‖² with c = I/(1 − β·I²).
        var fixedCols = new double[n * 2 * k];
        var wb = new double[n];
        for (var i = 0; i < n; i++)
        {
            var r = index[i];
            fixedCols[((2 * r) * n) + i] = sw[i];
            fixedCols[(((2 * r) + 1) * n) + i] = x[i] * sw[i];
            wb[i] = y[i] * sw[i];
        }

        var fixedQr = new HouseholderQr(fixedCols, n, 2 * k);
        fixedQr.ApplyQt(wb);
        var column = new double[n];
        double Chi(double beta)
        {
            for (var i = 0; i < n; i++)
            {
                column[i] = x[i] / (1 - (beta * x[i] * x[i])) * sw[i];
            }

            fixedQr.ApplyQt(column);
            double bb = 0, cb = 0, cc = 0;
            for (var i = 2 * k; i < n; i++)
            {
                bb += wb[i] * wb[i];
                cb += column[i] * wb[i];
                cc += column[i] * column[i];
            }

            return cc > 0 ? bb - (cb * cb / cc) : bb;
        }

        // Golden-section search of χ²(β) on [β_range/2, runaway limit): sharing the heating between fewer ohms raises β.
        double lo = betaStart * 0.5, hi = upper;
        var g = (Math.Sqrt(5) - 1) / 2;
        var c1 = hi - (g * (hi - lo));
        var c2 = lo + (g * (hi - lo));
        var f1 = Chi(c1);
        var f2 = Chi(c2);
        for (var iter = 0; iter < 100 && hi - lo > 1e-9 * hi; iter++)
        {
            if (f1 < f2)
            {
                hi = c2;
                (c2, f2) = (c1, f1);
                c1 = hi - (g * (hi - lo));
                f1 = Chi(c1);
            }
            else
            {
                lo = c1;
                (c1, f1) = (c2, f2);
                c2 = lo + (g * (hi - lo));
                f2 = Chi(c2);
            }
        }

        var beta = 0.5 * (lo + hi);
        if (beta >= upper * 0.999 || beta <= betaStart * 0.5 * 1.001)
        {
            // The optimum sits on the search edge: the data do not locate β for a shared element.
            return null;
        }

        var chi2 = Profile(beta, out var coef);
        var rc = coef[2 * k];
        var jac = new double[n * (m + 1)];
        for (var i = 0; i < n; i++)
        {
            var r = index[i];
            var den = 1 - (beta * x[i] * x[i]);
            jac[((2 * r) * n) + i] = sw[i];
            jac[(((2 * r) + 1) * n) + i] = x[i] * sw[i];
            jac[((2 * k) * n) + i] = x[i] / den * sw[i];
            jac[(((2 * k) + 1) * n) + i] = rc * x[i] * x[i] * x[i] / (den * den) * sw[i];
        }

        var full = new HouseholderQr(jac, n, m + 1);
        if (full.IsRankDeficient(1e-12) || !(rc > 0))
        {
            return null;
        }

        var dof = n - (m + 1);

        // Absolute weights (the points' own scatter), inflated by the Birge ratio when the scatter about the joint fit is larger.
        var inflate = Math.Max(chi2 / dof, 1);
        var cov = full.InverseRtR();
        double U(int j) => Math.Sqrt(cov[j, j] * inflate);
        var shunts = Enumerable.Range(0, k).ToDictionary(r => heated[r].Result.Name, r => new Estimate(coef[(2 * r) + 1], U((2 * r) + 1)));
        var rcEst = new Estimate(rc, U(2 * k));
        var betaEst = new Estimate(beta, U(m));
        var rth = beta / (options.FuseTemperatureCoefficient * rc);
        var urth = Math.Abs(rth) * Math.Sqrt(Square(betaEst.StandardUncertainty / beta) + Square(rcEst.StandardUncertainty / rc));
        return Make(
            "shared-heating",
            "only the jack's common element (fuse) heats; shunts are temperature-stable; R_common and its heating β are shared by the jack's heating ranges",
            rcEst,
            shunts,
            chi2,
            dof,
            new Dictionary<string, Estimate>
            {
                ["heatingCoefficientPerA2"] = betaEst,
                ["thermalResistanceKPerW"] = new Estimate(rth, urth),
            });
    }

    /// <summary>Hypothesis: a thermal hold on a heated-element range shows the fuse as its fast term and the shunt as its slow term, so the
    /// heating the sweep found is split between them in the ratio of the hold's amplitudes; checked by the fuse's predicted step against the hold's.</summary>
    /// <remarks>A fuse-only fit of a drop in which the shunt heats too puts the shunt's heating into the fuse: with ε₀ the shunt's share of the
    /// cubic term at small current, the fitted heated part is R_f·(1 + ε₀)² and its coefficient β_f/(1 + ε₀). The hold measures the share at
    /// its own current, ε = A_slow/A_fast = ε₀·(I_h² − I_p²)/(I_h²/(1 − β_f·I_h²) − I_p²/(1 − β_f·I_p²)) for a hold at I_h that starts from
    /// the steady state at I_p of the jack's step before it (I_p = 0, cold, when it is the jack's first), the shunt's own β_s·I² ≪ 1.
    /// Where in its first sample interval T the step fell is not recorded, so the fast amplitude carries a rectangular ±T/τ_fast relative.
    /// The check is only a check when it could fail: when the split made no difference to it either, the separation is unchecked.</remarks>
    private static Separation? ThermalStep(List<RangeAnalysis> ranges, AnalysisOptions options)
    {
        var candidates = ranges
            .Where(r => r.Chosen.Model is HeatedElementModel)
            .SelectMany(r => (r.Result.Thermal ?? []).Where(h => h.Terms.Count == 2).Select(h => (Range: r, Hold: h)))
            .ToList();
        if (candidates.Count != 1)
        {
            return null;
        }

        var (range, hold) = candidates[0];
        var fast = hold.Terms.MinBy(t => t.TimeConstantSeconds.Value)!;
        var slow = hold.Terms.MaxBy(t => t.TimeConstantSeconds.Value)!;
        if (!(fast.AmplitudeVolts.Value < 0) || !(slow.AmplitudeVolts.Value < 0) || !(hold.CurrentA > 0))
        {
            // Both elements must heat (the drop rises) for the split to mean anything.
            return null;
        }

        var ih = hold.CurrentA;
        var before = ranges.SelectMany(r => r.Result.Points).Where(p => p.Step < hold.Step).MaxBy(p => p.Step);
        var ip = before?.CurrentA ?? 0;
        var fit = range.Chosen;
        double r0 = fit.Parameters[1], rh = fit.Parameters[2], beta = fit.Parameters[3];
        var measured = -fast.AmplitudeVolts.Value;
        var interval = hold.Samples > 1 ? hold.DurationSeconds / (hold.Samples - 1) : 0;
        var timing = measured * interval / fast.TimeConstantSeconds.Value / Math.Sqrt(3);
        var uMeasured = Math.Sqrt(Square(fast.AmplitudeVolts.StandardUncertainty) + Square(timing));
        var epsilon = slow.AmplitudeVolts.Value / fast.AmplitudeVolts.Value;
        var uEpsilon = Math.Abs(epsilon) * Math.Sqrt(Square(slow.AmplitudeVolts.StandardUncertainty / slow.AmplitudeVolts.Value) + Square(uMeasured / measured));

        // x = (R₀, R_h, β, ε): the first three from the sweep's fit (with their covariance), ε from the hold (independent data).
        (double Fuse, double Beta, double Share) Split(double rh, double b, double eps)
        {
            // ε₀ = ε·D(β_f)/(I_h² − I_p²) with β_f = β·(1 + ε₀): a fixed point that contracts by about ε·β·I_h² per turn.
            var share = eps;
            for (var k = 0; k < 50; k++)
            {
                var bf = b * (1 + share);
                share = eps * ((ih * ih / (1 - (bf * ih * ih))) - (ip * ip / (1 - (bf * ip * ip)))) / ((ih * ih) - (ip * ip));
            }

            return (rh / Square(1 + share), b * (1 + share), share);
        }

        double Fuse(double[] x) => Split(x[1], x[2], x[3]).Fuse;
        double Shunt(double[] x) => x[0] - Split(x[1], x[2], x[3]).Fuse;
        double BetaF(double[] x) => Split(x[1], x[2], x[3]).Beta;
        double Predicted(double[] x)
        {
            var (rf, bf, _) = Split(x[1], x[2], x[3]);
            return ih * rf * ((1 / (1 - (bf * ih * ih))) - (1 / (1 - (bf * ip * ip))));
        }

        var cov = new double[4, 4];
        for (var i = 0; i < 3; i++)
        {
            for (var j = 0; j < 3; j++)
            {
                cov[i, j] = fit.Covariance[i + 1, j + 1];
            }
        }

        cov[3, 3] = uEpsilon * uEpsilon;
        double[] at = [r0, rh, beta, epsilon];
        var (fuse, betaF, share) = Split(rh, beta, epsilon);
        var predicted = Predicted(at);
        var chi2 = Square(measured - predicted) / (Square(uMeasured) + Propagation.Variance(Predicted, at, cov));

        // The same check with no split at all (ε = 0): if that passes too, the check cannot tell the split from none.
        double[] unsplit = [r0, rh, beta, 0];
        var chi2Unsplit = Square(measured - Predicted(unsplit)) / (Square(uMeasured) + Propagation.Variance(Predicted, unsplit, cov));
        var powerful = chi2Unsplit > ChiSquared.InvCDF(1, 0.95);
        var fuseEstimate = new Estimate(fuse, Math.Sqrt(Propagation.Variance(Fuse, at, cov)));
        var betaEstimate = new Estimate(betaF, Math.Sqrt(Propagation.Variance(BetaF, at, cov)));
        var rth = betaF / (options.FuseTemperatureCoefficient * fuse);
        return Make(
            "thermal-step",
            $"the thermal hold at {QuantityFormatter.Format(hold.CurrentA, SiUnit.Ampere)} shows the fuse as its fast term and the shunt as its slow term; the sweep's heating is split between them in the ratio of the hold's amplitudes",
            fuseEstimate,
            new Dictionary<string, Estimate> { [range.Result.Name] = new Estimate(Shunt(at), Math.Sqrt(Propagation.Variance(Shunt, at, cov))) },
            chi2,
            1,
            new Dictionary<string, Estimate>
            {
                ["heatingCoefficientPerA2"] = betaEstimate,
                ["shuntShareOfHeating"] = new Estimate(share, uEpsilon * share / epsilon),
                ["thermalResistanceKPerW"] = new Estimate(rth, Math.Abs(rth) * Math.Sqrt(Square(betaEstimate.StandardUncertainty / betaF) + Square(fuseEstimate.StandardUncertainty / fuse))),
                ["fuseStepVolts"] = new Estimate(measured, uMeasured),
                ["predictedFuseStepVolts"] = new Estimate(predicted, Math.Sqrt(Propagation.Variance(Predicted, at, cov))),
                ["chiSquareWithoutSplit"] = new Estimate(chi2Unsplit, 0),
            },
            checkable: powerful);
    }

    /// <summary>A separation with its p-value; it is consistent when p ≥ 0.05, and unchecked when there are no degrees of freedom left or
    /// the check could not have failed (<paramref name="checkable"/> false).</summary>
    internal static Separation Make(string method, string hypothesis, Estimate common, Dictionary<string, Estimate> shunts, double chi2, int dof, Dictionary<string, Estimate>? extra, bool checkable = true)
    {
        var p = dof > 0 ? 1 - ChiSquared.CDF(dof, chi2) : double.NaN;
        return new Separation(hypothesis, common, shunts, chi2, dof, p, dof > 0 && checkable ? p >= 0.05 : null, extra, method);
    }

    /// <summary>The inverse-variance weighted mean of <paramref name="values"/> with its standard uncertainty, and χ² of their spread about it.</summary>
    internal static (Estimate Mean, double ChiSquare) WeightedMean(IReadOnlyList<Estimate> values)
    {
        var w = values.Select(e => 1 / Square(e.StandardUncertainty)).ToArray();
        var sw = w.Sum();
        var mean = values.Select((e, i) => e.Value * w[i]).Sum() / sw;
        var chi2 = values.Select((e, i) => w[i] * Square(e.Value - mean)).Sum();
        return (new Estimate(mean, Math.Sqrt(1 / sw)), chi2);
    }

    private static LinearFit ExactLine(double[] x, double[] y, double[] w)
    {
        // Two ranges determine the line exactly; its covariance follows from the ranges' own uncertainties (absolute weights).
        var slope = (y[1] - y[0]) / (x[1] - x[0]);
        var intercept = y[0] - (slope * x[0]);
        var dx = x[1] - x[0];
        var v0 = 1 / w[0];
        var v1 = 1 / w[1];
        var vSlope = (v0 + v1) / (dx * dx);
        var vIntercept = ((x[1] * x[1] * v0) + (x[0] * x[0] * v1)) / (dx * dx);
        var cv = -((x[1] * v0) + (x[0] * v1)) / (dx * dx);
        return new LinearFit([intercept, slope], new[,] { { vIntercept, cv }, { cv, vSlope } }, 0, 0, 0, [0, 0], [1, 1]);
    }

    private static double Square(double v) => v * v;
}

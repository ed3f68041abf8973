using MathNet.Numerics.Distributions;
using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis;

/// <summary>Separates each jack's common series part (fuse, contacts, leads) from its ranges' shunts, under stated hypotheses, each with a χ² check.</summary>
internal static class JackDecomposer
{
    /// <summary>Every separation the data and the UUT description allow, per jack.</summary>
    public static List<JackDecomposition> Decompose(IReadOnlyList<RangeAnalysis> ranges, UutDescription? uut, AnalysisOptions options)
    {
        var list = new List<JackDecomposition>();
        foreach (var jack in ranges.GroupBy(r => r.Result.Jack))
        {
            var members = jack.ToList();
            var separations = new List<Separation>();
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

            if (members.Any(r => r.Result.Model is "self-heating" or "self-heating-cubic") && SharedHeating(members, options) is { } heating)
            {
                separations.Add(heating);
            }

            list.Add(new JackDecomposition(jack.Key, members.Select(m => m.Result.Name).ToList(), separations));
        }

        return list;
    }

    /// <summary>Hypothesis: every shunt is at its nominal value, so R_range − R_nominal is the jack's common series part, the same for every range.</summary>
    private static Separation NominalShunts(List<(RangeAnalysis Range, double Nominal)> ranges)
    {
        var c = ranges.Select(t => t.Range.Result.ResistanceOhms.Value - t.Nominal).ToArray();
        var w = ranges.Select(t => 1 / Square(t.Range.Result.ResistanceOhms.StandardUncertainty)).ToArray();
        var sw = w.Sum();
        var mean = c.Zip(w, (ci, wi) => ci * wi).Sum() / sw;
        var u = Math.Sqrt(1 / sw);
        var chi2 = c.Zip(w, (ci, wi) => wi * Square(ci - mean)).Sum();
        var dof = ranges.Count - 1;
        var shunts = ranges.ToDictionary(
            t => t.Range.Result.Name,
            t => new Estimate(t.Range.Result.ResistanceOhms.Value - mean, Math.Sqrt(Math.Max(Square(t.Range.Result.ResistanceOhms.StandardUncertainty) - (u * u), 0))));
        return Make("each shunt is at its nominal value; the rest of each range's resistance is the jack's common series part", new Estimate(mean, u), shunts, chi2, dof, null);
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
            "the shunts keep the ratios of their nominal values (one scale factor S); R_range = S·R_nominal + R_common",
            common,
            shunts,
            fit.ChiSquare,
            fit.DegreesOfFreedom,
            new Dictionary<string, Estimate> { ["shuntScale"] = scale });
    }

    /// <summary>Hypothesis: only the jack's common element heats (the shunts are manganin-like); V = V₀ᵣ + R_sh,r·I + R_c·I/(1 − β·I²)
    /// with R_c and β shared by the jack's ranges, separable through the higher-order (I⁵) heating term.</summary>
    private static Separation? SharedHeating(List<RangeAnalysis> ranges, AnalysisOptions options)
    {
        var n = ranges.Sum(r => r.Data.Current.Length);
        var k = ranges.Count;
        var x = new double[n];
        var y = new double[n];
        var w = new double[n];
        var index = new int[n];
        var o = 0;
        for (var r = 0; r < k; r++)
        {
            var d = ranges[r].Data;
            for (var i = 0; i < d.Current.Length; i++, o++)
            {
                x[o] = d.Current[i];
                y[o] = d.Drop[i];
                w[o] = d.Weight[i];
                index[o] = r;
            }
        }

        var model = new JointHeating(k, index, x);
        var start = new double[(2 * k) + 2];
        double beta = 0, rc = 0;
        var heated = ranges.Select(r => r.Fits.FirstOrDefault(f => f.Succeeded && f.Model is SelfHeatingModel)).ToList();
        for (var r = 0; r < k; r++)
        {
            var fit = ranges[r].Chosen;
            start[2 * r] = fit.Parameters[0];
            start[(2 * r) + 1] = ranges[r].Result.ResistanceOhms.Value;
            if (heated[r] is { } h && h.Parameters[2] > 0 && (rc == 0 || h.Parameters[1] < 2 * rc))
            {
                // Start with half the range's resistance in the heating element; matching the cubic term R₀·β gives β_common = 2β.
                rc = 0.5 * h.Parameters[1];
                beta = 2 * h.Parameters[2];
            }
        }

        if (!(beta > 0))
        {
            return null;
        }

        for (var r = 0; r < k; r++)
        {
            start[(2 * r) + 1] -= rc;
        }

        start[2 * k] = rc;
        start[(2 * k) + 1] = beta;
        var imax = x.Max(Math.Abs);
        NonlinearFit joint;
        try
        {
            joint = LevenbergMarquardt.Fit(model, Enumerable.Range(0, n).Select(i => (double)i).ToArray(), y, w, start, p => p[2 * k] > 0 && p[(2 * k) + 1] * imax * imax < SelfHeatingModel.MaxHeatingFraction, 2000);
        }
        catch (FitFailedException)
        {
            return null;
        }

        // Absolute weights (the points' own scatter), inflated by the Birge ratio when the scatter about the joint fit is larger.
        var s2 = joint.ChiSquare / joint.DegreesOfFreedom;
        var m = start.Length;
        var cov = new double[m, m];
        for (var i = 0; i < m; i++)
        {
            for (var j = 0; j < m; j++)
            {
                cov[i, j] = joint.Covariance[i, j] / s2 * Math.Max(s2, 1);
            }
        }

        var shunts = Enumerable.Range(0, k).ToDictionary(r => ranges[r].Result.Name, r => new Estimate(joint.Parameters[(2 * r) + 1], Math.Sqrt(cov[(2 * r) + 1, (2 * r) + 1])));
        var rcEst = new Estimate(joint.Parameters[2 * k], Math.Sqrt(cov[2 * k, 2 * k]));
        var betaEst = new Estimate(joint.Parameters[(2 * k) + 1], Math.Sqrt(cov[(2 * k) + 1, (2 * k) + 1]));
        var rth = betaEst.Value / (options.FuseTemperatureCoefficient * rcEst.Value);
        var urth = Math.Abs(rth) * Math.Sqrt(Square(betaEst.StandardUncertainty / betaEst.Value) + Square(rcEst.StandardUncertainty / rcEst.Value));
        return Make(
            "only the jack's common element (fuse) heats; shunts are temperature-stable; R_common and its heating β are shared by the jack's ranges",
            rcEst,
            shunts,
            joint.ChiSquare,
            joint.DegreesOfFreedom,
            new Dictionary<string, Estimate>
            {
                ["heatingCoefficientPerA2"] = betaEst,
                ["thermalResistanceKPerW"] = new Estimate(rth, urth),
            });
    }

    private static Separation Make(string hypothesis, Estimate common, Dictionary<string, Estimate> shunts, double chi2, int dof, Dictionary<string, Estimate>? extra)
    {
        var p = dof > 0 ? 1 - ChiSquared.CDF(dof, chi2) : double.NaN;
        return new Separation(hypothesis, common, shunts, chi2, dof, p, dof == 0 || p >= 0.05, extra);
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

    /// <summary>The joint model over all points of a jack; x is the point's index into the concatenated data.</summary>
    private sealed class JointHeating(int ranges, int[] rangeOfPoint, double[] currents) : IModelFunction
    {
        public int ParameterCount => (2 * ranges) + 2;

        public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
        {
            var i = (int)x;
            var r = rangeOfPoint[i];
            var current = currents[i];
            var rc = p[2 * ranges];
            var beta = p[(2 * ranges) + 1];
            var den = 1 - (beta * current * current);
            if (den <= 1 - SelfHeatingModel.MaxHeatingFraction)
            {
                return double.NaN;
            }

            if (!gradient.IsEmpty)
            {
                gradient.Clear();
                gradient[2 * r] = 1;
                gradient[(2 * r) + 1] = current;
                gradient[2 * ranges] = current / den;
                gradient[(2 * ranges) + 1] = rc * current * current * current / (den * den);
            }

            return p[2 * r] + (p[(2 * r) + 1] * current) + (rc * current / den);
        }
    }
}

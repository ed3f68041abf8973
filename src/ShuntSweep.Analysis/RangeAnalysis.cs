using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Thermal;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis;

/// <summary>The analysis of one range: its points, every candidate model's fit, and the result record.</summary>
internal sealed class RangeAnalysis
{
    private RangeAnalysis(RangeResult result, DropData data, IReadOnlyList<CandidateFit> fits, CandidateFit chosen)
    {
        Result = result;
        Data = data;
        Fits = fits;
        Chosen = chosen;
    }

    /// <summary>The range's result record.</summary>
    public RangeResult Result { get; }

    /// <summary>The points the models were fitted to.</summary>
    public DropData Data { get; }

    /// <summary>Every candidate's fit.</summary>
    public IReadOnlyList<CandidateFit> Fits { get; }

    /// <summary>The chosen fit.</summary>
    public CandidateFit Chosen { get; }

    /// <summary>Analyses one range.</summary>
    public static RangeAnalysis Run(string name, string jack, double fullScale, RangeSpec? spec, IReadOnlyList<Sample> samples, AnalysisOptions options)
    {
        var (points, holds) = ReducePoints(samples, options);
        if (points.Select(p => p.CurrentA).Distinct().Count() < 3)
        {
            throw new ArgumentException($"Range '{name}' has {points.Count} point(s); a drop fit needs at least 3 points at different currents.");
        }

        PointTable.AssignWeights(points, options.ScatterModelDegreesOfFreedom);
        var overload = ReadingOverload(points, samples, spec);
        var data = new DropData(
            points.Select(p => p.CurrentA).ToArray(),
            points.Select(p => p.DropVolts).ToArray(),
            points.Select(p => 1.0 / (p.DropUncertaintyVolts * p.DropUncertaintyVolts)).ToArray(),
            overload);

        var candidates = DropModels.All(options.DiodeTemperatureKelvin).ToList();
        if (double.IsFinite(overload))
        {
            // An overloading reading over an ohmic drop is the amplified shunt's signature: the plain ohmic model is the same drop with less said.
            candidates.RemoveAll(m => m is OhmicModel);
        }

        // A model needs at least one degree of freedom left over to be judged at all.
        candidates.RemoveAll(m => m.ParameterCount >= data.Current.Length);
        var fits = candidates.Select(m => DropFitter.Fit(m, data)).ToList();
        var (chosen, runnerUp) = DropFitter.Choose(fits, options.ModelSignificance);
        var w = data.Weight;
        var studentised = Diagnostics.StudentisedResiduals(chosen.Residuals, w, chosen.Leverages, chosen.ChiSquare, chosen.DegreesOfFreedom);
        var pointResults = points.Select((p, i) => new PointResult(
            p.Step, p.Samples, p.SetpointA, p.CurrentA, p.DropVolts, p.DropStdDevVolts, p.DropUncertaintyVolts, p.ReadingA,
            chosen.Residuals[i], studentised[i], Math.Abs(studentised[i]) > options.OutlierThreshold)).ToList();

        var parameters = chosen.Model.Parameters.Select((mp, j) => new ParameterResult(mp.Name, mp.Unit, chosen.Parameters[j], Math.Sqrt(chosen.Covariance[j, j]), mp.Meaning)).ToList();
        var readingError = spec is null ? null : ReadingErrors(points, spec, options);
        var result = new RangeResult(
            name,
            jack,
            fullScale,
            chosen.Model.Name,
            DropFitter.ModelAveragedResistance(fits, chosen),
            new Estimate(chosen.Parameters[0], Math.Sqrt(chosen.Covariance[0, 0])),
            Diagnostics.RootMeanSquare(chosen.Residuals, chosen.DegreesOfFreedom),
            chosen.Model.Evaluate(fullScale, chosen.Parameters, []),
            pointResults,
            parameters,
            Correlation(chosen.Covariance),
            Compare(fits, chosen, runnerUp, options.ModelSignificance),
            holds,
            readingError,
            readingError is null ? null : Summarise(readingError.Select(r => r.Statement).ToList()),
            data.MaxAbsCurrent,
            overload);
        return new RangeAnalysis(result, data, fits, chosen);
    }

    /// <summary>The worst verdicts and the smallest TUR over <paramref name="statements"/>; null when there are none.</summary>
    public static ConformitySummary? Summarise(IReadOnlyList<ConformityStatement> statements) =>
        statements.Count == 0
            ? null
            : new ConformitySummary(
                statements.Max(s => s.SimpleAcceptance),
                statements.Max(s => s.GuardBanded),
                statements.Min(s => s.TestUncertaintyRatio),
                statements.Count);

    private static (List<MeasuredPoint> Points, List<ThermalHoldResult> Holds) ReducePoints(IReadOnlyList<Sample> samples, AnalysisOptions options)
    {
        var points = new List<MeasuredPoint>();
        var holds = new List<ThermalHoldResult>();
        foreach (var step in samples.GroupBy(s => s.Step).OrderBy(g => g.Key))
        {
            var list = step.OrderBy(s => s.Elapsed).ToList();
            var point = PointTable.Reduce(step.Key, list);
            if (list.Count >= options.ThermalHoldMinimumSamples)
            {
                var t0 = list[0].Elapsed.TotalSeconds;
                var hold = ThermalStepFitter.Fit(
                    list.Select(s => s.Elapsed.TotalSeconds - t0).ToArray(),
                    list.Select(s => s.Burden.Volts).ToArray(),
                    step.Key,
                    point.CurrentA);
                if (hold is not null)
                {
                    holds.Add(hold);
                    point = point with { DropVolts = hold.SettledDropVolts.Value, DropStdDevVolts = hold.ResidualStdDevVolts, FixedUncertaintyVolts = hold.SettledDropVolts.StandardUncertainty };
                }
            }

            points.Add(point);
        }

        return (points, holds);
    }

    /// <summary>The smallest |current| whose reading showed overload inside the display's own over-range, above every point that read;
    /// NaN when there is none. Points where the UUT was not read at all (a hold that reads only the drop) say nothing either way.</summary>
    private static double ReadingOverload(IReadOnlyList<MeasuredPoint> points, IReadOnlyList<Sample> samples, RangeSpec? spec)
    {
        var overloadedSteps = samples.Where(s => double.IsInfinity(s.UutReading)).Select(s => s.Step).ToHashSet();
        var read = points.Where(p => double.IsFinite(p.ReadingA)).ToList();
        var overloaded = points.Where(p => overloadedSteps.Contains(p.Step)).ToList();
        if (read.Count < 2 || overloaded.Count == 0)
        {
            return double.NaN;
        }

        var lastRead = read.Max(p => Math.Abs(p.CurrentA));
        if (overloaded.Any(p => Math.Abs(p.CurrentA) <= lastRead))
        {
            // Overload below readings present is no amplifier limit (that would overload every current above it).
            return double.NaN;
        }

        var first = overloaded.Min(p => Math.Abs(p.CurrentA));
        var limit = spec is null ? double.PositiveInfinity : spec.FullScale.Amperes * (1 + spec.OverRange) * 0.999;
        return first < limit ? first : double.NaN;
    }

    private static List<ReadingErrorPoint> ReadingErrors(IReadOnlyList<MeasuredPoint> points, RangeSpec spec, AnalysisOptions options)
    {
        var list = new List<ReadingErrorPoint>();
        var res = spec.Resolution.Amperes;
        foreach (var p in points.Where(p => double.IsFinite(p.ReadingA) && p.ReadingSamples > 0))
        {
            var n = p.ReadingSamples;
            var inputs = new List<InputQuantity>
            {
                new("UUT reading (repeatability)", p.ReadingA, n > 1 && double.IsFinite(p.ReadingStdDevA) ? p.ReadingStdDevA / Math.Sqrt(n) : 0, n > 1 ? n - 1 : double.PositiveInfinity, InputDistribution.StudentT),
                new("UUT resolution (half a count)", 0, res / (2 * Math.Sqrt(3)), double.PositiveInfinity, InputDistribution.Rectangular),
                new("reference current (repeatability)", p.CurrentA, p.Samples > 1 && double.IsFinite(p.CurrentStdDevA) ? p.CurrentStdDevA / Math.Sqrt(p.Samples) : 0, p.Samples > 1 ? p.Samples - 1 : double.PositiveInfinity, InputDistribution.StudentT),
                new("reference ammeter accuracy", 0, ((options.ReferenceFractionOfReading * Math.Abs(p.CurrentA)) + options.ReferenceFloorA) / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
            };
            static double ErrorModel(double[] x) => x[0] + x[1] - (x[2] + x[3]);
            var budget = GumBudget.Evaluate(ErrorModel, inputs, options.CoverageProbability);
            var mc = options.MonteCarloTrials > 0 ? MonteCarloCheck.Run(ErrorModel, inputs, budget, options.MonteCarloTrials, options.Seed + p.Step) : null;
            var limit = spec.Accuracy.Limit(new(p.ReadingA), spec.Resolution).Amperes;
            list.Add(new ReadingErrorPoint(p.Step, p.CurrentA, p.ReadingA, budget.Value, budget, mc, ConformityStatement.Judge(budget.Value, limit, budget)));
        }

        return list;
    }

    private static ModelComparison Compare(IReadOnlyList<CandidateFit> fits, CandidateFit chosen, CandidateFit? runnerUp, double significance)
    {
        var baseFit = DropFitter.BaseFit(fits);
        var candidates = fits.Select(f =>
        {
            var nested = f.Model.NestsOver is not null && baseFit is not null ? baseFit : null;
            return new ModelCandidate(
                f.Model.Name,
                f.Model.ParameterCount,
                f.Succeeded,
                f.FailureReason,
                f.ChiSquare,
                f.Succeeded ? Diagnostics.RootMeanSquare(f.Residuals, Math.Max(f.DegreesOfFreedom, 1)) : double.NaN,
                f.Aicc,
                f.Bic,
                nested?.Model.Name,
                nested is null ? double.NaN : DropFitter.NestedFTest(nested, f),
                f.Succeeded ? f.Parameters : null);
        }).ToList();
        return new ModelComparison(
            chosen.Model.Name,
            runnerUp?.Model.Name,
            $"a curved model must beat the straight line in the F-test at p < {significance:0.###}; then lowest AICc, and among models within 2 AICc units of it the one with fewest parameters",
            candidates);
    }

    private static List<IReadOnlyList<double>> Correlation(double[,] cov)
    {
        var m = cov.GetLength(0);
        var rows = new List<IReadOnlyList<double>>();
        for (var i = 0; i < m; i++)
        {
            var row = new double[m];
            for (var j = 0; j < m; j++)
            {
                var d = Math.Sqrt(cov[i, i] * cov[j, j]);
                row[j] = d > 0 ? cov[i, j] / d : (i == j ? 1 : 0);
            }

            rows.Add(row);
        }

        return rows;
    }
}

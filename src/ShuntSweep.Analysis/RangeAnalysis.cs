using MathNet.Numerics.Distributions;
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

        if (samples.All(s => s.Burden.Volts == 0))
        {
            throw new InvalidDataException($"Range '{name}': the drop meter read 0 V at every current: is it connected across the jacks?");
        }

        PointTable.AssignWeights(points, options.ScatterModelDegreesOfFreedom);
        var overload = ReadingOverload(points, samples, spec);
        var data = new DropData(
            points.Select(p => p.CurrentA).ToArray(),
            points.Select(p => p.DropVolts).ToArray(),
            points.Select(p => PointTable.Weight(p.DropUncertaintyVolts)).ToArray(),
            overload);

        var candidates = DropModels.All(options.DiodeKelvin).ToList();
        if (double.IsFinite(overload))
        {
            // An overloading reading over an ohmic drop is the amplified shunt's signature: the plain ohmic model is the same drop with less said.
            candidates.RemoveAll(m => m is OhmicModel);
        }

        // A model needs at least one degree of freedom left over to be judged at all.
        candidates.RemoveAll(m => m.ParameterCount >= data.Current.Length);
        var fits = DropFitter.DistinctHypotheses(candidates.Select(m => DropFitter.Fit(m, data)).ToList());
        var (chosen, runnerUp) = DropFitter.Choose(fits, options.ModelSignificance);
        var w = data.Weight;
        var studentised = Diagnostics.StudentisedResiduals(chosen.Residuals, w, chosen.Leverages, chosen.ChiSquare, chosen.DegreesOfFreedom);
        var pointResults = points.Select((p, i) => new PointResult(
            p.Step, p.Samples, p.SetpointA, p.CurrentA, p.DropVolts, p.DropStdDevVolts, p.DropUncertaintyVolts, p.ReadingA,
            chosen.Residuals[i], studentised[i], Math.Abs(studentised[i]) > options.OutlierThreshold, options.UnsettledSteps.Contains(p.Step))).ToList();

        var parameters = chosen.Model.Parameters.Select((mp, j) => new ParameterResult(mp.Name, mp.Unit, chosen.Parameters[j], Math.Sqrt(chosen.Covariance[j, j]), mp.Meaning)).ToList();
        var readingError = spec is null ? null : ReadingErrors(points, spec, options);
        var headline = DropFitter.HeadlineResistance(fits, chosen, options.ModelSignificance);
        var resolution = options.Allowances.DropMeter is { Resolution: > 0 } dm ? dm.Resolution : PointTable.InferResolution(samples.Select(s => s.Burden.Volts));
        var (resistanceBudget, offsetBudget) = Budgets(chosen, data, headline, resolution, points.Count, options);
        var warnings = new List<string>();
        if (headline.Ohms < 0)
        {
            warnings.Add("the resistance is negative: the drop meter's leads are reversed (or the current flows the other way); check the wiring");
        }

        var result = new RangeResult(
            name,
            jack,
            fullScale,
            chosen.Model.Name,
            FromBudget(resistanceBudget),
            FromBudget(offsetBudget),
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
            overload,
            $"{headline.Method}: {string.Join(", ", headline.Models)}",
            resistanceBudget,
            offsetBudget,
            resolution,
            spec is null ? "the largest |setpoint| measured (no UUT description given)" : "the UUT description",
            spec?.Resolution.Amperes ?? double.NaN,
            spec?.Accuracy.FractionOfReading ?? double.NaN,
            spec?.Accuracy.Counts ?? 0,
            warnings.Count > 0 ? warnings : null,
            JudgeBurden(spec, chosen, fullScale, data.MaxAbsCurrent, points, options));
        return new RangeAnalysis(result, data, fits, chosen);
    }

    /// <summary>The estimate a budget gives: u_c, ν_eff, k and U.</summary>
    private static Estimate FromBudget(GumBudget b) =>
        new(b.Value, b.CombinedStandardUncertainty, b.EffectiveDegreesOfFreedom, b.CoverageFactor, b.ExpandedUncertainty);

    /// <summary>The budgets of the headline resistance and the offset: the fit (Type A), the drop meter's resolution (rectangular,
    /// JCGM 100 4.3.7 and F.2.2.1, propagated through the fit point by point), and the bench file's Type B rows.</summary>
    private static (GumBudget Resistance, GumBudget Offset) Budgets(CandidateFit chosen, DropData data, ResistanceChoice headline, double resolution, int points, AnalysisOptions options)
    {
        var (resR, resOffset) = ResolutionSensitivity(chosen, data);
        var uq = resolution / Math.Sqrt(12);
        var nu = Math.Max(headline.DegreesOfFreedom, 1);
        var few = nu < 5 ? $", only {points} points: ν = {nu}" : string.Empty;
        var a = options.Allowances;
        var r = headline.Ohms;
        var rInputs = new List<InputQuantity>
        {
            new($"fit scatter (Type A{few})", r, headline.StandardUncertainty, nu, InputDistribution.StudentT),
            new("drop meter resolution", 0, uq * resR, double.PositiveInfinity, InputDistribution.Rectangular),
            new("drop meter accuracy, reading term (relative)", 0, (a.DropMeter?.FractionOfReading ?? 0) / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
            new("reference accuracy, reading term (relative)", 0, (a.Reference?.FractionOfReading ?? 0) / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
            new("lead and contact allowance", 0, a.Leads / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
        };
        static double ResistanceModel(double[] x) => (x[0] * (1 + x[2] - x[3])) + x[1] + x[4];
        var offset = chosen.Parameters[0];
        var uOffset = Math.Sqrt(Math.Max(chosen.Covariance[0, 0], 0));
        var oInputs = new List<InputQuantity>
        {
            new($"fit scatter (Type A{few})", offset, uOffset, Math.Max(chosen.DegreesOfFreedom, 1), InputDistribution.StudentT),
            new("drop meter resolution", 0, uq * resOffset, double.PositiveInfinity, InputDistribution.Rectangular),
            new("drop meter accuracy, fixed term", 0, (a.DropMeter?.Floor ?? 0) / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
            new("reference accuracy, fixed term (times R)", 0, Math.Abs(r) * (a.Reference?.Floor ?? 0) / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
            new("thermal EMF allowance", 0, a.ThermalEmf / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular),
        };
        static double OffsetModel(double[] x) => x[0] + x[1] + x[2] + x[3] + x[4];
        return (GumBudget.Evaluate(ResistanceModel, Stated(rInputs), options.CoverageProbability), GumBudget.Evaluate(OffsetModel, Stated(oInputs), options.CoverageProbability));
    }

    /// <summary>Names each Type B row the bench file leaves at zero as not stated, so the budget shows what it lacks.</summary>
    private static List<InputQuantity> Stated(List<InputQuantity> inputs) =>
        inputs.Select((q, i) => i > 1 && q.StandardUncertainty == 0 ? q with { Name = q.Name + " (not stated in the bench file)" } : q).ToList();

    /// <summary>√Σᵢ (∂R/∂yᵢ)² and √Σᵢ (∂V₀/∂yᵢ)²: how much a unit independent error on every point's drop moves the resistance and the
    /// offset through the chosen (linearised) fit. With the weighted design X and C = (XᵀWX)⁻¹ taken from its QR factor, ∂p/∂yᵢ = C·xᵢ·wᵢ,
    /// so each sum is one pass over the points.</summary>
    private static (double Resistance, double Offset) ResolutionSensitivity(CandidateFit chosen, DropData data)
    {
        var n = data.Current.Length;
        var m = chosen.Parameters.Length;
        var a = new double[n * m];
        var row = new double[m];
        for (var i = 0; i < n; i++)
        {
            chosen.Model.Evaluate(data.Current[i], chosen.Parameters, row);
            for (var j = 0; j < m; j++)
            {
                a[(j * n) + i] = row[j] * Math.Sqrt(data.Weight[i]);
            }
        }

        var qr = new HouseholderQr((double[])a.Clone(), n, m);
        if (qr.IsRankDeficient())
        {
            return (0, 0);
        }

        var c = qr.InverseRtR();
        var gradient = Propagation.Gradient(p => chosen.Model.SmallSignalResistance(p), chosen.Parameters, chosen.Covariance);
        var zr = new double[m];
        for (var j = 0; j < m; j++)
        {
            for (var k = 0; k < m; k++)
            {
                zr[j] += c[j, k] * gradient[k];
            }
        }

        double sr = 0, so = 0;
        for (var i = 0; i < n; i++)
        {
            // a holds √wᵢ·xᵢ, so √wᵢ·(zᵀ·aᵢ) = wᵢ·zᵀ·xᵢ.
            double dr = 0, d0 = 0;
            for (var j = 0; j < m; j++)
            {
                var aij = a[(j * n) + i];
                dr += zr[j] * aij;
                d0 += c[0, j] * aij;
            }

            var sw = Math.Sqrt(data.Weight[i]);
            sr += dr * dr * sw * sw;
            so += d0 * d0 * sw * sw;
        }

        return (Math.Sqrt(sr), Math.Sqrt(so));
    }

    /// <summary>Judges the burden against the specification: the chosen model's drop at full scale (its uncertainty from the fit's covariance,
    /// u² = gᵀ·C·g with g the model's parameter gradient there) against the specified maximum, and each point's mean drop against the limit curve.</summary>
    private static BurdenCheck? JudgeBurden(RangeSpec? spec, CandidateFit chosen, double fullScale, double fittedUpTo, IReadOnlyList<MeasuredPoint> points, AnalysisOptions options)
    {
        if (spec is null || (spec.BurdenAtFullScale is null && spec.BurdenLimit is null))
        {
            return null;
        }

        var k = Normal.InvCDF(0, 1, 0.5 + (options.CoverageProbability / 2));
        var gradient = new double[chosen.Model.ParameterCount];
        var atFullScale = chosen.Model.Evaluate(fullScale, chosen.Parameters, gradient);
        var variance = 0.0;
        for (var i = 0; i < gradient.Length; i++)
        {
            for (var j = 0; j < gradient.Length; j++)
            {
                variance += gradient[i] * chosen.Covariance[i, j] * gradient[j];
            }
        }

        var u = k * Math.Sqrt(Math.Max(variance, 0));
        ConformityVerdict? simple = null, guarded = null;
        var specified = double.NaN;
        if (spec.BurdenAtFullScale is { } limit)
        {
            specified = limit.Volts;
            var drop = Math.Abs(atFullScale);
            simple = drop <= specified ? ConformityVerdict.Pass : ConformityVerdict.Fail;
            guarded = drop <= specified - u ? ConformityVerdict.Pass
                : drop <= specified ? ConformityVerdict.ConditionalPass
                : drop <= specified + u ? ConformityVerdict.ConditionalFail
                : ConformityVerdict.Fail;
        }

        int judged = 0, above = 0;
        int? worstStep = null;
        var worstRatio = double.NegativeInfinity;
        foreach (var p in spec.BurdenLimit is null ? [] : points)
        {
            var allowed = Core.Uut.BurdenLimitPoint.LimitAt(spec.BurdenLimit!, p.CurrentA);
            if (!double.IsFinite(allowed))
            {
                continue;
            }

            judged++;
            var drop = Math.Abs(p.DropVolts);
            above += drop > allowed ? 1 : 0;
            var ratio = allowed > 0 ? drop / allowed : drop > 0 ? double.PositiveInfinity : 0;
            if (ratio > worstRatio)
            {
                (worstRatio, worstStep) = (ratio, p.Step);
            }
        }

        ConformityVerdict? curveVerdict = judged == 0 ? null : above > 0 ? ConformityVerdict.Fail : ConformityVerdict.Pass;
        return new BurdenCheck(specified, atFullScale, u, fullScale > fittedUpTo * (1 + 1e-9), simple, guarded, judged, above, curveVerdict, worstStep);
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
                options.Allowances.Reference is { } reference
                    ? new("reference ammeter accuracy", 0, reference.Limit(p.CurrentA) / Math.Sqrt(3), double.PositiveInfinity, InputDistribution.Rectangular)
                    : new("reference ammeter accuracy (not stated in the bench file)", 0, 0, double.PositiveInfinity, InputDistribution.Rectangular),
                new("reference ammeter resolution", 0, (options.Allowances.Reference?.Resolution ?? 0) / Math.Sqrt(12), double.PositiveInfinity, InputDistribution.Rectangular),
            };
            static double ErrorModel(double[] x) => x[0] + x[1] - (x[2] + x[3] + x[4]);
            var budget = GumBudget.Evaluate(ErrorModel, inputs, options.CoverageProbability);
            var mc = options.MonteCarloTrials > 0 ? MonteCarloCheck.Run(ErrorModel, inputs, budget, options.MonteCarloTrials, options.Seed + p.Step) : null;
            var limit = spec.Accuracy.Limit(new(p.ReadingA), spec.Resolution).Amperes;

            // JCGM 101 §8: when the Monte Carlo interval does not validate the GUM one, the Monte Carlo interval is the result.
            var decided = mc is { AgreesWithGum: false } ? mc.AsBudget(budget) : budget;
            list.Add(new ReadingErrorPoint(p.Step, p.CurrentA, p.ReadingA, budget.Value, budget, mc, ConformityStatement.Judge(budget.Value, limit, decided), decided == budget ? "gum" : "monte-carlo"));
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

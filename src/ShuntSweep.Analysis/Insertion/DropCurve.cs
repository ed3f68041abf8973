using ShuntSweep.Analysis.Models;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Analysis.Insertion;

/// <summary>A range's fitted drop against current, rebuilt from <c>result.json</c>: evaluate it, and its standard uncertainty, at any current.</summary>
public sealed class DropCurve
{
    private readonly IDropModel _model;
    private readonly double[] _p;
    private readonly double[,] _cov;

    private DropCurve(RangeResult range, IDropModel model, double[] p, double[,] cov, bool includeOffset)
    {
        Range = range;
        _model = model;
        _p = p;
        _cov = cov;
        _zero = includeOffset ? 0 : p[0];
    }

    // The voltmeter's zero, subtracted from the drop when the curve is the circuit's (offset not included).
    private readonly double _zero;

    /// <summary>The range the curve belongs to.</summary>
    public RangeResult Range { get; }

    /// <summary>The curve of range <paramref name="rangeName"/> in <paramref name="result"/>.</summary>
    /// <exception cref="KeyNotFoundException">When the result has no such range.</exception>
    /// <exception cref="InvalidDataException">When the range's model or parameters cannot be rebuilt.</exception>
    public static DropCurve For(CharacterisationResult result, string rangeName)
    {
        ArgumentNullException.ThrowIfNull(result);
        return For(result.Range(rangeName), result.DiodeTemperatureK);
    }

    /// <summary>The curve of <paramref name="range"/>; a range without a parameter list (an early result file) is taken as ohmic.</summary>
    /// <param name="range">The range.</param>
    /// <param name="diodeTemperatureK">The diode temperature the result was fitted at.</param>
    /// <param name="includeOffset">Whether the curve keeps the fitted offset (the drop as the voltmeter read it, the default); without
    /// it the offset is taken as the voltmeter's zero and the curve passes through zero, as the circuit sees it.</param>
    public static DropCurve For(RangeResult range, double diodeTemperatureK, bool includeOffset = true)
    {
        ArgumentNullException.ThrowIfNull(range);
        if (range.Parameters is null || range.Parameters.Count == 0)
        {
            var ohmic = new OhmicModel();
            var cov = new double[2, 2];
            cov[0, 0] = range.OffsetVolts.StandardUncertainty * range.OffsetVolts.StandardUncertainty;
            cov[1, 1] = range.ResistanceOhms.StandardUncertainty * range.ResistanceOhms.StandardUncertainty;
            return new DropCurve(range, ohmic, [range.OffsetVolts.Value, range.ResistanceOhms.Value], cov, includeOffset);
        }

        var model = DropModels.Create(range.Model, diodeTemperatureK);
        if (model.ParameterCount != range.Parameters.Count)
        {
            throw new InvalidDataException($"Range '{range.Name}': model '{range.Model}' has {model.ParameterCount} parameters but the result lists {range.Parameters.Count}.");
        }

        var p = range.Parameters.Select(x => x.Value).ToArray();
        if (p.Any(v => !double.IsFinite(v)))
        {
            throw new InvalidDataException($"Range '{range.Name}': a model parameter is missing (null) in the result.");
        }

        var m = p.Length;
        var c = new double[m, m];
        for (var i = 0; i < m; i++)
        {
            for (var j = 0; j < m; j++)
            {
                var r = range.Correlation is { } corr && corr.Count == m && corr[i].Count == m ? corr[i][j] : (i == j ? 1 : 0);
                c[i, j] = r * range.Parameters[i].StandardUncertainty * range.Parameters[j].StandardUncertainty;
            }
        }

        return new DropCurve(range, model, p, c, includeOffset);
    }

    /// <summary>The curve of another candidate model of <paramref name="range"/> (the runner-up, say) from the parameters its comparison
    /// kept; null when the candidate was not fitted or the result predates stored candidate parameters.</summary>
    /// <remarks>Its uncertainty is not kept: <see cref="DropUncertainty"/> of such a curve is zero.</remarks>
    public static DropCurve? Candidate(RangeResult range, string model, double diodeTemperatureK)
    {
        ArgumentNullException.ThrowIfNull(range);
        var candidate = range.ModelComparison?.Candidates.FirstOrDefault(c => c.Model == model);
        if (candidate?.Parameters is not { Count: > 0 } p || p.Any(v => !double.IsFinite(v)))
        {
            return null;
        }

        IDropModel m;
        try
        {
            m = DropModels.Create(model, diodeTemperatureK);
        }
        catch (InvalidDataException)
        {
            return null;
        }

        return m.ParameterCount == p.Count ? new DropCurve(range, m, [.. p], new double[p.Count, p.Count], true) : null;
    }

    /// <summary>The drop in volts at <paramref name="currentA"/>.</summary>
    public double Drop(double currentA) => _model.Evaluate(currentA, _p, []) - _zero;

    /// <summary>The largest |current| at which the model still gives a drop (a self-heating element runs away beyond it); infinity when unbounded.</summary>
    public double ValidUpTo()
    {
        var lo = Math.Max(Range.FittedUpToA, 1e-12);
        if (!double.IsFinite(lo))
        {
            lo = Math.Max(Range.FullScaleA, 1e-12);
        }

        if (!Valid(lo))
        {
            return lo;
        }

        var hi = lo;
        for (var k = 0; k < 40 && Valid(hi); k++)
        {
            lo = hi;
            hi *= 2;
        }

        if (Valid(hi))
        {
            return double.PositiveInfinity;
        }

        for (var k = 0; k < 60; k++)
        {
            var mid = (lo + hi) / 2;
            (lo, hi) = Valid(mid) ? (mid, hi) : (lo, mid);
        }

        return lo;
    }

    private bool Valid(double i) => double.IsFinite(Drop(i)) && double.IsFinite(Drop(-i));

    /// <summary>The slope dV/dI in ohms at <paramref name="currentA"/>.</summary>
    public double Slope(double currentA)
    {
        var h = Math.Max(Math.Abs(currentA) * 1e-6, 1e-12);
        return (Drop(currentA + h) - Drop(currentA - h)) / (2 * h);
    }

    /// <summary>The standard uncertainty of the drop at <paramref name="currentA"/>, from the parameter covariance (the offset's own
    /// uncertainty left out when the offset is the voltmeter's zero).</summary>
    public double DropUncertainty(double currentA)
    {
        var m = _p.Length;
        Span<double> g = stackalloc double[m];
        _model.Evaluate(currentA, _p, g);
        if (_zero != 0)
        {
            g[0] = 0;
        }

        var v = 0.0;
        for (var i = 0; i < m; i++)
        {
            for (var j = 0; j < m; j++)
            {
                v += g[i] * _cov[i, j] * g[j];
            }
        }

        return Math.Sqrt(Math.Max(v, 0));
    }
}

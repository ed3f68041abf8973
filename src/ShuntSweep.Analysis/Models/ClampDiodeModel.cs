using ShuntSweep.Analysis.Fitting;

namespace ShuntSweep.Analysis.Models;

/// <summary>An antiparallel diode pair across the shunt, in series with the fuse and contacts:
/// V = V₀ + R_s·I + V_sh, where V_sh solves I = V_sh/R_sh + 2·I_s·sinh(V_sh/(n·V_T)).</summary>
/// <remarks>The shunt voltage is an implicit function of the current, found by Brent's method on [0, min(I·R_sh, n·V_T·asinh(I/2I_s))];
/// gradients follow by implicit differentiation. V_T = kT/q at the analysis temperature.</remarks>
internal sealed class ClampDiodeModel : IDropModel
{
    private readonly double _vt;

    public ClampDiodeModel(double temperatureKelvin) => _vt = PhysicalConstants.ThermalVoltage(temperatureKelvin);

    public string Name => "clamp-diodes";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("seriesResistance", "Ω", "fuse, contacts and leads in series with the clamped shunt"),
        new("shuntResistance", "Ω", "the range's shunt"),
        new("lnSaturationCurrent", "ln(A)", "natural log of the diode saturation current I_s"),
        new("ideality", "1", "ideality factor n of one diode times the diodes in series per direction"),
    ];

    public int ParameterCount => 5;

    public bool IsLinear => false;

    public string? NestsOver => "ohmic";

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        double rsh = p[2], lnIs = p[3], n = p[4];
        if (!(rsh > 0) || !(n > 0.3) || lnIs > 0)
        {
            return double.NaN;
        }

        var nvt = n * _vt;
        var twoIs = 2 * Math.Exp(lnIs);
        var vs = ShuntVoltage(x, rsh, twoIs, nvt);
        if (!gradient.IsEmpty)
        {
            var u = vs / nvt;
            var sinh = Math.Sinh(u);
            var cosh = Math.Cosh(u);
            var dgdv = (1 / rsh) + (twoIs * cosh / nvt);
            gradient[0] = 1;
            gradient[1] = x;
            gradient[2] = vs / (rsh * rsh) / dgdv;
            gradient[3] = -twoIs * sinh / dgdv;
            gradient[4] = twoIs * cosh * u / n / dgdv;
        }

        return p[0] + (p[1] * x) + vs;
    }

    public double[]? Start(DropData data)
    {
        ArgumentNullException.ThrowIfNull(data);
        var order = Enumerable.Range(0, data.Current.Length).OrderBy(i => Math.Abs(data.Current[i])).ToArray();
        if (order.Length < 7)
        {
            return null;
        }

        var imax = data.MaxAbsCurrent;
        var low = order.Where(i => Math.Abs(data.Current[i]) <= 0.3 * imax).ToArray();
        if (low.Length < 3)
        {
            low = order.Take(3).ToArray();
        }

        var top = order.TakeLast(3).ToArray();
        var lowFit = LinearLeastSquares.Polynomial(low.Select(i => data.Current[i]).ToArray(), low.Select(i => data.Drop[i]).ToArray(), [], 1);
        var v0 = lowFit.Parameters[0];
        var rlow = lowFit.Parameters[1];
        if (!(rlow > 0))
        {
            return null;
        }

        var topSlope = Slope(top.Select(i => Math.Abs(data.Current[i])).ToArray(), top.Select(i => Math.Sign(data.Current[i]) * (data.Drop[i] - v0)).ToArray());
        return topSlope < 0.5 * rlow ? DeepClampStart(data, order, v0, rlow, topSlope) : OnsetStart(data, order, v0, rlow);
    }

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => p[2] > 0 && p[4] is > 0.3 and < 10 && p[3] < Math.Log(maxAbsCurrent);

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1] + (1 / ((1 / p[2]) + (2 * Math.Exp(p[3]) / (p[4] * _vt))));

    /// <summary>The voltage across the clamped shunt for current <paramref name="current"/>.</summary>
    internal static double ShuntVoltage(double current, double rsh, double twoIs, double nvt)
    {
        var i = Math.Abs(current);
        if (i == 0)
        {
            return 0;
        }

        var hi = Math.Min(i * rsh, nvt * Math.Asinh(i / twoIs));
        var v = RootFinder.Brent(vs => (vs / rsh) + (twoIs * Math.Sinh(vs / nvt)) - i, 0, hi);
        return Math.Sign(current) * v;
    }

    /// <summary>Start values when the top points are deep in clamp: the drop there rises with the series resistance only.</summary>
    private double[]? DeepClampStart(DropData data, int[] order, double v0, double rlow, double topSlope)
    {
        var rser = Math.Max(0.3 * topSlope, 0);
        var rsh = rlow - rser;
        var it = Math.Abs(data.Current[order[^1]]);
        var vs = (Math.Sign(data.Current[order[^1]]) * (data.Drop[order[^1]] - v0)) - (rser * it);
        var id = it - (vs / rsh);
        if (!(vs > 0) || !(id > 0))
        {
            return null;
        }

        const double n = 1.5;
        var lnIs = Math.Log(id / (2 * Math.Sinh(Math.Min(vs / (n * _vt), 600))));
        return lnIs < 0 ? [v0, rser, rsh, lnIs, n] : null;
    }

    /// <summary>Start values when the diodes are only starting to conduct: the low-current slope is the whole resistance, and the
    /// current the top points miss, I_d = I − (V − V₀)/R, grows as I_s·exp(V_sh/(n·V_T)), so ln I_d against V_sh is a line.</summary>
    /// <remarks>Uses the points above 30 % of the largest current whose missing current exceeds four times its standard uncertainty;
    /// needs three of them, a rising line and an ideality in the model's validity, otherwise the points show no diode onset.
    /// The series resistance starts at zero: at onset it trades against the shunt, I_s and n (see <see cref="ClampDiodeOnsetModel"/>).</remarks>
    private double[]? OnsetStart(DropData data, int[] order, double v0, double rlow)
    {
        var imax = data.MaxAbsCurrent;
        var vsh = new List<double>();
        var lnId = new List<double>();
        var w = new List<double>();
        foreach (var i in order.Where(i => Math.Abs(data.Current[i]) > 0.3 * imax))
        {
            var ai = Math.Abs(data.Current[i]);
            var av = Math.Sign(data.Current[i]) * (data.Drop[i] - v0);
            var id = ai - (av / rlow);
            var uId = 1 / (Math.Sqrt(data.Weight[i]) * rlow);
            if (av > 0 && id > 4 * uId)
            {
                vsh.Add(av);
                lnId.Add(Math.Log(id));
                w.Add(id * id / (uId * uId));
            }
        }

        if (vsh.Count < 3)
        {
            return null;
        }

        var line = LinearLeastSquares.Polynomial(vsh.ToArray(), lnId.ToArray(), w.ToArray(), 1);
        var slope = line.Parameters[1];
        var n = 1 / (slope * _vt);
        var lnIs = line.Parameters[0];
        return slope > 0 && n is > 0.3 and < 10 && lnIs < Math.Log(imax) ? [v0, 0, rlow, lnIs, n] : null;
    }

    private static double Slope(double[] x, double[] y) => LinearLeastSquares.Polynomial(x, y, [], 1).Parameters[1];
}

namespace ShuntSweep.Analysis.Models;

/// <summary>A feedback (transimpedance) ammeter: V = V₀ + R_lo·I until |I| reaches the knee where the amplifier saturates,
/// then the drop rises with R_hi (the feedback resistor); the knee is rounded by a softplus of width 0.02 % of I_k.</summary>
/// <remarks>An amplifier's output saturates within millivolts of its swing, so the knee is sharp: a wider rounding (say 2 %) misfits the
/// points just above the knee by far more than a voltmeter's noise and drags the low resistance with it. The rounding only keeps the
/// model differentiable; knee and slope above it need at least two points above the knee.</remarks>
internal sealed class FeedbackKneeModel : IDropModel
{
    /// <summary>The knee's rounding width as a fraction of the knee current (0.02 %).</summary>
    public const double KneeWidth = 0.0002;

    public string Name => "feedback-knee";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "amplifier input offset"),
        new("lowResistance", "Ω", "R_f/A_OL below the knee"),
        new("kneeCurrent", "A", "current where the amplifier output saturates (V_swing/R_f)"),
        new("highResistance", "Ω", "slope above the knee (about R_f)"),
    ];

    public int ParameterCount => 4;

    public bool IsLinear => false;

    public string? NestsOver => "ohmic";

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        double v0 = p[0], rlo = p[1], ik = p[2], rhi = p[3];
        if (!(ik > 0))
        {
            return double.NaN;
        }

        var w = KneeWidth * ik;
        var s = Math.Sign(x);
        var z = (Math.Abs(x) - ik) / w;
        var sp = Softplus(z);
        var dr = rhi - rlo;
        if (!gradient.IsEmpty)
        {
            var sig = 1 / (1 + Math.Exp(-z));
            gradient[0] = 1;
            gradient[1] = x - (s * w * sp);
            gradient[2] = dr * s * ((KneeWidth * sp) - (sig * (1 + (KneeWidth * z))));
            gradient[3] = s * w * sp;
        }

        return v0 + (rlo * x) + (dr * s * w * sp);
    }

    public double[]? Start(DropData data)
    {
        ArgumentNullException.ThrowIfNull(data);
        var order = Enumerable.Range(0, data.Current.Length).OrderBy(i => Math.Abs(data.Current[i])).ToArray();
        if (order.Length < 6)
        {
            return null;
        }

        var ax = order.Select(i => Math.Abs(data.Current[i])).ToArray();
        var v0 = data.Drop[order[0]];
        var ay = order.Select(i => Math.Sign(data.Current[i]) * (data.Drop[i] - v0)).ToArray();
        double best = 0;
        var knee = -1;
        for (var k = 2; k < ax.Length - 2; k++)
        {
            var below = (ay[k] - ay[0]) / (ax[k] - ax[0]);
            var above = (ay[^1] - ay[k]) / (ax[^1] - ax[k]);
            if (below > 0 && above / below > best)
            {
                best = above / below;
                knee = k;
            }
        }

        if (knee < 0 || best < 3)
        {
            return null;
        }

        var rlo = (ay[knee] - ay[0]) / (ax[knee] - ax[0]);
        var rhi = (ay[^1] - ay[knee]) / (ax[^1] - ax[knee]);
        return [v0, rlo, ax[knee], rhi];
    }

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => p[2] > 0 && p[2] < maxAbsCurrent && p[3] > p[1];

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1];

    private static double Softplus(double z) => z > 30 ? z : Math.Log(1 + Math.Exp(z));
}

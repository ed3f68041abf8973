namespace ShuntSweep.Analysis.Models;

/// <summary>Clamp diodes at their onset: the <see cref="ClampDiodeModel"/> with the whole resistance taken across the diodes
/// (V = V₀ + V_sh, I = V_sh/R + 2·I_s·sinh(V_sh/(n·V_T))), for sweeps that end where the diodes only start to conduct.</summary>
/// <remarks>Until the diodes clamp, the drop cannot tell the series part from the shunt: moving resistance between them is undone to first
/// order by I_s and n (the five-parameter fit then has a near-singular covariance and one point carrying a parameter alone). Only the whole
/// resistance, R·I_s and R/n are determined; this form fits those. Putting the series part R_s across the diodes moves the fitted I_s down
/// and n up by the fraction R_s/R (0.25 % for a 0.3 Ω fuse ahead of a 120 Ω shunt).</remarks>
internal sealed class ClampDiodeOnsetModel(double temperatureKelvin) : IDropModel
{
    private readonly ClampDiodeModel _full = new(temperatureKelvin);

    public string Name => "clamp-diodes-onset";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("resistance", "Ω", "the shunt plus fuse and contacts, all taken across the diodes (at onset they cannot be told apart)"),
        new("lnSaturationCurrent", "ln(A)", "natural log of the diode saturation current I_s"),
        new("ideality", "1", "ideality factor n of one diode times the diodes in series per direction"),
    ];

    public int ParameterCount => 4;

    public bool IsLinear => false;

    public string? NestsOver => "ohmic";

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        Span<double> full = [p[0], 0, p[1], p[2], p[3]];
        Span<double> g = stackalloc double[5];
        var v = _full.Evaluate(x, full, gradient.IsEmpty ? [] : g);
        if (!gradient.IsEmpty)
        {
            gradient[0] = g[0];
            gradient[1] = g[2];
            gradient[2] = g[3];
            gradient[3] = g[4];
        }

        return v;
    }

    public double[]? Start(DropData data) => _full.Start(data) is { } s ? [s[0], s[1] + s[2], s[3], s[4]] : null;

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => _full.IsValid([p[0], 0, p[1], p[2], p[3]], maxAbsCurrent);

    public double SmallSignalResistance(ReadOnlySpan<double> p) => _full.SmallSignalResistance([p[0], 0, p[1], p[2], p[3]]);
}

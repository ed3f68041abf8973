using ShuntSweep.Analysis.Fitting;

namespace ShuntSweep.Analysis.Models;

/// <summary>V = V₀ + I·(R₀ − R_h + R_h / (1 − β·I²)): a cold series part (shunt, contacts) plus one element R_h that heats itself (the fuse).</summary>
/// <remarks>The usual case on a fused jack: only the fuse heats noticeably, so a model that heats the whole R₀ (or its cubic shortcut) pushes
/// part of the heating into R₀ and biases it. R_h and β separate through the I⁵ term of the expansion R₀·I + R_h·β·I³ + R_h·β²·I⁵.
/// Valid while 0 &lt; R_h ≤ R₀ and β·I² &lt; 0.9.</remarks>
internal sealed class HeatedElementModel : IDropModel
{
    public string Name => "heated-element";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("resistance", "Ω", "cold series resistance R₀ (all of it)"),
        new("heatedResistance", "Ω", "cold resistance R_h of the part that heats (the fuse, as a rule)"),
        new("heatingCoefficient", "A⁻²", "β = α·R_th·R_h of the heated part; it rises by the factor 1/(1 − β·I²)"),
    ];

    public int ParameterCount => 4;

    public bool IsLinear => false;

    public string? NestsOver => "ohmic";

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        var den = 1 - (p[3] * x * x);
        if (den <= 1 - SelfHeatingModel.MaxHeatingFraction)
        {
            return double.NaN;
        }

        if (!gradient.IsEmpty)
        {
            gradient[0] = 1;
            gradient[1] = x;
            gradient[2] = x * p[3] * x * x / den;
            gradient[3] = p[2] * x * x * x / (den * den);
        }

        return p[0] + (x * (p[1] - p[2] + (p[2] / den)));
    }

    public double[]? Start(DropData data)
    {
        ArgumentNullException.ThrowIfNull(data);
        if (data.Current.Length <= 5)
        {
            return null;
        }

        // The odd-power expansion V ≈ V₀ + R₀·I + a₃·I³ + a₅·I⁵ is linear; a₃ = R_h·β and a₅ = R_h·β² give R_h and β.
        var quintic = LinearLeastSquares.Fit(data.Current, data.Drop, data.Weight, 4, static (x, row) =>
        {
            row[0] = 1;
            row[1] = x;
            row[2] = x * x * x;
            row[3] = x * x * x * x * x;
        });
        var (v0, r0, a3, a5) = (quintic.Parameters[0], quintic.Parameters[1], quintic.Parameters[2], quintic.Parameters[3]);
        if (!(r0 > 0) || !(a3 > 0))
        {
            return null;
        }

        var imax2 = data.MaxAbsCurrent * data.MaxAbsCurrent;
        var heated = a5 > 0 ? Math.Clamp(a3 * a3 / a5, 1e-3 * r0, r0) : 0.5 * r0;
        var beta = Math.Clamp(a3 / heated, 0, 0.5 / imax2);
        double[] split = [v0, r0, heated, beta];

        // When the data do not separate R_h from β (little heating), the split above is noise and the optimum often lies at the edge where
        // everything heats (R_h = R₀, the self-heating model); starting from the better of the two saves a long crawl along the R_h·β valley.
        var cubic = LinearLeastSquares.Fit(data.Current, data.Drop, data.Weight, 3, static (x, row) =>
        {
            row[0] = 1;
            row[1] = x;
            row[2] = x * x * x;
        });
        var (cv0, cr0, ca3) = (cubic.Parameters[0], cubic.Parameters[1], cubic.Parameters[2]);
        if (!(cr0 > 0) || !(ca3 > 0))
        {
            return split;
        }

        double[] whole = [cv0, cr0, cr0, Math.Clamp(ca3 / cr0, 0, 0.5 / imax2)];
        return ChiSquare(data, whole) < ChiSquare(data, split) ? whole : split;
    }

    private double ChiSquare(DropData data, double[] p)
    {
        var chi2 = 0.0;
        for (var i = 0; i < data.Current.Length; i++)
        {
            var r = data.Drop[i] - Evaluate(data.Current[i], p, []);
            chi2 += data.Weight[i] * r * r;
        }

        return double.IsFinite(chi2) ? chi2 : double.PositiveInfinity;
    }

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) =>
        p[2] > 0 && p[2] <= p[1] * (1 + 1e-9) && p[3] >= 0 && p[3] * maxAbsCurrent * maxAbsCurrent < SelfHeatingModel.MaxHeatingFraction;

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1];
}

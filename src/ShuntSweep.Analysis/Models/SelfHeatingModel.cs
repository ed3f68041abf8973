using ShuntSweep.Analysis.Fitting;

namespace ShuntSweep.Analysis.Models;

/// <summary>V = V₀ + R₀·I / (1 − β·I²), β = α·R_th·R₀: a series element whose resistance rises with its own dissipation in steady state.</summary>
/// <remarks>Valid while β·I² &lt; 1; at β·I² = 1 the element runs away thermally (the fuse would open first).</remarks>
internal sealed class SelfHeatingModel : IDropModel
{
    /// <summary>The largest β·I² accepted in a fit: beyond it the element is close to thermal runaway.</summary>
    public const double MaxHeatingFraction = 0.9;

    public string Name => "self-heating";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("resistance", "Ω", "cold series resistance R₀"),
        new("heatingCoefficient", "A⁻²", "β = α·R_th·R₀; resistance rises by the factor 1/(1 − β·I²)"),
    ];

    public int ParameterCount => 3;

    public bool IsLinear => false;

    public string? NestsOver => "ohmic";

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        var den = 1 - (p[2] * x * x);
        if (den <= 1 - MaxHeatingFraction)
        {
            return double.NaN;
        }

        if (!gradient.IsEmpty)
        {
            gradient[0] = 1;
            gradient[1] = x / den;
            gradient[2] = p[1] * x * x * x / (den * den);
        }

        return p[0] + (p[1] * x / den);
    }

    public double[]? Start(DropData data)
    {
        ArgumentNullException.ThrowIfNull(data);
        var cubic = LinearLeastSquares.Fit(data.Current, data.Drop, data.Weight, 3, static (x, row) =>
        {
            row[0] = 1;
            row[1] = x;
            row[2] = x * x * x;
        });
        var r0 = cubic.Parameters[1];
        var beta = r0 != 0 ? cubic.Parameters[2] / r0 : 0;
        var imax2 = data.MaxAbsCurrent * data.MaxAbsCurrent;
        beta = Math.Clamp(beta, -10 / imax2, 0.5 / imax2);
        return [cubic.Parameters[0], r0, beta];
    }

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => p[2] * maxAbsCurrent * maxAbsCurrent < MaxHeatingFraction;

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1];
}

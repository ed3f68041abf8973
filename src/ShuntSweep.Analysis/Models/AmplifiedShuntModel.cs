namespace ShuntSweep.Analysis.Models;

/// <summary>An amplified shunt: a small shunt whose voltage is amplified before the reading, so the drop stays ohmic (V = V₀ + R·I)
/// while the reading overloads when the amplifier output reaches its swing, inside the range.</summary>
/// <remarks>Applies only when the readings show an overload inside the range; the drop shape alone cannot tell it from a plain shunt.</remarks>
internal sealed class AmplifiedShuntModel : IDropModel
{
    public string Name => "amplified-shunt";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("resistance", "Ω", "the (small) shunt ahead of the amplifier, plus fuse and contacts"),
    ];

    public int ParameterCount => 2;

    public bool IsLinear => true;

    public string? NestsOver => null;

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        if (!gradient.IsEmpty)
        {
            gradient[0] = 1;
            gradient[1] = x;
        }

        return p[0] + (p[1] * x);
    }

    public double[]? Start(DropData data)
    {
        ArgumentNullException.ThrowIfNull(data);
        return double.IsFinite(data.ReadingOverloadA) ? [0, 0] : null;
    }

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => true;

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1];
}

namespace ShuntSweep.Analysis.Models;

/// <summary>V = V₀ + R·I: a plain shunt plus fuse and contacts, with a zero offset.</summary>
internal sealed class OhmicModel : IDropModel
{
    public string Name => "ohmic";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("resistance", "Ω", "series resistance of the range"),
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

    public double[]? Start(DropData data) => [0, 0];

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => true;

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1];
}

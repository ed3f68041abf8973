namespace ShuntSweep.Analysis.Models;

/// <summary>V = V₀ + R₀·I + c₃·I³: the small-heating approximation of a self-heating series element, c₃ = α·R_th·R₀².</summary>
internal sealed class SelfHeatingCubicModel : IDropModel
{
    public string Name => "self-heating-cubic";

    public string Hypothesis => "self-heating";

    public IReadOnlyList<ModelParameter> Parameters { get; } =
    [
        new("offset", "V", "drop at zero current"),
        new("resistance", "Ω", "cold series resistance R₀"),
        new("cubicCoefficient", "V/A³", "α·R_th·R₀², the heating term"),
    ];

    public int ParameterCount => 3;

    public bool IsLinear => true;

    public string? NestsOver => "ohmic";

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        if (!gradient.IsEmpty)
        {
            gradient[0] = 1;
            gradient[1] = x;
            gradient[2] = x * x * x;
        }

        return p[0] + (p[1] * x) + (p[2] * x * x * x);
    }

    public double[]? Start(DropData data) => [0, 0, 0];

    public bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent) => true;

    public double SmallSignalResistance(ReadOnlySpan<double> p) => p[1];
}

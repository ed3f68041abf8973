using ShuntSweep.Analysis.Fitting;

namespace ShuntSweep.Analysis.Models;

/// <summary>A physical model of the drop across a range's jacks as a function of current: the extension point for new front-end behaviours.</summary>
/// <remarks>To add a model, implement this interface in this folder and list it in <see cref="DropModels"/>. Parameters are SI;
/// parameter 0 is always the offset (drop at zero current) in volts.</remarks>
internal interface IDropModel : IModelFunction
{
    /// <summary>The model's name as written to <c>result.json</c>.</summary>
    string Name { get; }

    /// <summary>The parameters, in the order of the parameter vector.</summary>
    IReadOnlyList<ModelParameter> Parameters { get; }

    /// <summary>Whether the drop is linear in the parameters (fitted directly by QR, no iteration).</summary>
    bool IsLinear { get; }

    /// <summary>The physical hypothesis the model expresses; two models with the same hypothesis (a law and its small-signal
    /// approximation) are never both candidates.</summary>
    string Hypothesis => Name;

    /// <summary>The simpler model this one reduces to when its extra parameters vanish (for the nested F-test), or null.</summary>
    string? NestsOver { get; }

    /// <summary>Starting values estimated from the points, or null when the points show nothing this model explains.</summary>
    double[]? Start(DropData data);

    /// <summary>Whether <paramref name="p"/> is physically valid for currents up to <paramref name="maxAbsCurrent"/>.</summary>
    bool IsValid(ReadOnlySpan<double> p, double maxAbsCurrent);

    /// <summary>The small-signal resistance dV/dI at zero current.</summary>
    double SmallSignalResistance(ReadOnlySpan<double> p);
}

/// <summary>A named model parameter with its unit and validity limits.</summary>
/// <param name="Name">The parameter's name in <c>result.json</c>.</param>
/// <param name="Unit">Its SI unit symbol.</param>
/// <param name="Meaning">A few words for the technician.</param>
internal sealed record ModelParameter(string Name, string Unit, string Meaning);

/// <summary>The points a drop model is fitted to: current, drop and weights (1/u²).</summary>
/// <param name="Current">The mean reference current of each point, A.</param>
/// <param name="Drop">The mean drop of each point, V.</param>
/// <param name="Weight">1/u² of each point's drop.</param>
/// <param name="ReadingOverloadA">The smallest |current| at which the UUT reading showed overload inside its range (NaN when it never did).</param>
internal sealed record DropData(double[] Current, double[] Drop, double[] Weight, double ReadingOverloadA)
{
    /// <summary>The largest |current|.</summary>
    public double MaxAbsCurrent => Current.Max(Math.Abs);
}

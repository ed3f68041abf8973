namespace ShuntSweep.Analysis.Fitting;

/// <summary>A model y = f(x; p) that a least-squares fit can evaluate with its gradient in the parameters.</summary>
internal interface IModelFunction
{
    /// <summary>The number of parameters.</summary>
    int ParameterCount { get; }

    /// <summary>Returns f(x; p) and, when <paramref name="gradient"/> is not empty, writes ∂f/∂pⱼ into it; NaN when p is outside the model's domain at x.</summary>
    double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient);
}

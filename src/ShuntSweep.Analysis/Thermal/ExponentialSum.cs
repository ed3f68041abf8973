using ShuntSweep.Analysis.Fitting;

namespace ShuntSweep.Analysis.Thermal;

/// <summary>V(t) = V∞ + Σₖ Aₖ·exp(−t/τₖ): the drop of a thermal hold settling by first-order thermal RC elements.</summary>
/// <remarks>Parameters: V∞, then (Aₖ, τₖ) per term; τ in seconds, A and V∞ in volts.</remarks>
internal sealed class ExponentialSum(int terms) : IModelFunction
{
    public int ParameterCount => 1 + (2 * terms);

    public double Evaluate(double x, ReadOnlySpan<double> p, Span<double> gradient)
    {
        var v = p[0];
        if (!gradient.IsEmpty)
        {
            gradient[0] = 1;
        }

        for (var k = 0; k < terms; k++)
        {
            var a = p[1 + (2 * k)];
            var tau = p[2 + (2 * k)];
            if (!(tau > 0))
            {
                return double.NaN;
            }

            var e = Math.Exp(-x / tau);
            v += a * e;
            if (!gradient.IsEmpty)
            {
                gradient[1 + (2 * k)] = e;
                gradient[2 + (2 * k)] = a * e * x / (tau * tau);
            }
        }

        return v;
    }
}

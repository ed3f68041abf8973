using System.Numerics;
using System.Runtime.InteropServices;

namespace ShuntSweep.Analysis.Fitting;

/// <summary>The two kernels of Householder QR, dot product and y += a·x, with SIMD where the hardware has it.</summary>
internal static class VectorOps
{
    /// <summary>Σ xᵢ·yᵢ.</summary>
    public static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var i = 0;
        var sum = 0.0;
        if (Vector.IsHardwareAccelerated && x.Length >= 2 * Vector<double>.Count)
        {
            var vx = MemoryMarshal.Cast<double, Vector<double>>(x);
            var vy = MemoryMarshal.Cast<double, Vector<double>>(y[..x.Length]);
            var acc = Vector<double>.Zero;
            for (var k = 0; k < vx.Length; k++)
            {
                acc += vx[k] * vy[k];
            }

            sum = Vector.Sum(acc);
            i = vx.Length * Vector<double>.Count;
        }

        for (; i < x.Length; i++)
        {
            sum += x[i] * y[i];
        }

        return sum;
    }

    /// <summary>y ← y + a·x.</summary>
    public static void Axpy(double a, ReadOnlySpan<double> x, Span<double> y)
    {
        var i = 0;
        if (Vector.IsHardwareAccelerated && x.Length >= 2 * Vector<double>.Count)
        {
            var vx = MemoryMarshal.Cast<double, Vector<double>>(x);
            var vy = MemoryMarshal.Cast<double, Vector<double>>(y[..x.Length]);
            var va = new Vector<double>(a);
            for (var k = 0; k < vx.Length; k++)
            {
                vy[k] += va * vx[k];
            }

            i = vx.Length * Vector<double>.Count;
        }

        for (; i < x.Length; i++)
        {
            y[i] += a * x[i];
        }
    }
}

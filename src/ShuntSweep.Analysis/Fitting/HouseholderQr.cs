namespace ShuntSweep.Analysis.Fitting;

/// <summary>A Householder QR factorisation of a tall matrix, so least squares never forms the normal equations.</summary>
/// <remarks>Columns are scaled to unit norm before factorising, which keeps ill-conditioned polynomial designs accurate.
/// The matrix is stored column-major: element (i, j) at <c>a[j * rows + i]</c>. Not thread-safe.</remarks>
internal sealed class HouseholderQr
{
    private readonly double[] _a;
    private readonly double[] _diag;
    private readonly double[] _scale;

    /// <summary>Factorises the column-major <paramref name="columnMajor"/> (rows × cols); the array is overwritten.</summary>
    public HouseholderQr(double[] columnMajor, int rows, int cols)
    {
        ArgumentNullException.ThrowIfNull(columnMajor);
        if (rows < cols)
        {
            throw new ArgumentException($"A least-squares fit needs at least as many observations ({rows}) as parameters ({cols}).");
        }

        _a = columnMajor;
        Rows = rows;
        Cols = cols;
        _diag = new double[cols];
        _scale = new double[cols];
        for (var j = 0; j < cols; j++)
        {
            var norm = Norm(j, 0);
            _scale[j] = norm > 0 ? norm : 1.0;
            var s = 1.0 / _scale[j];
            var off = j * rows;
            for (var i = 0; i < rows; i++)
            {
                _a[off + i] *= s;
            }
        }

        for (var k = 0; k < cols; k++)
        {
            var norm = Norm(k, k);
            var off = k * rows;
            if (norm == 0)
            {
                _diag[k] = 0;
                continue;
            }

            if (_a[off + k] < 0)
            {
                norm = -norm;
            }

            var inv = 1.0 / norm;
            for (var i = k; i < rows; i++)
            {
                _a[off + i] *= inv;
            }

            _a[off + k] += 1.0;
            var v = _a.AsSpan(off + k, rows - k);
            for (var j = k + 1; j < cols; j++)
            {
                var target = _a.AsSpan((j * rows) + k, rows - k);
                VectorOps.Axpy(-VectorOps.Dot(v, target) / _a[off + k], v, target);
            }

            _diag[k] = -norm;
        }
    }

    /// <summary>The number of rows.</summary>
    public int Rows { get; }

    /// <summary>The number of columns (parameters).</summary>
    public int Cols { get; }

    /// <summary>Whether R has a diagonal element that is negligible relative to the largest, i.e. the design is rank deficient.</summary>
    public bool IsRankDeficient(double tolerance = 1e-13)
    {
        var max = _diag.Max(Math.Abs);
        return _diag.Any(d => Math.Abs(d) <= tolerance * max);
    }

    /// <summary>Solves min ‖A·x − b‖ and returns x (in the unscaled parameter units); <paramref name="b"/> is overwritten with Qᵀb.</summary>
    public double[] Solve(double[] b)
    {
        ArgumentNullException.ThrowIfNull(b);
        ApplyQt(b);
        var x = new double[Cols];
        for (var k = Cols - 1; k >= 0; k--)
        {
            var s = b[k];
            for (var j = k + 1; j < Cols; j++)
            {
                s -= R(k, j) * x[j];
            }

            x[k] = s / _diag[k];
        }

        for (var j = 0; j < Cols; j++)
        {
            x[j] /= _scale[j];
        }

        return x;
    }

    /// <summary>Applies Qᵀ to <paramref name="b"/> in place.</summary>
    public void ApplyQt(double[] b)
    {
        ArgumentNullException.ThrowIfNull(b);
        for (var k = 0; k < Cols; k++)
        {
            var off = k * Rows;
            if (_a[off + k] == 0)
            {
                continue;
            }

            var v = _a.AsSpan(off + k, Rows - k);
            var target = b.AsSpan(k, Rows - k);
            VectorOps.Axpy(-VectorOps.Dot(v, target) / _a[off + k], v, target);
        }
    }

    /// <summary>The upper-triangular factor R of A = Q·R in the unscaled parameter units (cols × cols).</summary>
    public double[] UpperTriangle()
    {
        var r = new double[Cols * Cols];
        for (var j = 0; j < Cols; j++)
        {
            for (var i = 0; i <= j; i++)
            {
                r[(j * Cols) + i] = R(i, j) * _scale[j];
            }
        }

        return r;
    }

    /// <summary>(RᵀR)⁻¹ in the unscaled parameter units: the unscaled covariance of the least-squares solution.</summary>
    public double[,] InverseRtR()
    {
        var n = Cols;
        var rinv = new double[n, n];
        for (var j = 0; j < n; j++)
        {
            rinv[j, j] = 1.0 / _diag[j];
            for (var i = j - 1; i >= 0; i--)
            {
                var s = 0.0;
                for (var k = i + 1; k <= j; k++)
                {
                    s += R(i, k) * rinv[k, j];
                }

                rinv[i, j] = -s / _diag[i];
            }
        }

        var c = new double[n, n];
        for (var i = 0; i < n; i++)
        {
            for (var j = i; j < n; j++)
            {
                var s = 0.0;
                for (var k = j; k < n; k++)
                {
                    s += rinv[i, k] * rinv[j, k];
                }

                s /= _scale[i] * _scale[j];
                c[i, j] = s;
                c[j, i] = s;
            }
        }

        return c;
    }

    /// <summary>The diagonal of the hat matrix Q₁Q₁ᵀ (the leverages), computed by applying Q to unit vectors' projections.</summary>
    public double[] Leverages()
    {
        var h = new double[Rows];
        var e = new double[Rows];
        for (var j = 0; j < Cols; j++)
        {
            Array.Clear(e);
            e[j] = 1.0;
            ApplyQ(e);
            for (var i = 0; i < Rows; i++)
            {
                h[i] += e[i] * e[i];
            }
        }

        return h;
    }

    private void ApplyQ(double[] b)
    {
        for (var k = Cols - 1; k >= 0; k--)
        {
            var off = k * Rows;
            if (_a[off + k] == 0)
            {
                continue;
            }

            var v = _a.AsSpan(off + k, Rows - k);
            var target = b.AsSpan(k, Rows - k);
            VectorOps.Axpy(-VectorOps.Dot(v, target) / _a[off + k], v, target);
        }
    }

    private double R(int i, int j) => i == j ? _diag[i] : _a[(j * Rows) + i];

    private double Norm(int col, int from)
    {
        var v = _a.AsSpan((col * Rows) + from, Rows - from);
        var plain = Math.Sqrt(VectorOps.Dot(v, v));
        if (plain > 1e-150 && plain < 1e150)
        {
            return plain;
        }

        var scale = 0.0;
        foreach (var x in v)
        {
            scale = Math.Max(scale, Math.Abs(x));
        }

        if (scale == 0)
        {
            return 0;
        }

        var s = 0.0;
        foreach (var x in v)
        {
            s += (x / scale) * (x / scale);
        }

        return scale * Math.Sqrt(s);
    }
}

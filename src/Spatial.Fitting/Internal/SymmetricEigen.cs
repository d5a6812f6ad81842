using MathNet.Numerics.LinearAlgebra;

namespace Spatial.Fitting.Internal;

/// <summary>Eigen-decomposition of a real symmetric matrix (Math.NET managed: Householder tridiagonalisation and implicit QL).</summary>
internal static class SymmetricEigen
{
    /// <summary>
    /// Eigenvalues in descending order and the matching unit eigenvectors (one array of <paramref name="n"/> per value),
    /// each with its largest-magnitude element positive (first such element on ties). <paramref name="a"/> is row-major n×n, not changed.
    /// </summary>
    public static (double[] Values, double[][] Vectors) Decompose(double[] a, int n)
    {
        ArgumentNullException.ThrowIfNull(a);
        if (a.Length != n * n)
        {
            throw new ArgumentException($"need {n * n} values; got {a.Length}", nameof(a));
        }

        foreach (var v in a)
        {
            if (!double.IsFinite(v))
            {
                throw new Spatial.Core.NumericalException("the covariance holds a non-finite value; the eigen-decomposition cannot run");
            }
        }

        // Symmetric: row-major equals column-major.
        var m = Matrix<double>.Build.Dense(n, n, (double[])a.Clone());
        var evd = m.Evd(Symmetricity.Symmetric);
        var values = evd.EigenValues.Select(c => c.Real).ToArray();
        var order = Enumerable.Range(0, n).OrderByDescending(i => values[i]).ThenBy(i => i).ToArray();
        var outValues = new double[n];
        var outVectors = new double[n][];
        for (var k = 0; k < n; k++)
        {
            outValues[k] = values[order[k]];
            var col = evd.EigenVectors.Column(order[k]).ToArray();
            Normalise(col);
            FixSign(col);
            outVectors[k] = col;
        }

        return (outValues, outVectors);
    }

    /// <summary>
    /// The <paramref name="count"/> leading eigenpairs of the symmetric row-major n×n <paramref name="a"/> by subspace
    /// iteration from <paramref name="start"/> (at least <paramref name="count"/> vectors of length n, need not be
    /// orthonormal): <paramref name="steps"/> times Z = A·Q and re-orthonormalisation (modified Gram–Schmidt, twice), then a
    /// Rayleigh–Ritz step (Golub &amp; Van Loan, Matrix Computations, 4th ed., §8.2.4 "orthogonal iteration" and §10.1).
    /// Each step shrinks the error of pair i by about λ_{m+1}/λ_i for a block of m vectors, so a warm start from a nearby
    /// matrix's vectors converges in a few steps. Values descending; vectors unit length, largest-magnitude element
    /// positive. Deterministic: a fixed sequence of operations. For the EM refinement, whose covariance changes little
    /// between iterations; the final basis always comes from <see cref="Decompose"/>.
    /// </summary>
    public static (double[] Values, double[][] Vectors) Leading(double[] a, int n, IReadOnlyList<double[]> start, int count, int steps)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(start);
        var m = start.Count;
        ArgumentOutOfRangeException.ThrowIfLessThan(m, count);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(m, n);
        var q = start.Select(v => (double[])v.Clone()).ToArray();
        Orthonormalise(q);
        var z = new double[m][];
        for (var j = 0; j < m; j++)
        {
            z[j] = new double[n];
        }

        for (var step = 0; step < steps; step++)
        {
            for (var j = 0; j < m; j++)
            {
                Multiply(a, n, q[j], z[j]);
            }

            (q, z) = (z, q);
            Orthonormalise(q);
        }

        // Rayleigh–Ritz: H = Qᵀ A Q (m×m), its eigenvectors U, Ritz vectors Q·U.
        for (var j = 0; j < m; j++)
        {
            Multiply(a, n, q[j], z[j]);
        }

        var h = new double[m * m];
        for (var i = 0; i < m; i++)
        {
            for (var j = i; j < m; j++)
            {
                var dot = Dot(q[i], z[j]);
                h[(i * m) + j] = dot;
                h[(j * m) + i] = dot;
            }
        }

        var (values, u) = Decompose(h, m);
        var outValues = new double[count];
        var outVectors = new double[count][];
        for (var k = 0; k < count; k++)
        {
            outValues[k] = values[k];
            var v = new double[n];
            for (var j = 0; j < m; j++)
            {
                var w = u[k][j];
                for (var d = 0; d < n; d++)
                {
                    v[d] += w * q[j][d];
                }
            }

            Normalise(v);
            FixSign(v);
            outVectors[k] = v;
        }

        return (outValues, outVectors);
    }

    private static void Multiply(double[] a, int n, double[] x, double[] y)
    {
        for (var i = 0; i < n; i++)
        {
            y[i] = Dot(a.AsSpan(i * n, n), x);
        }
    }

    /// <summary>Σ x_i y_i in lanes of <see cref="System.Numerics.Vector{T}"/> then the tail: a fixed order, so deterministic.</summary>
    private static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var lanes = System.Numerics.Vector<double>.Count;
        var acc = System.Numerics.Vector<double>.Zero;
        var i = 0;
        for (; i <= x.Length - lanes; i += lanes)
        {
            acc += new System.Numerics.Vector<double>(x.Slice(i, lanes)) * new System.Numerics.Vector<double>(y.Slice(i, lanes));
        }

        var sum = System.Numerics.Vector.Sum(acc);
        for (; i < x.Length; i++)
        {
            sum += x[i] * y[i];
        }

        return sum;
    }

    /// <summary>Modified Gram–Schmidt, applied twice ("twice is enough"); a vector that vanishes is left zero.</summary>
    private static void Orthonormalise(double[][] q)
    {
        for (var pass = 0; pass < 2; pass++)
        {
            for (var j = 0; j < q.Length; j++)
            {
                for (var i = 0; i < j; i++)
                {
                    var r = Dot(q[i], q[j]);
                    for (var d = 0; d < q[j].Length; d++)
                    {
                        q[j][d] -= r * q[i][d];
                    }
                }

                Normalise(q[j]);
            }
        }
    }

    /// <summary>Flips <paramref name="v"/> so that its largest-magnitude element (the first on ties) is positive.</summary>
    public static void FixSign(double[] v)
    {
        var best = 0;
        for (var i = 1; i < v.Length; i++)
        {
            if (Math.Abs(v[i]) > Math.Abs(v[best]))
            {
                best = i;
            }
        }

        if (v[best] < 0)
        {
            for (var i = 0; i < v.Length; i++)
            {
                v[i] = -v[i];
            }
        }
    }

    private static void Normalise(double[] v)
    {
        var s = 0.0;
        foreach (var x in v)
        {
            s += x * x;
        }

        s = Math.Sqrt(s);
        if (s > 0)
        {
            for (var i = 0; i < v.Length; i++)
            {
                v[i] /= s;
            }
        }
    }
}

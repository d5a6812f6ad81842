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

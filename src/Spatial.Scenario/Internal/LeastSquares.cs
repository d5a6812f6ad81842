namespace Spatial.Scenario.Internal;

/// <summary>Small ordinary least squares by Householder QR (Golub &amp; Van Loan, Matrix Computations, §5.3), for the truth effects.</summary>
internal static class LeastSquares
{
    /// <summary>
    /// Coefficients b minimising ‖y − X b‖ for the n × p design <paramref name="x"/> (row-major, rows = observations), and R².
    /// Throws <see cref="Spatial.Core.NumericalException"/> when X is rank-deficient.
    /// </summary>
    public static (double[] Coefficients, double R2) Fit(double[,] x, double[] y)
    {
        var n = x.GetLength(0);
        var p = x.GetLength(1);
        if (n < p)
        {
            throw new Spatial.Core.NumericalException($"least squares needs at least {p} rows; got {n}.");
        }

        var a = (double[,])x.Clone();
        var b = (double[])y.Clone();
        for (var k = 0; k < p; k++)
        {
            var norm = 0.0;
            for (var i = k; i < n; i++)
            {
                norm += a[i, k] * a[i, k];
            }

            norm = Math.Sqrt(norm);
            if (norm == 0)
            {
                throw new Spatial.Core.NumericalException($"least squares: column {k} is zero or dependent.");
            }

            var alpha = a[k, k] > 0 ? -norm : norm;
            var v = new double[n];
            v[k] = a[k, k] - alpha;
            for (var i = k + 1; i < n; i++)
            {
                v[i] = a[i, k];
            }

            var vv = 0.0;
            for (var i = k; i < n; i++)
            {
                vv += v[i] * v[i];
            }

            if (vv == 0)
            {
                continue;
            }

            for (var j = k; j < p; j++)
            {
                var dot = 0.0;
                for (var i = k; i < n; i++)
                {
                    dot += v[i] * a[i, j];
                }

                var f = 2 * dot / vv;
                for (var i = k; i < n; i++)
                {
                    a[i, j] -= f * v[i];
                }
            }

            var db = 0.0;
            for (var i = k; i < n; i++)
            {
                db += v[i] * b[i];
            }

            var fb = 2 * db / vv;
            for (var i = k; i < n; i++)
            {
                b[i] -= fb * v[i];
            }
        }

        var coef = new double[p];
        for (var k = p - 1; k >= 0; k--)
        {
            if (Math.Abs(a[k, k]) < 1e-12 * Math.Abs(a[0, 0]))
            {
                throw new Spatial.Core.NumericalException($"least squares: the design is rank-deficient at column {k}.");
            }

            var s = b[k];
            for (var j = k + 1; j < p; j++)
            {
                s -= a[k, j] * coef[j];
            }

            coef[k] = s / a[k, k];
        }

        var mean = y.Average();
        var ssTot = 0.0;
        var ssRes = 0.0;
        for (var i = 0; i < n; i++)
        {
            var fit = 0.0;
            for (var j = 0; j < p; j++)
            {
                fit += x[i, j] * coef[j];
            }

            ssRes += (y[i] - fit) * (y[i] - fit);
            ssTot += (y[i] - mean) * (y[i] - mean);
        }

        return (coef, ssTot > 0 ? 1 - (ssRes / ssTot) : 1);
    }
}

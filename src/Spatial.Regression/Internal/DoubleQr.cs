namespace Spatial.Regression.Internal;

/// <summary>
/// Householder QR of the power-of-two column-scaled design in plain double precision, for well-conditioned
/// designs (scaled condition number ≤ <see cref="LeastSquares.DoublePathConditionLimit"/>). Solutions are
/// refined by the corrected semi-normal equations (Björck 1987): δ = R⁻¹R⁻ᵀ Xᵀr with the residual r recomputed
/// in double-double, which converges at a rate κ²u per step. Immutable after construction.
/// </summary>
internal sealed class DoubleQr : ILeastSquaresFactor
{
    private readonly double[][] x;
    private readonly double[][] a;
    private readonly double[] rDiag;
    private readonly double[] beta;

    public DoubleQr(double[][] columns)
    {
        x = columns;
        P = columns.Length;
        N = P == 0 ? 0 : columns[0].Length;
        Scale = new double[P];
        ColumnNormScaled = new double[P];
        a = new double[P][];
        for (var j = 0; j < P; j++)
        {
            var col = columns[j];
            double ss = 0;
            for (var i = 0; i < N; i++)
            {
                ss += col[i] * col[i];
            }

            var norm = Math.Sqrt(ss);
            var s = norm > 0 && double.IsFinite(norm) ? Math.Pow(2, Math.Round(Math.Log2(norm))) : 1.0;
            Scale[j] = s;
            ColumnNormScaled[j] = norm / s;
            var aj = new double[N];
            var inv = 1.0 / s;
            for (var i = 0; i < N; i++)
            {
                aj[i] = col[i] * inv;
            }

            a[j] = aj;
        }

        rDiag = new double[P];
        beta = new double[P];
        Factor();
    }

    public int N { get; }

    public int P { get; }

    public double[] Scale { get; }

    public double[] ColumnNormScaled { get; }

    public double RelativeDiagonal(int j) => ColumnNormScaled[j] == 0 ? 0 : Math.Abs(rDiag[j]) / ColumnNormScaled[j];

    public double R(int i, int j) => i == j ? rDiag[j] : a[j][i];

    private void Factor()
    {
        for (var k = 0; k < P; k++)
        {
            var ak = a[k].AsSpan(k);
            var norm = Math.Sqrt(Dot(ak, ak));
            if (norm == 0)
            {
                continue;
            }

            var alpha = ak[0] >= 0 ? -norm : norm;
            var v0 = ak[0] - alpha;
            beta[k] = 2.0 / (-2.0 * alpha * v0);
            ak[0] = v0;
            for (var j = k + 1; j < P; j++)
            {
                var aj = a[j].AsSpan(k);
                var f = Dot(ak, aj) * beta[k];
                for (var i = 0; i < aj.Length; i++)
                {
                    aj[i] -= f * ak[i];
                }
            }

            rDiag[k] = alpha;
        }
    }

    private static double Dot(ReadOnlySpan<double> u, ReadOnlySpan<double> v)
    {
        var acc = System.Numerics.Vector<double>.Zero;
        var w = System.Numerics.Vector<double>.Count;
        var i = 0;
        for (; i <= u.Length - w; i += w)
        {
            acc += new System.Numerics.Vector<double>(u[i..]) * new System.Numerics.Vector<double>(v[i..]);
        }

        var s = System.Numerics.Vector.Sum(acc);
        for (; i < u.Length; i++)
        {
            s += u[i] * v[i];
        }

        return s;
    }

    /// <summary>Solves RᵀR z = g for the scaled R.</summary>
    private double[] SemiNormalSolve(double[] g)
    {
        var z = new double[P];
        for (var i = 0; i < P; i++)
        {
            var s = g[i];
            for (var k = 0; k < i; k++)
            {
                s -= a[i][k] * z[k];
            }

            z[i] = s / rDiag[i];
        }

        for (var i = P - 1; i >= 0; i--)
        {
            var s = z[i];
            for (var j = i + 1; j < P; j++)
            {
                s -= a[j][i] * z[j];
            }

            z[i] = s / rDiag[i];
        }

        return z;
    }

    public DoubleDouble[] Solve(double[] y, int refinements = 3)
    {
        // Initial solution from Qᵀy.
        var c = (double[])y.Clone();
        for (var k = 0; k < P; k++)
        {
            if (beta[k] == 0)
            {
                continue;
            }

            var ak = a[k].AsSpan(k);
            var ck = c.AsSpan(k);
            var f = Dot(ak, ck) * beta[k];
            for (var i = 0; i < ck.Length; i++)
            {
                ck[i] -= f * ak[i];
            }
        }

        var z = new double[P];
        for (var i = P - 1; i >= 0; i--)
        {
            var s = c[i];
            for (var j = i + 1; j < P; j++)
            {
                s -= a[j][i] * z[j];
            }

            z[i] = s / rDiag[i];
        }

        var b = new DoubleDouble[P];
        for (var j = 0; j < P; j++)
        {
            b[j] = z[j] / Scale[j];
        }

        var rd = new double[N];
        for (var it = 0; it < refinements; it++)
        {
            var r = DdQr.ResidualsOf(x, y, b);
            for (var i = 0; i < N; i++)
            {
                rd[i] = r[i].ToDouble();
            }

            var g = new double[P];
            for (var j = 0; j < P; j++)
            {
                g[j] = Dot(x[j], rd) / Scale[j];
            }

            var delta = SemiNormalSolve(g);
            for (var j = 0; j < P; j++)
            {
                b[j] += delta[j] / Scale[j];
            }
        }

        return b;
    }

    public DoubleDouble[] Residuals(double[] y, DoubleDouble[] b) => DdQr.ResidualsOf(x, y, b);

    public double[,] InverseR()
    {
        var rinv = ScaledInverse();
        var result = new double[P, P];
        for (var i = 0; i < P; i++)
        {
            for (var j = i; j < P; j++)
            {
                result[i, j] = rinv[i, j] / Scale[i];
            }
        }

        return result;
    }

    private double[,] ScaledInverse()
    {
        var rinv = new double[P, P];
        for (var j = 0; j < P; j++)
        {
            rinv[j, j] = 1.0 / rDiag[j];
            for (var i = j - 1; i >= 0; i--)
            {
                double s = 0;
                for (var k = i + 1; k <= j; k++)
                {
                    s += a[k][i] * rinv[k, j];
                }

                rinv[i, j] = -s / rDiag[i];
            }
        }

        return rinv;
    }

    public double[,] InverseGram()
    {
        var rinv = ScaledInverse();
        var g = new double[P, P];
        for (var i = 0; i < P; i++)
        {
            for (var j = i; j < P; j++)
            {
                double s = 0;
                for (var k = j; k < P; k++)
                {
                    s += rinv[i, k] * rinv[j, k];
                }

                var v = s / (Scale[i] * Scale[j]);
                g[i, j] = v;
                g[j, i] = v;
            }
        }

        return g;
    }

    public double[] DependenceOnEarlier(int j)
    {
        var c = new double[j];
        for (var i = j - 1; i >= 0; i--)
        {
            var s = a[j][i];
            for (var k = i + 1; k < j; k++)
            {
                s -= a[k][i] * c[k];
            }

            c[i] = s / rDiag[i];
        }

        for (var k = 0; k < j; k++)
        {
            c[k] = c[k] * ColumnNormScaled[k] / Math.Max(ColumnNormScaled[j], double.Epsilon);
        }

        return c;
    }
}

/// <summary>What the least-squares driver needs from a QR factorisation of the scaled design.</summary>
internal interface ILeastSquaresFactor
{
    int N { get; }

    int P { get; }

    double[] ColumnNormScaled { get; }

    double RelativeDiagonal(int j);

    /// <summary>Element (i, j), i ≤ j, of R for the scaled design, rounded to double.</summary>
    double R(int i, int j);

    DoubleDouble[] Solve(double[] y, int refinements);

    DoubleDouble[] Residuals(double[] y, DoubleDouble[] b);

    double[,] InverseR();

    double[,] InverseGram();

    double[] DependenceOnEarlier(int j);
}

namespace Spatial.Regression.Internal;

/// <summary>
/// Householder QR factorisation of a column-scaled design, carried out entirely in double-double
/// arithmetic (about 32 digits), with least-squares solves refined by residuals recomputed in
/// double-double from the original (unscaled) data. No column pivoting: columns keep the user's order,
/// so that a near-zero diagonal of R names the predictor that is a combination of earlier ones.
/// </summary>
/// <remarks>
/// Columns are scaled by the power of two nearest their Euclidean norm (an exact operation), following the
/// usual equilibration advice (Golub &amp; Van Loan 2013, §5.3.7). Householder reflections as in Golub &amp; Van
/// Loan, Algorithm 5.2.1. Iterative refinement of the least-squares solution with extended-precision
/// residuals: Björck (1996), §2.9. Computed once on construction; the object is immutable afterwards.
/// </remarks>
internal sealed class DdQr : ILeastSquaresFactor
{
    /// <summary>Relative size of a diagonal of R (scaled columns) below which the design is called rank deficient.</summary>
    public const double RankTolerance = 1e-12;

    private readonly DoubleDouble[][] x; // original columns (not owned, not modified)
    private readonly DoubleDouble[][] a; // Householder vectors below/at the diagonal, R above (scaled)
    private readonly DoubleDouble[] rDiag;
    private readonly DoubleDouble[] vHead; // first element of each Householder vector
    private readonly DoubleDouble[] beta;  // 2 / (vᵀv), or 0 for an identity reflection
    private DoubleDouble[,]? inverseScaledR;

    public DdQr(double[][] columns)
        : this(columns.Select(c => c.Select(v => (DoubleDouble)v).ToArray()).ToArray())
    {
    }

    /// <summary>Factorises columns given in double-double (e.g. decimal data read at extended precision).</summary>
    public DdQr(DoubleDouble[][] columns)
    {
        x = columns;
        P = columns.Length;
        N = P == 0 ? 0 : columns[0].Length;
        Scale = new double[P];
        ColumnNormScaled = new double[P];
        a = new DoubleDouble[P][];
        for (var j = 0; j < P; j++)
        {
            var col = columns[j];
            double ss = 0;
            for (var i = 0; i < N; i++)
            {
                ss += col[i].Hi * col[i].Hi;
            }

            var norm = Math.Sqrt(ss);
            var s = norm > 0 && double.IsFinite(norm) ? Math.Pow(2, Math.Round(Math.Log2(norm))) : 1.0;
            Scale[j] = s;
            ColumnNormScaled[j] = norm / s;
            var aj = new DoubleDouble[N];
            var inv = 1.0 / s;
            for (var i = 0; i < N; i++)
            {
                aj[i] = new DoubleDouble(col[i].Hi * inv, col[i].Lo * inv);
            }

            a[j] = aj;
        }

        rDiag = new DoubleDouble[P];
        vHead = new DoubleDouble[P];
        beta = new DoubleDouble[P];
        Factor();
    }

    public int N { get; }

    public int P { get; }

    /// <summary>Power-of-two scale of each column.</summary>
    public double[] Scale { get; }

    /// <summary>Euclidean norm of each scaled column.</summary>
    public double[] ColumnNormScaled { get; }

    /// <summary>|R_jj| / ‖scaled column j‖: the part of column j not explained by the earlier columns (1 = orthogonal, 0 = collinear).</summary>
    public double RelativeDiagonal(int j) => ColumnNormScaled[j] == 0 ? 0 : Math.Abs(rDiag[j].ToDouble()) / ColumnNormScaled[j];

    /// <summary>Element (i, j) of R for the scaled design, i ≤ j.</summary>
    public DoubleDouble RExact(int i, int j) => i == j ? rDiag[j] : a[j][i];

    /// <inheritdoc/>
    public double R(int i, int j) => RExact(i, j).ToDouble();

    private void Factor()
    {
        for (var k = 0; k < P; k++)
        {
            var ak = a[k];
            var ss = DoubleDouble.Zero;
            for (var i = k; i < N; i++)
            {
                ss += ak[i] * ak[i];
            }

            var norm = DoubleDouble.Sqrt(ss);
            if (norm.Hi == 0)
            {
                rDiag[k] = DoubleDouble.Zero;
                beta[k] = DoubleDouble.Zero;
                vHead[k] = DoubleDouble.Zero;
                continue;
            }

            var alpha = ak[k].Hi >= 0 ? -norm : norm;
            var v0 = ak[k] - alpha;
            // vᵀv = −2 α v0
            var vtv = -(alpha * v0) * 2.0;
            beta[k] = new DoubleDouble(2.0, 0) / vtv;
            vHead[k] = v0;
            ak[k] = v0;
            for (var j = k + 1; j < P; j++)
            {
                var aj = a[j];
                var dot = DoubleDouble.Zero;
                for (var i = k; i < N; i++)
                {
                    dot += ak[i] * aj[i];
                }

                var f = dot * beta[k];
                for (var i = k; i < N; i++)
                {
                    aj[i] -= f * ak[i];
                }
            }

            rDiag[k] = alpha;
        }
    }

    /// <summary>Applies Qᵀ to <paramref name="v"/> in place.</summary>
    private void ApplyQt(DoubleDouble[] v)
    {
        for (var k = 0; k < P; k++)
        {
            if (beta[k].Hi == 0)
            {
                continue;
            }

            var ak = a[k];
            var dot = DoubleDouble.Zero;
            for (var i = k; i < N; i++)
            {
                dot += ak[i] * v[i];
            }

            var f = dot * beta[k];
            for (var i = k; i < N; i++)
            {
                v[i] -= f * ak[i];
            }
        }
    }

    /// <summary>Solves R z = c (upper triangle of the scaled R).</summary>
    private DoubleDouble[] BackSolve(DoubleDouble[] c)
    {
        var z = new DoubleDouble[P];
        for (var i = P - 1; i >= 0; i--)
        {
            var s = c[i];
            for (var j = i + 1; j < P; j++)
            {
                s -= a[j][i] * z[j];
            }

            z[i] = s / rDiag[i];
        }

        return z;
    }

    /// <summary>Least-squares coefficients (unscaled) for <paramref name="y"/>, in double-double, refined <paramref name="refinements"/> times.</summary>
    public DoubleDouble[] Solve(double[] y, int refinements) => Solve(y.Select(v => (DoubleDouble)v).ToArray(), refinements);

    /// <summary>Least-squares coefficients for a right-hand side given in double-double.</summary>
    public DoubleDouble[] Solve(DoubleDouble[] y, int refinements)
    {
        var r = (DoubleDouble[])y.Clone();

        var b = SolveScaledToUnscaled(r);
        for (var it = 0; it < refinements; it++)
        {
            var res = Residuals(y, b);
            var delta = SolveScaledToUnscaled(res);
            for (var j = 0; j < P; j++)
            {
                b[j] += delta[j];
            }
        }

        return b;
    }

    private DoubleDouble[] SolveScaledToUnscaled(DoubleDouble[] rhs)
    {
        ApplyQt(rhs);
        var z = BackSolve(rhs);
        for (var j = 0; j < P; j++)
        {
            z[j] = z[j] * (1.0 / Scale[j]);
        }

        return z;
    }

    /// <summary>Residuals y − X b computed in double-double from the original data.</summary>
    public DoubleDouble[] Residuals(double[] y, DoubleDouble[] b) => Residuals(y.Select(v => (DoubleDouble)v).ToArray(), b);

    /// <summary>Residuals y − X b in double-double, y given in double-double.</summary>
    public DoubleDouble[] Residuals(DoubleDouble[] y, DoubleDouble[] b)
    {
        var r = (DoubleDouble[])y.Clone();
        for (var j = 0; j < P; j++)
        {
            var col = x[j];
            var bj = b[j];
            for (var i = 0; i < N; i++)
            {
                r[i] -= bj * col[i];
            }
        }

        return r;
    }

    /// <summary>Residuals y − X b in double-double for columns <paramref name="x"/>.</summary>
    internal static DoubleDouble[] ResidualsOf(double[][] x, double[] y, DoubleDouble[] b)
    {
        var N = y.Length;
        var P = x.Length;
        var r = new DoubleDouble[N];
        for (var i = 0; i < N; i++)
        {
            r[i] = y[i];
        }

        for (var j = 0; j < P; j++)
        {
            var col = x[j];
            var bj = b[j];
            for (var i = 0; i < N; i++)
            {
                r[i] -= bj * col[i];
            }
        }

        return r;
    }

    /// <summary>R⁻¹ of the unscaled design (X = Q R), from the double-double inverse of the scaled R, rounded to double.</summary>
    public double[,] InverseR()
    {
        var rinv = new DoubleDouble[P, P];
        for (var j = 0; j < P; j++)
        {
            rinv[j, j] = new DoubleDouble(1.0, 0) / rDiag[j];
            for (var i = j - 1; i >= 0; i--)
            {
                var s = DoubleDouble.Zero;
                for (var k = i + 1; k <= j; k++)
                {
                    s += a[k][i] * rinv[k, j];
                }

                rinv[i, j] = -(s / rDiag[i]);
            }
        }

        var result = new double[P, P];
        for (var i = 0; i < P; i++)
        {
            for (var j = i; j < P; j++)
            {
                result[i, j] = (rinv[i, j] * (1.0 / Scale[i])).ToDouble();
            }
        }

        inverseScaledR = rinv;
        return result;
    }

    /// <summary>(XᵀX)⁻¹ = R⁻¹R⁻ᵀ for the unscaled design, summed in double-double, rounded to double.</summary>
    public double[,] InverseGram()
    {
        if (inverseScaledR is null)
        {
            _ = InverseR();
        }

        var rinv = inverseScaledR!;
        var g = new double[P, P];
        for (var i = 0; i < P; i++)
        {
            for (var j = i; j < P; j++)
            {
                var s = DoubleDouble.Zero;
                for (var k = j; k < P; k++)
                {
                    s += rinv[i, k] * rinv[j, k];
                }

                var v = (s * (1.0 / (Scale[i] * Scale[j]))).ToDouble();
                g[i, j] = v;
                g[j, i] = v;
            }
        }

        return g;
    }

    /// <summary>
    /// Coefficients c of column <paramref name="j"/> on the columns before it (scaled least squares on R):
    /// x_j ≈ Σ_k c_k x_k. Used to name the predictors a collinear column depends on.
    /// </summary>
    public double[] DependenceOnEarlier(int j)
    {
        var c = new DoubleDouble[j];
        for (var i = j - 1; i >= 0; i--)
        {
            var s = a[j][i];
            for (var k = i + 1; k < j; k++)
            {
                s -= a[k][i] * c[k];
            }

            c[i] = s / rDiag[i];
        }

        var result = new double[j];
        for (var k = 0; k < j; k++)
        {
            result[k] = c[k].ToDouble() * ColumnNormScaled[k] / Math.Max(ColumnNormScaled[j], double.Epsilon);
        }

        return result;
    }
}

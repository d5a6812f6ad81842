using System.Runtime.Intrinsics;

namespace Spatial.Fitting.Internal;

/// <summary>
/// Gappy projection (Everson &amp; Sirovich 1995): the coefficients c minimising Σ_obs (x_d − m_d − Σ_k c_k v_kd)²
/// (+ α‖c‖² with the ridge) over the observed days only, by the K×K normal equations and Cholesky; and the
/// residuals residual_k = √(Σ_obs (x − m − Σ_{i≤k} c_i v_i)²) / √(Σ_obs (x − m)²), so residual_0 = 1.
/// </summary>
/// <remarks>
/// Days whose mean is NaN (never observed in training) are ignored. The ridge α is <c>ridge × trace(G)/K</c>.
/// A row without observed days, or whose normal equations are singular, gets NaN coefficients and residuals;
/// a row equal to the mean on every observed day gets residuals NaN (0/0).
/// </remarks>
internal sealed class GappyProjector
{
    private readonly double[] mean;
    private readonly double[] meanOrZero;
    private readonly double[] usable;
    private readonly double[] byDay;
    private readonly double[] padded;
    private readonly int kp;

    public GappyProjector(double[] mean, double[][] components, double ridge)
    {
        this.mean = mean;
        K = components.Length;
        Ridge = ridge;
        kp = (K + 3) / 4 * 4;
        byDay = new double[Layout.Days * K];
        padded = new double[Layout.Days * kp];
        meanOrZero = new double[Layout.Days];
        usable = new double[Layout.Days];
        for (var d = 0; d < Layout.Days; d++)
        {
            if (double.IsNaN(mean[d]))
            {
                continue;
            }

            meanOrZero[d] = mean[d];
            usable[d] = 1;
            for (var k = 0; k < K; k++)
            {
                byDay[(d * K) + k] = components[k][d];
                padded[(d * kp) + k] = components[k][d];
            }
        }
    }

    public int K { get; }

    public double Ridge { get; }

    /// <summary>The mean curve (NaN on days never observed in training).</summary>
    public double[] Mean => mean;

    /// <summary>Components day-major [365 × K] (zero on unusable days).</summary>
    public double[] ComponentsByDay => byDay;

    /// <summary>Scratch size in doubles for <see cref="Project"/>.</summary>
    public int ScratchLength => (K * K) + K + (kp * kp) + kp + (2 * Layout.Days);

    /// <summary>Projects one row; writes K coefficients and K+1 residuals.</summary>
    /// <remarks>
    /// Branch-free over days: y_d = x_d − m_d and w_d = 1 on observed usable days, y_d = w_d = 0 otherwise; the normal
    /// equations G = Σ w_d v_d v_dᵀ and b = Σ y_d v_d are summed with 4-wide double vectors over the padded components.
    /// </remarks>
    public void Project(ReadOnlySpan<float> row, Span<double> coefficients, Span<double> residuals, Span<double> scratch) =>
        Project(row, coefficients, residuals, scratch, out _);

    /// <summary>Projects one row as <see cref="Project(ReadOnlySpan{float}, Span{double}, Span{double}, Span{double})"/>, and gives the RMS misfit √(Σ_obs (x − m − Σ_k c_k v_k)² / n_obs), mm (NaN without coefficients).</summary>
    public unsafe void Project(ReadOnlySpan<float> row, Span<double> coefficients, Span<double> residuals, Span<double> scratch, out double rmsMisfitMm)
    {
        rmsMisfitMm = double.NaN;
        var k = K;
        var g = scratch[..(k * k)];
        var b = scratch.Slice(k * k, k);
        var gp = scratch.Slice((k * k) + k, kp * kp);
        var bp = scratch.Slice((k * k) + k + (kp * kp), kp);
        var ys = scratch.Slice((k * k) + k + (kp * kp) + kp, Layout.Days);
        var ws = scratch.Slice((k * k) + k + (kp * kp) + kp + Layout.Days, Layout.Days);
        gp.Clear();
        bp.Clear();
        double n = 0, yy = 0;
        fixed (float* px = row)
        fixed (double* pm = meanOrZero, pu = usable, pv = padded, pys = ys, pws = ws, pg = gp, pb = bp)
        {
            for (var d = 0; d < Layout.Days; d++)
            {
                var x = px[d];
                var observed = !float.IsNaN(x);
                var ok = observed ? pu[d] : 0.0;
                var y = ok * ((observed ? x : 0f) - pm[d]);
                pys[d] = y;
                pws[d] = ok;
                n += ok;
                yy += y * y;
            }

            if (n == 0)
            {
                coefficients.Fill(double.NaN);
                residuals.Fill(double.NaN);
                return;
            }

            if (kp == 4)
            {
                // K ≤ 4: the 4×4 normal equations live in registers.
                var g0 = Vector256<double>.Zero;
                var g1 = Vector256<double>.Zero;
                var g2 = Vector256<double>.Zero;
                var g3 = Vector256<double>.Zero;
                var bb = Vector256<double>.Zero;
                for (var d = 0; d < Layout.Days; d++)
                {
                    var v = pv + (d * 4);
                    var vq = Vector256.Load(v);
                    var wv = vq * pws[d];
                    bb += vq * pys[d];
                    g0 += vq * wv.GetElement(0);
                    g1 += vq * wv.GetElement(1);
                    g2 += vq * wv.GetElement(2);
                    g3 += vq * wv.GetElement(3);
                }

                Vector256.Store(bb, pb);
                Vector256.Store(g0, pg);
                Vector256.Store(g1, pg + 4);
                Vector256.Store(g2, pg + 8);
                Vector256.Store(g3, pg + 12);
            }
            else
            {
                var quads = kp / 4;
                for (var d = 0; d < Layout.Days; d++)
                {
                    var w = pws[d];
                    var v = pv + (d * kp);
                    var y = Vector256.Create(pys[d]);
                    for (var q = 0; q < quads; q++)
                    {
                        var vq = Vector256.Load(v + (4 * q));
                        var bq = Vector256.Load(pb + (4 * q));
                        Vector256.Store(bq + (vq * y), pb + (4 * q));
                        for (var a = 0; a < k; a++)
                        {
                            var ga = pg + (a * kp) + (4 * q);
                            var va = Vector256.Create(v[a] * w);
                            Vector256.Store(Vector256.Load(ga) + (vq * va), ga);
                        }
                    }
                }
            }
        }

        for (var a = 0; a < k; a++)
        {
            b[a] = bp[a];
            for (var c = 0; c < k; c++)
            {
                g[(a * k) + c] = gp[(a * kp) + c];
            }
        }

        if (Ridge > 0)
        {
            var trace = 0.0;
            for (var a = 0; a < k; a++)
            {
                trace += g[(a * k) + a];
            }

            var alpha = Ridge * trace / k;
            for (var a = 0; a < k; a++)
            {
                g[(a * k) + a] += alpha;
            }
        }

        if (!Cholesky.Solve(g, b, k))
        {
            coefficients.Fill(double.NaN);
            residuals.Fill(double.NaN);
            return;
        }

        b.CopyTo(coefficients);
        rmsMisfitMm = Math.Sqrt(Residuals(ys, ws, coefficients, residuals, yy) / n);
    }

    /// <summary>Coefficients of a complete (filled) centred row: plain dot products with the components (EM step).</summary>
    public void ProjectComplete(ReadOnlySpan<double> centred, Span<double> coefficients)
    {
        coefficients.Clear();
        for (var d = 0; d < Layout.Days; d++)
        {
            if (double.IsNaN(mean[d]))
            {
                continue;
            }

            var y = centred[d];
            var v = byDay.AsSpan(d * K, K);
            for (var a = 0; a < K; a++)
            {
                coefficients[a] += v[a] * y;
            }
        }
    }

    /// <summary>Writes the K+1 residuals and returns the sum of squares after all K components.</summary>
    private unsafe double Residuals(ReadOnlySpan<double> ys, ReadOnlySpan<double> ws, ReadOnlySpan<double> c, Span<double> residuals, double yy)
    {
        var k = K;
        residuals.Clear();
        fixed (double* pys = ys, pws = ws, pc = c, pr = residuals, pv = padded)
        {
            if (kp == 4)
            {
                // Running residuals r_a = y − Σ_{i≤a} c_i v_i as a 4-vector: prefix sums of c ⊙ v.
                var cv = Vector256.Create(pc[0], k > 1 ? pc[1] : 0, k > 2 ? pc[2] : 0, k > 3 ? pc[3] : 0);
                var acc = Vector256<double>.Zero;
                for (var d = 0; d < Layout.Days; d++)
                {
                    var t = cv * Vector256.Load(pv + (d * 4));
                    var t0 = t.GetElement(0);
                    var t01 = t0 + t.GetElement(1);
                    var t012 = t01 + t.GetElement(2);
                    var prefix = Vector256.Create(t0, t01, t012, t012 + t.GetElement(3));
                    var r = Vector256.Create(pys[d]) - prefix;
                    acc += r * r * pws[d];
                }

                for (var a = 0; a < k; a++)
                {
                    pr[a + 1] = acc.GetElement(a);
                }
            }
            else
            {
                for (var d = 0; d < Layout.Days; d++)
                {
                    var w = pws[d];
                    var r = pys[d];
                    var v = pv + (d * kp);
                    for (var a = 0; a < k; a++)
                    {
                        r -= pc[a] * v[a];
                        pr[a + 1] += w * r * r;
                    }
                }
            }
        }

        residuals[0] = yy;
        var sse = residuals[k];
        var scale = Math.Sqrt(yy);
        for (var a = 0; a <= k; a++)
        {
            residuals[a] = scale > 0 ? Math.Sqrt(residuals[a]) / scale : double.NaN;
        }

        return sse;
    }
}

/// <summary>Cholesky solve of a small symmetric positive-definite system, in place.</summary>
internal static class Cholesky
{
    /// <summary>Solves G x = b for x (into <paramref name="b"/>); G (n×n row-major) is overwritten by its factor. False when G is not positive definite.</summary>
    public static bool Solve(Span<double> g, Span<double> b, int n)
    {
        var scale = 0.0;
        for (var i = 0; i < n; i++)
        {
            scale = Math.Max(scale, Math.Abs(g[(i * n) + i]));
        }

        var tiny = scale * 1e-12;
        for (var j = 0; j < n; j++)
        {
            var s = g[(j * n) + j];
            for (var k = 0; k < j; k++)
            {
                s -= g[(j * n) + k] * g[(j * n) + k];
            }

            if (!(s > tiny))
            {
                return false;
            }

            var l = Math.Sqrt(s);
            g[(j * n) + j] = l;
            for (var i = j + 1; i < n; i++)
            {
                var t = g[(i * n) + j];
                for (var k = 0; k < j; k++)
                {
                    t -= g[(i * n) + k] * g[(j * n) + k];
                }

                g[(i * n) + j] = t / l;
            }
        }

        for (var i = 0; i < n; i++)
        {
            var t = b[i];
            for (var k = 0; k < i; k++)
            {
                t -= g[(i * n) + k] * b[k];
            }

            b[i] = t / g[(i * n) + i];
        }

        for (var i = n - 1; i >= 0; i--)
        {
            var t = b[i];
            for (var k = i + 1; k < n; k++)
            {
                t -= g[(k * n) + i] * b[k];
            }

            b[i] = t / g[(i * n) + i];
        }

        return true;
    }
}

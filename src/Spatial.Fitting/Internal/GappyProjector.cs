using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

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
/// Sums over days run in 4-wide double vectors over the days (padded to <see cref="Layout.PaddedDays"/>), lanes added
/// at the end: the same numbers for a row whatever else runs.
/// </remarks>
internal sealed class GappyProjector
{
    private const int P = Layout.PaddedDays;

    private readonly double[] mean;
    private readonly double[] meanOrZero;
    private readonly double[] usable;
    private readonly double[] byDay;
    private readonly double[] byComponent;
    private readonly int kq;

    public GappyProjector(double[] mean, double[][] components, double ridge)
    {
        this.mean = mean;
        K = components.Length;
        Ridge = ridge;
        kq = (K + 3) / 4 * 4;
        byDay = new double[Layout.Days * K];
        byComponent = new double[kq * P];
        meanOrZero = new double[P];
        usable = new double[P];
        var allOnes = BitConverter.Int64BitsToDouble(-1L);
        for (var d = 0; d < Layout.Days; d++)
        {
            if (double.IsNaN(mean[d]))
            {
                continue;
            }

            meanOrZero[d] = mean[d];
            usable[d] = allOnes;
            for (var k = 0; k < K; k++)
            {
                byDay[(d * K) + k] = components[k][d];
                byComponent[(k * P) + d] = components[k][d];
            }
        }
    }

    public int K { get; }

    public double Ridge { get; }

    /// <summary>The mean curve (NaN on days never observed in training).</summary>
    public double[] Mean => mean;

    /// <summary>Components day-major [365 × K] (zero on unusable days).</summary>
    public double[] ComponentsByDay => byDay;

    /// <summary>Scratch size in doubles for <see cref="Project(ReadOnlySpan{float}, Span{double}, Span{double}, Span{double})"/>.</summary>
    public int ScratchLength => (K * K) + K + (2 * P) + (4 * (K + 1));

    /// <summary>Projects one row; writes K coefficients and K+1 residuals.</summary>
    public void Project(ReadOnlySpan<float> row, Span<double> coefficients, Span<double> residuals, Span<double> scratch) =>
        Project(row, coefficients, residuals, scratch, out _, default);

    /// <summary>Projects one row as <see cref="Project(ReadOnlySpan{float}, Span{double}, Span{double}, Span{double})"/>, and gives the RMS misfit √(Σ_obs (x − m − Σ_k c_k v_k)² / n_obs), mm (NaN without coefficients).</summary>
    public void Project(ReadOnlySpan<float> row, Span<double> coefficients, Span<double> residuals, Span<double> scratch, out double rmsMisfitMm) =>
        Project(row, coefficients, residuals, scratch, out rmsMisfitMm, default);

    /// <summary>
    /// Projects one row; writes K coefficients, K+1 residuals, the RMS misfit (mm, NaN without coefficients) and, when
    /// <paramref name="reconstruction"/> is not empty (at least 365 long), the season's reconstruction
    /// m_d + Σ_k c_k v_kd (summed in component order) per day, +∞ on days whose mean is NaN; left as it was when the row
    /// gets no coefficients.
    /// </summary>
    /// <remarks>
    /// Branch-free over days: y_d = x_d − m_d on observed usable days and 0 otherwise, w_d the matching 0/1 mask; the normal
    /// equations G = Σ w_d v_d v_dᵀ and b = Σ y_d v_d are summed over days in 4-wide vectors.
    /// </remarks>
    [SkipLocalsInit]
    public unsafe void Project(ReadOnlySpan<float> row, Span<double> coefficients, Span<double> residuals, Span<double> scratch, out double rmsMisfitMm, Span<double> reconstruction)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(row.Length, Layout.Days);
        ArgumentOutOfRangeException.ThrowIfLessThan(scratch.Length, ScratchLength);
        rmsMisfitMm = double.NaN;
        var k = K;
        var g = scratch[..(k * k)];
        var b = scratch.Slice(k * k, k);
        var ys = scratch.Slice((k * k) + k, P);
        var ws = scratch.Slice((k * k) + k + P, P);
        var sums = scratch.Slice((k * k) + k + (2 * P), 4 * (k + 1));
        Span<float> xs = stackalloc float[P];
        row[..Layout.Days].CopyTo(xs);
        xs[Layout.Days..].Fill(float.NaN);
        double n, yy;
        fixed (float* px = xs)
        fixed (double* pm = meanOrZero, pu = usable, pv = byComponent, pys = ys, pws = ws, pg = g, pb = b)
        {
            if (kq == 4)
            {
                NormalEquations4(px, pm, pu, pv, pys, pws, pg, pb, k, out n, out yy);
            }
            else
            {
                Centre(px, pm, pu, pys, pws, out n, out yy);
                if (n > 0)
                {
                    NormalEquations(pv, pys, pws, pg, pb, k);
                }
            }
        }

        if (n == 0)
        {
            coefficients.Fill(double.NaN);
            residuals.Fill(double.NaN);
            return;
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
        var sse = Residuals(ys, ws, coefficients, residuals, yy, sums, reconstruction);
        rmsMisfitMm = Math.Sqrt(sse / n);
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

    /// <summary>y = (x − m) on observed usable days, 0 elsewhere; w the matching 0/1 mask (as a bit mask of whole doubles).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static unsafe void Load(float* px, double* pm, double* pu, int d, out Vector256<double> y, out Vector256<double> ok)
    {
        var x4 = Vector128.Load(px + d);
        var lo = Avx.IsSupported ? Avx.ConvertToVector256Double(x4) : Vector256.Create((double)x4[0], x4[1], x4[2], x4[3]);
        ok = Vector256.Equals(lo, lo) & Vector256.Load(pu + d);
        y = (lo - Vector256.Load(pm + d)) & ok;
    }

    /// <summary>K ≤ 4: G and b in registers, one pass over the days (components padded with zeros to 4).</summary>
    [SkipLocalsInit]
    private static unsafe void NormalEquations4(float* px, double* pm, double* pu, double* pv, double* pys, double* pws, double* pg, double* pb, int k, out double n, out double yy)
    {
        var one = Vector256.Create(1.0);
        var nv = Vector256<double>.Zero;
        var yyv = Vector256<double>.Zero;
        Vector256<double> b0 = default, b1 = default, b2 = default, b3 = default;
        Vector256<double> g00 = default, g01 = default, g02 = default, g03 = default, g11 = default, g12 = default, g13 = default, g22 = default, g23 = default, g33 = default;
        for (var d = 0; d < P; d += 4)
        {
            Load(px, pm, pu, d, out var y, out var ok);
            var w = one & ok;
            Vector256.Store(y, pys + d);
            Vector256.Store(w, pws + d);
            nv += w;
            yyv += y * y;
            var v0 = Vector256.Load(pv + d);
            var v1 = Vector256.Load(pv + P + d);
            var v2 = Vector256.Load(pv + (2 * P) + d);
            var v3 = Vector256.Load(pv + (3 * P) + d);
            b0 += y * v0;
            b1 += y * v1;
            b2 += y * v2;
            b3 += y * v3;
            var u0 = v0 & ok;
            var u1 = v1 & ok;
            var u2 = v2 & ok;
            var u3 = v3 & ok;
            g00 += u0 * v0;
            g01 += u0 * v1;
            g02 += u0 * v2;
            g03 += u0 * v3;
            g11 += u1 * v1;
            g12 += u1 * v2;
            g13 += u1 * v3;
            g22 += u2 * v2;
            g23 += u2 * v3;
            g33 += u3 * v3;
        }

        n = Vector256.Sum(nv);
        yy = Vector256.Sum(yyv);
        Span<double> full = stackalloc double[16];
        full[0] = Vector256.Sum(g00);
        full[1] = full[4] = Vector256.Sum(g01);
        full[2] = full[8] = Vector256.Sum(g02);
        full[3] = full[12] = Vector256.Sum(g03);
        full[5] = Vector256.Sum(g11);
        full[6] = full[9] = Vector256.Sum(g12);
        full[7] = full[13] = Vector256.Sum(g13);
        full[10] = Vector256.Sum(g22);
        full[11] = full[14] = Vector256.Sum(g23);
        full[15] = Vector256.Sum(g33);
        Span<double> bb = [Vector256.Sum(b0), Vector256.Sum(b1), Vector256.Sum(b2), Vector256.Sum(b3)];
        for (var a = 0; a < k; a++)
        {
            pb[a] = bb[a];
            for (var c = 0; c < k; c++)
            {
                pg[(a * k) + c] = full[(a * 4) + c];
            }
        }
    }

    /// <summary>Any K: y and w for every day, and n and Σ y².</summary>
    private static unsafe void Centre(float* px, double* pm, double* pu, double* pys, double* pws, out double n, out double yy)
    {
        var one = Vector256.Create(1.0);
        var nv = Vector256<double>.Zero;
        var yyv = Vector256<double>.Zero;
        for (var d = 0; d < P; d += 4)
        {
            Load(px, pm, pu, d, out var y, out var ok);
            var w = one & ok;
            Vector256.Store(y, pys + d);
            Vector256.Store(w, pws + d);
            nv += w;
            yyv += y * y;
        }

        n = Vector256.Sum(nv);
        yy = Vector256.Sum(yyv);
    }

    /// <summary>Any K: G_ab = Σ (w v_a) v_b and b_a = Σ y v_a, one vector dot product per entry.</summary>
    private static unsafe void NormalEquations(double* pv, double* pys, double* pws, double* pg, double* pb, int k)
    {
        for (var a = 0; a < k; a++)
        {
            var va = pv + (a * P);
            var acc = Vector256<double>.Zero;
            for (var d = 0; d < P; d += 4)
            {
                acc += Vector256.Load(pys + d) * Vector256.Load(va + d);
            }

            pb[a] = Vector256.Sum(acc);
            for (var c = a; c < k; c++)
            {
                var vc = pv + (c * P);
                acc = Vector256<double>.Zero;
                for (var d = 0; d < P; d += 4)
                {
                    acc += Vector256.Load(va + d) * Vector256.Load(pws + d) * Vector256.Load(vc + d);
                }

                pg[(a * k) + c] = pg[(c * k) + a] = Vector256.Sum(acc);
            }
        }
    }

    /// <summary>Writes the K+1 residuals (and the reconstruction when asked) and returns the sum of squares after all K components.</summary>
    [SkipLocalsInit]
    private unsafe double Residuals(ReadOnlySpan<double> ys, ReadOnlySpan<double> ws, ReadOnlySpan<double> c, Span<double> residuals, double yy, Span<double> sums, Span<double> reconstruction)
    {
        var k = K;
        var withModel = reconstruction.Length >= Layout.Days;
        Span<double> rec = withModel && reconstruction.Length >= P ? reconstruction : stackalloc double[withModel ? P : 0];
        fixed (double* pys = ys, pws = ws, pc = c, pv = byComponent, pm = meanOrZero, pu = usable, pr = rec, ps = sums)
        {
            if (kq == 4)
            {
                Residuals4(pys, pws, pc, pv, pm, pu, pr, ps, k);
            }
            else
            {
                ResidualsAny(pys, pws, pc, pv, pm, pu, pr, ps, k);
            }
        }

        if (withModel && !Unsafe.AreSame(ref rec[0], ref reconstruction[0]))
        {
            rec[..Layout.Days].CopyTo(reconstruction);
        }

        residuals[0] = yy;
        for (var a = 1; a <= k; a++)
        {
            residuals[a] = sums[a];
        }

        var sse = residuals[k];
        var scale = Math.Sqrt(yy);
        for (var a = 0; a <= k; a++)
        {
            residuals[a] = scale > 0 ? Math.Sqrt(residuals[a]) / scale : double.NaN;
        }

        return sse;
    }

    /// <summary>
    /// K ≤ 4: running residuals e_a = y − Σ_{i≤a} c_i v_i (prefix sums of c_i v_i), Σ w e_a² per a; reconstruction
    /// ((m + c_1 v_1) + c_2 v_2) + …, +∞ where the mean is NaN. <paramref name="pr"/> null: no reconstruction.
    /// </summary>
    private static unsafe void Residuals4(double* pys, double* pws, double* pc, double* pv, double* pm, double* pu, double* pr, double* ps, int k)
    {
        var c0 = Vector256.Create(pc[0]);
        var c1 = Vector256.Create(k > 1 ? pc[1] : 0);
        var c2 = Vector256.Create(k > 2 ? pc[2] : 0);
        var c3 = Vector256.Create(k > 3 ? pc[3] : 0);
        Vector256<double> a0 = default, a1 = default, a2 = default, a3 = default;
        var inf = Vector256.Create(double.PositiveInfinity);
        for (var d = 0; d < P; d += 4)
        {
            var y = Vector256.Load(pys + d);
            var w = Vector256.Load(pws + d);
            var t0 = c0 * Vector256.Load(pv + d);
            var t1 = c1 * Vector256.Load(pv + P + d);
            var t2 = c2 * Vector256.Load(pv + (2 * P) + d);
            var t3 = c3 * Vector256.Load(pv + (3 * P) + d);
            var p1 = t0 + t1;
            var p2 = p1 + t2;
            var p3 = p2 + t3;
            var e0 = y - t0;
            var e1 = y - p1;
            var e2 = y - p2;
            var e3 = y - p3;
            a0 += e0 * e0 * w;
            a1 += e1 * e1 * w;
            a2 += e2 * e2 * w;
            a3 += e3 * e3 * w;
            if (pr != null && d < Layout.Days)
            {
                var m = Vector256.Load(pm + d);
                var rec = (((m + t0) + t1) + t2) + t3;
                Vector256.Store(Vector256.ConditionalSelect(Vector256.Load(pu + d), rec, inf), pr + d);
            }
        }

        ps[1] = Vector256.Sum(a0);
        ps[2] = Vector256.Sum(a1);
        ps[3] = Vector256.Sum(a2);
        ps[4] = Vector256.Sum(a3);
    }

    /// <summary>Any K: as <see cref="Residuals4"/>, the K running sums kept in <paramref name="ps"/> as vectors.</summary>
    private static unsafe void ResidualsAny(double* pys, double* pws, double* pc, double* pv, double* pm, double* pu, double* pr, double* ps, int k)
    {
        var acc = (Vector256<double>*)ps;
        for (var a = 0; a <= k; a++)
        {
            acc[a] = Vector256<double>.Zero;
        }

        var inf = Vector256.Create(double.PositiveInfinity);
        for (var d = 0; d < P; d += 4)
        {
            var y = Vector256.Load(pys + d);
            var w = Vector256.Load(pws + d);
            var prefix = Vector256<double>.Zero;
            var rec = pr != null ? Vector256.Load(pm + d) : default;
            for (var a = 0; a < k; a++)
            {
                var t = Vector256.Create(pc[a]) * Vector256.Load(pv + (a * P) + d);
                prefix = a == 0 ? t : prefix + t;
                rec += t;
                var e = y - prefix;
                acc[a + 1] += e * e * w;
            }

            if (pr != null && d < Layout.Days)
            {
                Vector256.Store(Vector256.ConditionalSelect(Vector256.Load(pu + d), rec, inf), pr + d);
            }
        }

        var sums = stackalloc double[k + 1];
        for (var a = 1; a <= k; a++)
        {
            sums[a] = Vector256.Sum(acc[a]);
        }

        for (var a = 1; a <= k; a++)
        {
            ps[a] = sums[a];
        }
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

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
    private readonly double[] byDay;
    private readonly double[] fullGram;
    private readonly int usableDays;

    public GappyProjector(double[] mean, double[][] components, double ridge)
    {
        this.mean = mean;
        K = components.Length;
        Ridge = ridge;
        byDay = new double[Layout.Days * K];
        fullGram = new double[K * K];
        for (var d = 0; d < Layout.Days; d++)
        {
            if (double.IsNaN(mean[d]))
            {
                continue;
            }

            usableDays++;
            for (var k = 0; k < K; k++)
            {
                byDay[(d * K) + k] = components[k][d];
            }

            for (var a = 0; a < K; a++)
            {
                for (var b = 0; b < K; b++)
                {
                    fullGram[(a * K) + b] += components[a][d] * components[b][d];
                }
            }
        }
    }

    public int K { get; }

    public double Ridge { get; }

    /// <summary>Components day-major [365 × K] (zero on unusable days).</summary>
    public double[] ComponentsByDay => byDay;

    /// <summary>Scratch size in doubles for <see cref="Project"/>.</summary>
    public int ScratchLength => (K * K) + K + (2 * Layout.Days);

    /// <summary>Projects one row; writes K coefficients and K+1 residuals.</summary>
    public unsafe void Project(ReadOnlySpan<float> row, Span<double> coefficients, Span<double> residuals, Span<double> scratch)
    {
        var k = K;
        var g = scratch[..(k * k)];
        var b = scratch.Slice(k * k, k);
        var ys = scratch.Slice((k * k) + k, Layout.Days);
        var days = scratch.Slice((k * k) + k + Layout.Days, Layout.Days);
        b.Clear();
        var n = 0;
        var yy = 0.0;
        fixed (float* px = row)
        fixed (double* pm = mean, pv = byDay, pb = b, pys = ys, pdays = days)
        {
            for (var d = 0; d < Layout.Days; d++)
            {
                var x = px[d];
                var m = pm[d];
                if (float.IsNaN(x) || double.IsNaN(m))
                {
                    continue;
                }

                var y = x - m;
                pys[n] = y;
                pdays[n] = d;
                n++;
                yy += y * y;
                var v = pv + (d * k);
                for (var a = 0; a < k; a++)
                {
                    pb[a] += v[a] * y;
                }
            }
        }

        if (n == 0)
        {
            coefficients.Fill(double.NaN);
            residuals.Fill(double.NaN);
            return;
        }

        // Gram matrix over observed days: built directly, or as full minus missing when fewer are missing.
        fixed (double* pg = g, pv = byDay, pdays = days, pm = mean)
        {
            if (2 * n >= usableDays)
            {
                fullGram.CopyTo(g);
                var j = 0;
                for (var d = 0; d < Layout.Days; d++)
                {
                    if (j < n && (int)pdays[j] == d)
                    {
                        j++;
                        continue;
                    }

                    if (double.IsNaN(pm[d]))
                    {
                        continue;
                    }

                    AddOuter(pg, pv + (d * k), k, -1.0);
                }
            }
            else
            {
                g.Clear();
                for (var j = 0; j < n; j++)
                {
                    AddOuter(pg, pv + ((int)pdays[j] * k), k, 1.0);
                }
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
        Residuals(ys[..n], days[..n], coefficients, residuals, yy);
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

    private unsafe void Residuals(ReadOnlySpan<double> ys, ReadOnlySpan<double> days, ReadOnlySpan<double> c, Span<double> residuals, double yy)
    {
        var k = K;
        residuals.Clear();
        fixed (double* pys = ys, pdays = days, pc = c, pr = residuals, pv = byDay)
        {
            for (var j = 0; j < ys.Length; j++)
            {
                var r = pys[j];
                var v = pv + ((int)pdays[j] * k);
                pr[0] += r * r;
                for (var a = 0; a < k; a++)
                {
                    r -= pc[a] * v[a];
                    pr[a + 1] += r * r;
                }
            }
        }

        var scale = Math.Sqrt(yy);
        for (var a = 0; a <= k; a++)
        {
            residuals[a] = scale > 0 ? Math.Sqrt(residuals[a]) / scale : double.NaN;
        }
    }

    private static unsafe void AddOuter(double* g, double* v, int k, double sign)
    {
        for (var a = 0; a < k; a++)
        {
            var va = sign * v[a];
            var rowG = g + (a * k);
            for (var b = 0; b < k; b++)
            {
                rowG[b] += va * v[b];
            }
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

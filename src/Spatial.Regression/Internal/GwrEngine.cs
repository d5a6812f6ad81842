namespace Spatial.Regression.Internal;

/// <summary>The repeated work of a GWR: one weighted p × p system per station for a given bandwidth.</summary>
internal sealed class GwrEngine
{
    private readonly double[] x; // row-major n × p, columns scaled by colScale
    private readonly double[] colScale;
    private readonly double[] y;
    private readonly SpherePoints points;
    private readonly float[]? distanceCache; // n × n great-circle km, when n ≤ CacheLimit

    /// <summary>Up to this many stations the all-pairs distances are computed once and kept (as float km, n² × 4 bytes: 100 MB at 5,000).</summary>
    internal const int CacheLimit = 6000;

    /// <summary>Gaussian weights are set to 0 beyond this many bandwidths, where exp(−½u²) &lt; 1e-12 (u = √(2 ln 1e12)).</summary>
    internal static readonly double GaussianCutoff = Math.Sqrt(2 * Math.Log(1e12));
    private readonly Spatial.Regression.GwrKernel kernel;
    private readonly bool adaptive;

    public GwrEngine(IReadOnlyList<double[]> predictors, double[] y, bool intercept, IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg, Spatial.Regression.GwrKernel kernel, bool adaptive)
    {
        N = y.Length;
        P = predictors.Count + (intercept ? 1 : 0);
        if (lonDeg.Count != N || latDeg.Count != N)
        {
            throw new ArgumentException("coordinates and response differ in length", nameof(lonDeg));
        }

        if (N <= P + 1)
        {
            throw new Spatial.Core.SpatialDataException("local regression", 0, $"{N} rows for {P} local coefficients", "a local regression needs more rows");
        }

        this.y = y;
        this.kernel = kernel;
        this.adaptive = adaptive;
        points = new SpherePoints(lonDeg, latDeg);
        if (N <= CacheLimit)
        {
            var cache = new float[(long)N * N];
            Parallel.For(0, N, () => new double[N], (i, _, d) =>
            {
                Distances(i, d);
                var row = cache.AsSpan(i * N, N);
                for (var j = 0; j < N; j++)
                {
                    row[j] = (float)d[j];
                }

                return d;
            }, _ => { });
            distanceCache = cache;
        }
        colScale = new double[P];
        x = new double[N * P];
        var cols = new List<double[]>();
        if (intercept)
        {
            var one = new double[N];
            Array.Fill(one, 1.0);
            cols.Add(one);
        }

        cols.AddRange(predictors);
        for (var j = 0; j < P; j++)
        {
            var ss = cols[j].Sum(v => v * v);
            var s = ss > 0 ? Math.Sqrt(ss / N) : 1.0;
            colScale[j] = s;
            for (var i = 0; i < N; i++)
            {
                x[(i * P) + j] = cols[j][i] / s;
            }
        }
    }

    public int N { get; }

    public int P { get; }

    /// <summary>Search range for a fixed bandwidth: from just beyond every station's p-th nearest neighbour to the largest distance, km.</summary>
    public (double Lower, double Upper) FixedBandwidthRange()
    {
        var lower = new double[N];
        var upper = new double[N];
        Parallel.For(0, N, () => new double[N], (i, _, d) =>
        {
            Distances(i, d);
            upper[i] = d.AsSpan().ToArray().Max();
            d[i] = double.PositiveInfinity;
            lower[i] = KthSmallest(d, P);
            return d;
        }, _ => { });
        var lo = lower.Max() * 1.000001;
        var hi = upper.Max();
        return (Math.Min(lo, hi), Math.Max(hi, lo * 2));
    }

    public sealed record Evaluation(bool Singular, int SingularRow, double Aicc, double TraceS, double TraceStS, double Rss, double Sigma, double[] Fitted, double[][]? Coefficients, double[][]? StandardErrors, double[]? LocalR2);

    public Evaluation Evaluate(double bandwidth, bool full)
    {
        var p = P;
        var n = N;
        var fitted = new double[n];
        var hat = new double[n];
        var sts = full ? new double[n] : null;
        var singular = new bool[n];
        var coefs = full ? new double[n][] : null;
        var ses = full ? new double[n][] : null;
        var localR2 = full ? new double[n] : null;
        var bScaledAll = full ? new double[n][] : null;
        var bMatAll = full ? new double[n][] : null;
        var aInvAll = full ? new double[n][] : null;

        Parallel.For(0, n, () => new Buffers(n, p), (i, _, buf) =>
        {
            var d = buf.D;
            var w = buf.W;
            Distances(i, d);
            double bi;
            if (adaptive)
            {
                d[i] = double.PositiveInfinity;
                bi = KthSmallest(d, (int)bandwidth, buf.W) * 1.000001;
                d[i] = 0;
            }
            else
            {
                bi = bandwidth;
            }

            var a = buf.A;
            var c = buf.C;
            Array.Clear(a);
            Array.Clear(c);
            var bMat = full ? new double[p * p] : null;
            var cut = bi * (kernel == Spatial.Regression.GwrKernel.Gaussian ? GaussianCutoff : 1.0);
            for (var j = 0; j < n; j++)
            {
                var wj = d[j] < cut ? Kernel(d[j], bi) : 0.0;
                w[j] = wj;
                if (wj == 0)
                {
                    continue;
                }

                var off = j * p;
                for (var r = 0; r < p; r++)
                {
                    var xr = x[off + r];
                    var wxr = wj * xr;
                    c[r] += wxr * y[j];
                    for (var s = r; s < p; s++)
                    {
                        a[(r * p) + s] += wxr * x[off + s];
                    }

                    if (bMat is not null)
                    {
                        var w2xr = wj * wxr;
                        for (var s = r; s < p; s++)
                        {
                            bMat[(r * p) + s] += w2xr * x[off + s];
                        }
                    }
                }

            }

            if (!Cholesky(a, p))
            {
                singular[i] = true;
                return buf;
            }

            var beta = new double[p];
            Array.Copy(c, beta, p);
            CholeskySolve(a, p, beta);
            var xi = x.AsSpan(i * p, p);
            var ri = new double[p];
            xi.CopyTo(ri);
            CholeskySolve(a, p, ri); // r_i = A⁻¹ x_i
            double fit = 0, h = 0;
            for (var r = 0; r < p; r++)
            {
                fit += xi[r] * beta[r];
                h += xi[r] * ri[r];
            }

            fitted[i] = fit;
            hat[i] = h * w[i];
            if (full)
            {
                // Row i of S: S_ij = w_ij x_jᵀ r_i; local R².
                double sumSq = 0, sw = 0, swy = 0;
                for (var j = 0; j < n; j++)
                {
                    if (w[j] == 0)
                    {
                        continue;
                    }

                    var off = j * p;
                    double xr = 0;
                    for (var r = 0; r < p; r++)
                    {
                        xr += x[off + r] * ri[r];
                    }

                    var sij = w[j] * xr;
                    sumSq += sij * sij;
                    sw += w[j];
                    swy += w[j] * y[j];
                }

                sts![i] = sumSq;
                var ybar = swy / sw;
                double rssL = 0, tssL = 0;
                for (var j = 0; j < n; j++)
                {
                    if (w[j] == 0)
                    {
                        continue;
                    }

                    var off = j * p;
                    double yhat = 0;
                    for (var r = 0; r < p; r++)
                    {
                        yhat += x[off + r] * beta[r];
                    }

                    rssL += w[j] * (y[j] - yhat) * (y[j] - yhat);
                    tssL += w[j] * (y[j] - ybar) * (y[j] - ybar);
                }

                localR2![i] = tssL > 0 ? 1 - (rssL / tssL) : double.NaN;
                bScaledAll![i] = beta;
                bMatAll![i] = bMat!;
                aInvAll![i] = Inverse(a, p);
            }

            return buf;
        }, _ => { });

        for (var i = 0; i < n; i++)
        {
            if (singular[i])
            {
                return new Evaluation(true, i, double.PositiveInfinity, double.NaN, double.NaN, double.NaN, double.NaN, fitted, null, null, null);
            }
        }

        double rss = 0, trS = 0, trStS = 0;
        for (var i = 0; i < n; i++)
        {
            rss += (y[i] - fitted[i]) * (y[i] - fitted[i]);
            trS += hat[i];
            if (sts is not null)
            {
                trStS += sts[i];
            }
        }

        var sigmaMl = Math.Sqrt(rss / n);
        var denom = n - 2 - trS;
        var aicc = denom > 0 ? (2 * n * Math.Log(sigmaMl)) + (n * Math.Log(2 * Math.PI)) + (n * (n + trS) / denom) : double.PositiveInfinity;
        if (!full)
        {
            return new Evaluation(false, -1, aicc, trS, double.NaN, rss, double.NaN, fitted, null, null, null);
        }

        var dfEff = n - (2 * trS) + trStS;
        var sigma2 = rss / dfEff;
        for (var i = 0; i < n; i++)
        {
            var ainv = aInvAll![i];
            var bm = bMatAll![i];
            var beta = bScaledAll![i];
            coefs![i] = new double[p];
            ses![i] = new double[p];
            for (var r = 0; r < p; r++)
            {
                // (A⁻¹ B A⁻¹)_rr
                double v = 0;
                for (var s = 0; s < p; s++)
                {
                    for (var t = 0; t < p; t++)
                    {
                        var bst = s <= t ? bm[(s * p) + t] : bm[(t * p) + s];
                        v += ainv[(r * p) + s] * bst * ainv[(t * p) + r];
                    }
                }

                coefs[i][r] = beta[r] / colScale[r];
                ses[i][r] = Math.Sqrt(sigma2 * Math.Max(v, 0)) / colScale[r];
            }
        }

        return new Evaluation(false, -1, aicc, trS, trStS, rss, Math.Sqrt(sigma2), fitted, coefs, ses, localR2);
    }

    private void Distances(int i, double[] into)
    {
        if (distanceCache is null)
        {
            points.DistancesFrom(i, into);
            return;
        }

        var row = distanceCache.AsSpan(i * N, N);
        for (var j = 0; j < N; j++)
        {
            into[j] = row[j];
        }
    }

    private double Kernel(double d, double b)
    {
        var u = d / b;
        if (kernel == Spatial.Regression.GwrKernel.Gaussian)
        {
            return Math.Exp(-0.5 * u * u);
        }

        if (u >= 1)
        {
            return 0;
        }

        var t = 1 - (u * u);
        return t * t;
    }

    /// <summary>k-th smallest value (1-based) of <paramref name="values"/>, by selection on a copy.</summary>
    internal static double KthSmallest(double[] values, int k, double[]? scratch = null)
    {
        var a = scratch ?? new double[values.Length];
        Array.Copy(values, a, values.Length);
        var lo = 0;
        var hi = a.Length - 1;
        var target = k - 1;
        while (lo < hi)
        {
            var pivot = a[lo + ((hi - lo) / 2)];
            var i = lo;
            var j = hi;
            while (i <= j)
            {
                while (a[i] < pivot)
                {
                    i++;
                }

                while (a[j] > pivot)
                {
                    j--;
                }

                if (i <= j)
                {
                    (a[i], a[j]) = (a[j], a[i]);
                    i++;
                    j--;
                }
            }

            if (target <= j)
            {
                hi = j;
            }
            else if (target >= i)
            {
                lo = i;
            }
            else
            {
                return a[target];
            }
        }

        return a[target];
    }

    /// <summary>In-place Cholesky A = L Lᵀ of the upper-stored symmetric matrix; L is stored in the lower triangle. False when not positive definite.</summary>
    private static bool Cholesky(double[] a, int p)
    {
        double maxDiag = 0;
        for (var r = 0; r < p; r++)
        {
            maxDiag = Math.Max(maxDiag, a[(r * p) + r]);
            for (var s = 0; s < r; s++)
            {
                a[(r * p) + s] = a[(s * p) + r];
            }
        }

        for (var j = 0; j < p; j++)
        {
            var sum = a[(j * p) + j];
            for (var k = 0; k < j; k++)
            {
                sum -= a[(j * p) + k] * a[(j * p) + k];
            }

            if (!(sum > 1e-12 * maxDiag))
            {
                return false;
            }

            var l = Math.Sqrt(sum);
            a[(j * p) + j] = l;
            for (var i = j + 1; i < p; i++)
            {
                var s = a[(i * p) + j];
                for (var k = 0; k < j; k++)
                {
                    s -= a[(i * p) + k] * a[(j * p) + k];
                }

                a[(i * p) + j] = s / l;
            }
        }

        return true;
    }

    private static void CholeskySolve(double[] l, int p, double[] b)
    {
        for (var i = 0; i < p; i++)
        {
            var s = b[i];
            for (var k = 0; k < i; k++)
            {
                s -= l[(i * p) + k] * b[k];
            }

            b[i] = s / l[(i * p) + i];
        }

        for (var i = p - 1; i >= 0; i--)
        {
            var s = b[i];
            for (var k = i + 1; k < p; k++)
            {
                s -= l[(k * p) + i] * b[k];
            }

            b[i] = s / l[(i * p) + i];
        }
    }

    private static double[] Inverse(double[] l, int p)
    {
        var inv = new double[p * p];
        var e = new double[p];
        for (var c = 0; c < p; c++)
        {
            Array.Clear(e);
            e[c] = 1;
            CholeskySolve(l, p, e);
            for (var r = 0; r < p; r++)
            {
                inv[(r * p) + c] = e[r];
            }
        }

        return inv;
    }

    private sealed class Buffers(int n, int p)
    {
        public double[] D { get; } = new double[n];

        public double[] W { get; } = new double[n];

        public double[] A { get; } = new double[p * p];

        public double[] C { get; } = new double[p];
    }
}

namespace Spatial.Regression;

/// <summary>Kernel of a geographically weighted regression (Fotheringham, Brunsdon &amp; Charlton 2002, §2.7).</summary>
public enum GwrKernel
{
    /// <summary>w = exp(−½ (d/b)²); weights below 1e-12 (d &gt; 7.43 b) are taken as 0.</summary>
    Gaussian,

    /// <summary>w = (1 − (d/b)²)² for d &lt; b, else 0.</summary>
    Bisquare,
}

/// <summary>How a local regression is asked for.</summary>
/// <param name="Kernel">Kernel shape.</param>
/// <param name="Adaptive">False: one bandwidth in km for every station. True: station i's bandwidth reaches just beyond
/// its k-th nearest neighbour (× 1.000001), so i and its k nearest neighbours get positive weight; the bandwidth is k.</param>
/// <param name="Bandwidth">A given bandwidth (km, or k when adaptive); null to choose it by AICc with a golden-section search.</param>
public sealed record GwrSpec(GwrKernel Kernel, bool Adaptive, double? Bandwidth = null);

/// <summary>One bandwidth tried by the search.</summary>
/// <param name="Bandwidth">km, or number of neighbours when adaptive.</param>
/// <param name="Aicc">AICc at that bandwidth (+∞ when a local system was singular).</param>
public sealed record BandwidthTrial(double Bandwidth, double Aicc);

/// <summary>
/// A geographically weighted regression (Fotheringham, Brunsdon &amp; Charlton 2002). Per-row arrays follow the
/// fitted rows; coefficient arrays are [row][term] with terms in design order (intercept first when present).
/// </summary>
/// <param name="Kernel">Kernel shape.</param>
/// <param name="Adaptive">True for a k-nearest-neighbour bandwidth.</param>
/// <param name="Bandwidth">Chosen or given bandwidth (km, or k).</param>
/// <param name="Aicc">AICc = 2n ln σ̂ + n ln 2π + n (n + tr S)/(n − 2 − tr S), σ̂² = RSS/n (Fotheringham et al. 2002, eq. 2.33; Hurvich, Simonoff &amp; Tsai 1998).</param>
/// <param name="TraceS">tr S, the effective number of parameters.</param>
/// <param name="TraceStS">tr SᵀS.</param>
/// <param name="Sigma">σ = √(RSS/(n − 2 tr S + tr SᵀS)), used for the local standard errors.</param>
/// <param name="ResidualSumOfSquares">Σ (y_i − ŷ_i)².</param>
/// <param name="Terms">Term names (intercept first when present).</param>
/// <param name="Coefficients">Local coefficients β_i.</param>
/// <param name="StandardErrors">Local standard errors √diag(σ² C_i C_iᵀ), C_i = (XᵀW_iX)⁻¹XᵀW_i.</param>
/// <param name="LocalR2">Local R²: 1 − Σ_j w_ij (y_j − x_jᵀβ_i)² / Σ_j w_ij (y_j − ȳ_i)², ȳ_i the w_i-weighted mean.</param>
/// <param name="Fitted">ŷ_i = x_iᵀβ_i.</param>
/// <param name="Search">Bandwidths tried, in order (empty when the bandwidth was given).</param>
public sealed record GwrResult(
    GwrKernel Kernel,
    bool Adaptive,
    double Bandwidth,
    double Aicc,
    double TraceS,
    double TraceStS,
    double Sigma,
    double ResidualSumOfSquares,
    IReadOnlyList<string> Terms,
    double[][] Coefficients,
    double[][] StandardErrors,
    double[] LocalR2,
    double[] Fitted,
    IReadOnlyList<BandwidthTrial> Search);

/// <summary>Geographically weighted regression with AICc bandwidth selection.</summary>
public static class Gwr
{
    /// <summary>
    /// Fits a GWR of <paramref name="y"/> on the predictor columns at the stations (degrees, great-circle
    /// distances by <see cref="GreatCircle"/>). Local systems are solved by Cholesky factorisation of XᵀW_iX
    /// on RMS-scaled columns (a p × p system per station); rows run in parallel and are reduced in row order,
    /// so results do not depend on the thread count. Inputs are not modified.
    /// </summary>
    /// <exception cref="Spatial.Core.SpatialDataException">A local system is singular at the chosen bandwidth.</exception>
    public static GwrResult Fit(IReadOnlyList<string> names, IReadOnlyList<double[]> predictors, double[] y, bool intercept, IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg, GwrSpec spec)
    {
        ArgumentNullException.ThrowIfNull(names);
        ArgumentNullException.ThrowIfNull(predictors);
        ArgumentNullException.ThrowIfNull(y);
        ArgumentNullException.ThrowIfNull(spec);
        var engine = new Internal.GwrEngine(predictors, y, intercept, lonDeg, latDeg, spec.Kernel, spec.Adaptive);
        var terms = new List<string>();
        if (intercept)
        {
            terms.Add("intercept");
        }

        terms.AddRange(names);
        var trials = new List<BandwidthTrial>();
        double bandwidth;
        if (spec.Bandwidth is { } given)
        {
            bandwidth = spec.Adaptive ? Math.Round(given) : given;
            if (!(bandwidth > 0) || (spec.Adaptive && (bandwidth < engine.P || bandwidth > y.Length - 1)))
            {
                throw new ArgumentOutOfRangeException(nameof(spec), given, spec.Adaptive ? $"k must lie in [{engine.P}, {y.Length - 1}]" : "bandwidth must be positive km");
            }
        }
        else
        {
            bandwidth = Search(engine, spec.Adaptive, trials);
        }

        var result = engine.Evaluate(bandwidth, full: true);
        if (result.Singular)
        {
            throw new Spatial.Core.SpatialDataException("local regression", 0, FormattableString.Invariant($"a local system is singular at bandwidth {bandwidth:G6} (station row {result.SingularRow + 1})"), "use a larger bandwidth or fewer predictors");
        }

        return new GwrResult(spec.Kernel, spec.Adaptive, bandwidth, result.Aicc, result.TraceS, result.TraceStS, result.Sigma, result.Rss, terms, result.Coefficients!, result.StandardErrors!, result.LocalR2!, result.Fitted, trials);
    }

    /// <summary>Golden-section search of AICc over the bandwidth (Fotheringham et al. 2002, §2.9): fixed in [lower, max distance] km, adaptive over integers k in [p, n − 1].</summary>
    private static double Search(Internal.GwrEngine engine, bool adaptive, List<BandwidthTrial> trials)
    {
        var cache = new Dictionary<double, double>();
        double F(double b)
        {
            if (adaptive)
            {
                b = Math.Round(b);
            }

            if (!cache.TryGetValue(b, out var v))
            {
                var e = engine.Evaluate(b, full: false);
                v = e.Singular ? double.PositiveInfinity : e.Aicc;
                cache[b] = v;
                trials.Add(new BandwidthTrial(b, v));
            }

            return v;
        }

        double lo, hi;
        if (adaptive)
        {
            lo = engine.P;
            hi = engine.N - 1;
        }
        else
        {
            (lo, hi) = engine.FixedBandwidthRange();
        }

        const double invPhi = 0.6180339887498949;
        var a = lo;
        var b = hi;
        var c = b - (invPhi * (b - a));
        var d = a + (invPhi * (b - a));
        var fc = F(c);
        var fd = F(d);
        var tol = adaptive ? 0.5 : 1e-4 * (hi - lo);
        while (b - a > tol)
        {
            if (fc <= fd)
            {
                b = d;
                d = c;
                fd = fc;
                c = b - (invPhi * (b - a));
                fc = F(c);
            }
            else
            {
                a = c;
                c = d;
                fc = fd;
                d = a + (invPhi * (b - a));
                fd = F(d);
            }

            if (adaptive && Math.Round(c) == Math.Round(d) && Math.Round(a) == Math.Round(b))
            {
                break;
            }
        }

        // Also consider the interval ends and pick the best bandwidth seen (ties: smaller bandwidth).
        _ = F(lo);
        _ = F(hi);
        return cache.OrderBy(kv => kv.Value).ThenBy(kv => kv.Key).First().Key;
    }
}

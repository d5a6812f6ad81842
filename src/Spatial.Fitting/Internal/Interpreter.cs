using Spatial.Core;

namespace Spatial.Fitting.Internal;

/// <summary>
/// Labels components from their correlation with the season metrics and orients their signs (DESIGN.md): component 1,
/// when labelled amount or other, positive = more snow than the mean curve (Σ_d v_1d &gt; 0); a component labelled timing or
/// duration follows its label's rule even when it is component 1; an amount component positive = deeper peak; a timing
/// component positive = earlier season; a duration component positive = longer season; an other component has
/// Σ_d v_d &gt; 0.
/// </summary>
/// <remarks>
/// <para>Correlations are sequential partial correlations: component k against each metric controlling for components
/// 1…k−1 (for component 1 the plain Pearson r). Component 1 of a snow climate is mostly amount, and its amount also moves
/// onset, melt-out and snow days; the partial correlation asks what component k adds to a metric once the earlier
/// components are accounted for, so a timing mode is not hidden behind the amount mode's large raw correlations.</para>
/// <para>Scores, from the partial correlations p: amount = p(peak_depth_mm); timing = −p(centroid_day), the depth-weighted
/// mean day of the season (positive = the snow lies earlier); duration = p(longest_cover_days), the longest continuous
/// cover (positive = longer). Timing rests on the centroid rather than on the edges: the centroid uses every day of the
/// season and a stretch moves it only as far as the curve is lopsided, whereas onset and melt-out each mix timing with
/// duration (a season whose melt-out alone comes later is both later and longer), and on depth curves the onset edge
/// (shallow autumn snow) carries so little of the variance that an edge-based score cannot tell a shift from a
/// stretch. Duration rests on the longest continuous cover (the length of the main snow season), which a shift leaves
/// unchanged.</para>
/// <para>Labels are handed out in component order (most variance first): each component takes its largest |score| among
/// the labels no earlier component has taken, when that |score| reaches the minimum; otherwise it is "other". Component 1,
/// the mode that scales the mean curve, is amount whenever its amount score reaches the minimum (DESIGN.md orients it as
/// more snow), even when it carries a second aspect about as strongly. Component order, not the size of the score,
/// decides, because a late component's partial correlation is taken on the little variance the earlier components leave
/// and can approach 1 for a small effect. Each component keeps all three scores, so a component that also carries a
/// second aspect (the data do not separate them) is visible in the output.</para>
/// </remarks>
internal static class Interpreter
{
    public const string Amount = "amount";
    public const string Timing = "timing";
    public const string Duration = "duration";
    public const string Other = "other";

    /// <summary>Names of the label scores, in the order of <see cref="Scores"/>.</summary>
    public static readonly string[] ScoreNames = [Amount, Timing, Duration];

    private const int LongestCover = 2;
    private const int Peak = 4;
    private const int Centroid = 6;

    /// <summary>Amount, timing and duration scores from one component's (partial) correlations with the metrics.</summary>
    public static double[] Scores(double[] p) =>
        [p[Peak], -p[Centroid], p[LongestCover]];

    /// <summary>The aspects whose |score| reaches <paramref name="minScore"/>, largest |score| first (ties in the order amount, timing, duration).</summary>
    public static string[] Aspects(double[] partials, double minScore)
    {
        var s = Scores(partials);
        return Enumerable.Range(0, 3)
            .Where(i => double.IsFinite(s[i]) && Math.Abs(s[i]) >= minScore)
            .OrderByDescending(i => Math.Abs(s[i])).ThenBy(i => i)
            .Select(i => ScoreNames[i]).ToArray();
    }

    /// <summary>Returns per component: label, metric(s) it rests on and sign (+1/−1) to multiply the component and coefficients by.</summary>
    /// <param name="components">The K components (unit vectors, 365 days).</param>
    /// <param name="partials">Per component, the partial correlation with each metric given the earlier components.</param>
    /// <param name="minScore">Least |score| for a label.</param>
    public static (string Label, string Metric, int Sign, string Rule)[] Label(double[][] components, double[][] partials, double minScore)
    {
        var k = components.Length;
        var metricOf = new[] { "peak_depth_mm", "centroid_day", "longest_cover_days" };
        var chosen = new int[k];
        var taken = new bool[3];
        for (var c = 0; c < k; c++)
        {
            // In component order (most variance first): the component's largest free |score|, if it reaches the minimum;
            // component 1, the mode that scales the mean curve (DESIGN.md orients it as more snow), is amount whenever
            // its amount score reaches the minimum, even if another aspect it also carries scores a little higher.
            var s = Scores(partials[c]);
            chosen[c] = -1;
            if (c == 0 && double.IsFinite(s[0]) && Math.Abs(s[0]) >= minScore)
            {
                chosen[c] = 0;
                taken[0] = true;
                continue;
            }

            var best = minScore;
            for (var l = 0; l < 3; l++)
            {
                var score = double.IsFinite(s[l]) ? Math.Abs(s[l]) : 0;
                if (!taken[l] && score >= best && (chosen[c] < 0 || score > best))
                {
                    chosen[c] = l;
                    best = score;
                }
            }

            if (chosen[c] >= 0)
            {
                taken[chosen[c]] = true;
            }
        }

        var result = new (string, string, int, string)[k];
        for (var c = 0; c < k; c++)
        {
            var label = chosen[c] >= 0 ? ScoreNames[chosen[c]] : Other;
            var metricName = chosen[c] >= 0 ? metricOf[chosen[c]] : string.Empty;
            var score = chosen[c] >= 0 ? Scores(partials[c])[chosen[c]] : double.NaN;
            int sign;
            string rule;
            if (c == 0 && label is Amount or Other)
            {
                sign = components[c].Sum() >= 0 ? 1 : -1;
                rule = "component 1: positive = more snow than the mean curve (sum of the component over the season > 0)";
            }
            else if (label == Timing)
            {
                sign = score >= 0 ? 1 : -1;
                rule = "timing: positive = earlier season (the depth-weighted centre of the season comes earlier: -p_centroid > 0)";
            }
            else if (label == Duration)
            {
                sign = score >= 0 ? 1 : -1;
                rule = "duration: positive = longer season (longer continuous snow cover: p_longest_cover > 0)";
            }
            else if (label == Amount)
            {
                sign = score >= 0 ? 1 : -1;
                rule = "amount: positive = more snow (positive partial correlation with peak_depth_mm)";
            }
            else
            {
                sign = components[c].Sum() >= 0 ? 1 : -1;
                rule = "other: positive = sum of the component over the season > 0";
            }

            result[c] = (label, metricName, sign, rule);
        }

        return result;
    }

    /// <summary>
    /// Sequential partial correlations: for each metric, over the training rows where it and all K coefficients are
    /// finite, the covariance S of (c_1…c_K, metric); then for component k the partial correlation of c_k and the metric
    /// given c_1…c_{k−1}, −P_km / √(P_kk P_mm) with P the inverse of S restricted to {c_1…c_k, metric} (for k = 1 the plain r).
    /// NaN with fewer than K + 3 rows or a singular S.
    /// </summary>
    public static double[][] PartialCorrelations(Func<int, int, double> coefficient, Func<int, int, double> metric, int k, int metrics, IReadOnlyList<int> rows)
    {
        var result = new double[k][];
        for (var c = 0; c < k; c++)
        {
            result[c] = new double[metrics];
        }

        var n = k + 1;
        var z = new double[n];
        for (var m = 0; m < metrics; m++)
        {
            var sum = new double[n];
            var cross = new double[n * n];
            var count = 0;
            foreach (var r in rows)
            {
                if (!Fill(z, coefficient, metric, r, k, m))
                {
                    continue;
                }

                count++;
                for (var a = 0; a < n; a++)
                {
                    sum[a] += z[a];
                }
            }

            if (count < k + 3)
            {
                for (var c = 0; c < k; c++)
                {
                    result[c][m] = double.NaN;
                }

                continue;
            }

            var centre = sum.Select(x => x / count).ToArray();
            foreach (var r in rows)
            {
                if (!Fill(z, coefficient, metric, r, k, m))
                {
                    continue;
                }

                for (var a = 0; a < n; a++)
                {
                    var za = z[a] - centre[a];
                    for (var b = 0; b < n; b++)
                    {
                        cross[(a * n) + b] += za * (z[b] - centre[b]);
                    }
                }
            }

            for (var c = 0; c < k; c++)
            {
                // Indices c_0…c_c and the metric (index k of the full matrix).
                var idx = Enumerable.Range(0, c + 1).Append(k).ToArray();
                var s = new double[idx.Length * idx.Length];
                for (var a = 0; a < idx.Length; a++)
                {
                    for (var b = 0; b < idx.Length; b++)
                    {
                        s[(a * idx.Length) + b] = cross[(idx[a] * n) + idx[b]];
                    }
                }

                var p = Invert(s, idx.Length);
                var last = idx.Length - 1;
                result[c][m] = p is null ? double.NaN : -p[(c * idx.Length) + last] / Math.Sqrt(p[(c * idx.Length) + c] * p[(last * idx.Length) + last]);
            }
        }

        return result;
    }

    private static bool Fill(double[] z, Func<int, int, double> coefficient, Func<int, int, double> metric, int r, int k, int m)
    {
        var y = metric(r, m);
        if (!double.IsFinite(y))
        {
            return false;
        }

        for (var c = 0; c < k; c++)
        {
            z[c] = coefficient(r, c);
            if (!double.IsFinite(z[c]))
            {
                return false;
            }
        }

        z[k] = y;
        return true;
    }

    /// <summary>Inverse of a small symmetric positive definite matrix by Gauss–Jordan with partial pivoting; null when singular.</summary>
    private static double[]? Invert(double[] s, int n)
    {
        var a = (double[])s.Clone();
        var inv = new double[n * n];
        for (var i = 0; i < n; i++)
        {
            inv[(i * n) + i] = 1;
        }

        var scale = 0.0;
        for (var i = 0; i < n; i++)
        {
            scale = Math.Max(scale, Math.Abs(a[(i * n) + i]));
        }

        for (var col = 0; col < n; col++)
        {
            var pivot = col;
            for (var r = col + 1; r < n; r++)
            {
                if (Math.Abs(a[(r * n) + col]) > Math.Abs(a[(pivot * n) + col]))
                {
                    pivot = r;
                }
            }

            if (!(Math.Abs(a[(pivot * n) + col]) > 1e-12 * scale))
            {
                return null;
            }

            if (pivot != col)
            {
                for (var j = 0; j < n; j++)
                {
                    (a[(col * n) + j], a[(pivot * n) + j]) = (a[(pivot * n) + j], a[(col * n) + j]);
                    (inv[(col * n) + j], inv[(pivot * n) + j]) = (inv[(pivot * n) + j], inv[(col * n) + j]);
                }
            }

            var d = a[(col * n) + col];
            for (var j = 0; j < n; j++)
            {
                a[(col * n) + j] /= d;
                inv[(col * n) + j] /= d;
            }

            for (var r = 0; r < n; r++)
            {
                if (r == col)
                {
                    continue;
                }

                var f = a[(r * n) + col];
                if (f == 0)
                {
                    continue;
                }

                for (var j = 0; j < n; j++)
                {
                    a[(r * n) + j] -= f * a[(col * n) + j];
                    inv[(r * n) + j] -= f * inv[(col * n) + j];
                }
            }
        }

        return inv;
    }

    /// <summary>
    /// Likely cause of a poorly described season: coverage (fewer than half the days observed, or a gap of 30 days or more),
    /// flat-line (15 or more consecutive observed days with the same non-zero depth), spikes (at most 3 days hold half the
    /// residual sum of squares), otherwise shape. Thresholds are common practice for screening daily depth series.
    /// </summary>
    public static (string Cause, string Detail) Diagnose(ReadOnlySpan<float> row, double[] mean, double[][] components, ReadOnlySpan<double> coefficients)
    {
        var observed = 0;
        int longestGap = 0, gap = 0, flat = 1, longestFlat = 0;
        var previous = float.NaN;
        var flatValue = 0f;
        for (var d = 0; d < row.Length; d++)
        {
            if (float.IsNaN(row[d]))
            {
                gap++;
                longestGap = Math.Max(longestGap, gap);
                flat = 0;
                previous = float.NaN;
                continue;
            }

            observed++;
            gap = 0;
            flat = row[d] == previous && row[d] != 0 ? flat + 1 : 1;
            if (flat > longestFlat)
            {
                longestFlat = flat;
                flatValue = row[d];
            }

            previous = row[d];
        }

        if (2 * observed < row.Length || longestGap >= 30)
        {
            return ("coverage", FormattableString.Invariant($"{observed} days observed, longest gap {longestGap} days"));
        }

        if (longestFlat >= 15)
        {
            return ("flat-line", FormattableString.Invariant($"{longestFlat} consecutive days at {flatValue:0.#} mm"));
        }

        var squares = new List<double>();
        for (var d = 0; d < row.Length; d++)
        {
            if (float.IsNaN(row[d]) || double.IsNaN(mean[d]))
            {
                continue;
            }

            var r = row[d] - mean[d];
            for (var k = 0; k < components.Length; k++)
            {
                r -= coefficients[k] * components[k][d];
            }

            squares.Add(r * r);
        }

        var total = squares.Sum();
        squares.Sort();
        var top = squares.Count >= 3 ? squares[^1] + squares[^2] + squares[^3] : total;
        if (total > 0 && top >= 0.5 * total)
        {
            return ("spikes", FormattableString.Invariant($"3 days hold {100 * top / total:0}% of the misfit"));
        }

        return ("shape", "the curve's shape is outside the span of the components");
    }
}

using Spatial.Core;

namespace Spatial.Fitting.Internal;

/// <summary>
/// Labels components from their correlation with the season metrics and orients their signs (DESIGN.md): component 1,
/// when labelled amount or other, positive = more snow than the mean curve (Σ_d v_1d &gt; 0); a component labelled timing or
/// duration follows its label's rule even when it is component 1; an amount component positive = deeper peak; a timing
/// component positive = earlier season (negative r with the centroid day); a duration component positive = longer
/// cover (positive r with its duration metric); an other component has Σ_d v_d &gt; 0.
/// </summary>
/// <remarks>
/// Scores: amount |r(peak_depth_mm)|, timing |r(centroid_day)|, duration the larger of |r(snow_days)| and
/// |r(longest_cover_days)|. Labels are handed out greedily, largest score first, each label to one component, and only
/// when the score reaches the minimum correlation; the rest are "other".
/// </remarks>
internal static class Interpreter
{
    public const string Amount = "amount";
    public const string Timing = "timing";
    public const string Duration = "duration";
    public const string Other = "other";

    private const int Peak = 4;
    private const int Centroid = 6;
    private const int SnowDays = 3;
    private const int LongestCover = 2;

    /// <summary>Returns per component: label, metric name and sign (+1/−1) to multiply the component and coefficients by.</summary>
    public static (string Label, string Metric, int Sign, string Rule)[] Label(double[][] components, double[][] correlations, double minCorrelation)
    {
        var k = components.Length;
        var candidates = new List<(double Score, int Component, string Label, int Metric)>();
        for (var c = 0; c < k; c++)
        {
            var r = correlations[c];
            Add(candidates, c, Amount, Peak, r[Peak]);
            Add(candidates, c, Timing, Centroid, r[Centroid]);
            var durationMetric = Score(r[SnowDays]) >= Score(r[LongestCover]) ? SnowDays : LongestCover;
            Add(candidates, c, Duration, durationMetric, r[durationMetric]);
        }

        var result = new (string, string, int, string)[k];
        var taken = new HashSet<string>(StringComparer.Ordinal);
        var assigned = new bool[k];
        foreach (var (score, c, label, metric) in candidates.OrderByDescending(t => t.Score).ThenBy(t => t.Component).ThenBy(t => t.Label, StringComparer.Ordinal))
        {
            if (score < minCorrelation || assigned[c] || taken.Contains(label))
            {
                continue;
            }

            assigned[c] = true;
            taken.Add(label);
            result[c] = (label, SeasonMetrics.Names[metric], 0, string.Empty);
            _ = metric;
        }

        for (var c = 0; c < k; c++)
        {
            var label = assigned[c] ? result[c].Item1 : Other;
            var metricName = assigned[c] ? result[c].Item2 : string.Empty;
            var metric = assigned[c] ? IndexOf(metricName) : -1;
            int sign;
            string rule;
            if (c == 0 && label is Amount or Other)
            {
                sign = components[c].Sum() >= 0 ? 1 : -1;
                rule = "component 1: positive = more snow than the mean curve (sum of the component over the season > 0)";
            }
            else if (label == Timing)
            {
                sign = correlations[c][metric] <= 0 ? 1 : -1;
                rule = "timing: positive = earlier season (negative correlation with centroid_day)";
            }
            else if (label == Duration)
            {
                sign = correlations[c][metric] >= 0 ? 1 : -1;
                rule = $"duration: positive = longer season (positive correlation with {metricName})";
            }
            else if (label == Amount)
            {
                sign = correlations[c][metric] >= 0 ? 1 : -1;
                rule = "amount: positive = more snow (positive correlation with peak_depth_mm)";
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

    private static int IndexOf(string name)
    {
        for (var i = 0; i < SeasonMetrics.Names.Count; i++)
        {
            if (SeasonMetrics.Names[i] == name)
            {
                return i;
            }
        }

        return -1;
    }

    private static double Score(double r) => double.IsFinite(r) ? Math.Abs(r) : 0;

    private static void Add(List<(double, int, string, int)> list, int c, string label, int metric, double r) =>
        list.Add((Score(r), c, label, metric));

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

namespace Spatial.Fitting.Internal;

/// <summary>Per-station median, IQR, Mann–Kendall and Sen's slope of every coefficient and metric over the training seasons.</summary>
/// <remarks>
/// A season metric is summarised only when it is known in at least <see cref="MinKnownFraction"/> of the station's
/// training seasons; otherwise its median, IQR and trend are left unknown. Metrics go unknown for a reason (a record
/// that stops while snow still lies, a gap over the melt), so the seasons where they are known are not a random
/// sample: at a high station whose spring records stop in cover, only the shortest seasons have a known melt-out, and
/// their median would be biased early. Coefficients are always known when a season has observed days and are not
/// held to this rule.
/// </remarks>
internal static class StationSummaries
{
    /// <summary>Share of a station's seasons in which a metric must be known for its summary (from memory: the 80 %
    /// completeness that WMO guidance on climate normals asks of the years in a normal).</summary>
    public const double MinKnownFraction = 0.8;

    public static StationSummary[] Build(SeasonScores scores, int[] train, ParallelOptions po)
    {
        var groups = new List<(int Start, int End)>();
        for (var i = 0; i < train.Length;)
        {
            var j = i;
            while (j < train.Length && scores.Keys[train[j]].Station == scores.Keys[train[i]].Station)
            {
                j++;
            }

            groups.Add((i, j));
            i = j;
        }

        var names = Names(scores.K);
        var longest = 0;
        foreach (var (start, end) in groups)
        {
            longest = Math.Max(longest, end - start);
        }

        var result = new StationSummary[groups.Count];
        Parallel.For(
            0,
            groups.Count,
            po,
            () => (X: new double[longest], Y: new double[longest], Sorted: new double[longest]),
            (g, _, buffers) =>
            {
                var (start, end) = groups[g];
                var stats = new SummaryStatistic[names.Length];
                for (var q = 0; q < names.Length; q++)
                {
                    var n = 0;
                    for (var t = start; t < end; t++)
                    {
                        var r = train[t];
                        var v = q < scores.K ? scores.Coefficient(r, q) : scores.Metric(r, q - scores.K);
                        if (double.IsFinite(v))
                        {
                            buffers.X[n] = scores.Keys[r].Season;
                            buffers.Y[n] = v;
                            n++;
                        }
                    }

                    var seasons = end - start;
                    stats[q] = q >= scores.K && n < MinKnownFraction * seasons
                        ? new SummaryStatistic(names[q], n, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN)
                        : Summarise(names[q], buffers.X.AsSpan(0, n), buffers.Y.AsSpan(0, n), buffers.Sorted);
                }

                result[g] = new StationSummary(scores.Keys[train[start]].Station, end - start, stats);
                return buffers;
            },
            _ => { });
        return result;
    }

    /// <summary>c1…cK then the metric names.</summary>
    public static string[] Names(int k) =>
        [.. Enumerable.Range(1, k).Select(c => $"c{c}"), .. SeasonMetrics.Names];

    /// <summary>Median, IQR, Mann–Kendall and Sen's slope of <paramref name="y"/> against <paramref name="x"/>; <paramref name="scratch"/> at least as long as y.</summary>
    internal static SummaryStatistic Summarise(string name, ReadOnlySpan<double> x, ReadOnlySpan<double> y, Span<double> scratch)
    {
        var sorted = scratch[..y.Length];
        y.CopyTo(sorted);
        sorted.Sort();
        var median = Trend.Quantile(sorted, 0.5);
        var iqr = sorted.Length > 0 ? Trend.Quantile(sorted, 0.75) - Trend.Quantile(sorted, 0.25) : double.NaN;
        var mk = Trend.MannKendall(x, y);
        var sen = Trend.SenSlope(x, y) * 10.0;
        return new SummaryStatistic(name, y.Length, median, iqr, mk.S, mk.Z, mk.PTwoSided, sen);
    }
}

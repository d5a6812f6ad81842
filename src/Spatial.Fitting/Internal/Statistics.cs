using Spatial.Core;

namespace Spatial.Fitting.Internal;

/// <summary>Small statistics used by the interpretation and the sampling errors.</summary>
internal static class Statistics
{
    /// <summary>
    /// Pearson correlation of coefficient <paramref name="component"/> with every metric, over the rows where both are
    /// finite (NaN with fewer than 3 pairs or zero variance): two passes over the rows (means, then centred sums), all
    /// metrics at once, each metric's sums in row order.
    /// </summary>
    public static double[] PearsonWithMetrics(SeasonScores scores, int component, int[] rows)
    {
        const int metrics = SeasonMetrics.Count;
        Span<double> n = stackalloc double[metrics];
        Span<double> mx = stackalloc double[metrics];
        Span<double> my = stackalloc double[metrics];
        n.Clear();
        mx.Clear();
        my.Clear();
        foreach (var r in rows)
        {
            var a = scores.Coefficient(r, component);
            if (!double.IsFinite(a))
            {
                continue;
            }

            for (var m = 0; m < metrics; m++)
            {
                var b = scores.Metric(r, m);
                if (double.IsFinite(b))
                {
                    n[m]++;
                    mx[m] += a;
                    my[m] += b;
                }
            }
        }

        for (var m = 0; m < metrics; m++)
        {
            mx[m] /= n[m];
            my[m] /= n[m];
        }

        Span<double> sxx = stackalloc double[metrics];
        Span<double> syy = stackalloc double[metrics];
        Span<double> sxy = stackalloc double[metrics];
        sxx.Clear();
        syy.Clear();
        sxy.Clear();
        foreach (var r in rows)
        {
            var a = scores.Coefficient(r, component);
            if (!double.IsFinite(a))
            {
                continue;
            }

            for (var m = 0; m < metrics; m++)
            {
                var b = scores.Metric(r, m);
                if (double.IsFinite(b))
                {
                    sxx[m] += (a - mx[m]) * (a - mx[m]);
                    syy[m] += (b - my[m]) * (b - my[m]);
                    sxy[m] += (a - mx[m]) * (b - my[m]);
                }
            }
        }

        var result = new double[metrics];
        for (var m = 0; m < metrics; m++)
        {
            result[m] = n[m] >= 3 && sxx[m] > 0 && syy[m] > 0 ? sxy[m] / Math.Sqrt(sxx[m] * syy[m]) : double.NaN;
        }

        return result;
    }

    /// <summary>
    /// Effective number of independent seasons N* for the sampling errors, from the leading coefficients:
    /// N / Deff × (1 − r1)/(1 + r1). Deff = 1 + (n0 − 1)·ICC is the design effect of seasons sharing a season year
    /// (Kish 1965; ICC from one-way analysis of variance by season year, clipped to [0, 1], n0 the ANOVA mean group size);
    /// r1 the lag-1 autocorrelation of consecutive seasons within stations about each station's mean, clipped to [0, 0.95].
    /// N* is clipped to [2, N].
    /// </summary>
    public static double EffectiveSeasons(IReadOnlyList<SeasonKey> keyList, int[] train, Func<int, double> value, out double icc, out double r1)
    {
        icc = 0;
        r1 = 0;
        var keys = keyList as SeasonKey[] ?? [.. keyList];
        var values = LargeArrays.AllocateUninitialized<double>(train.Length);
        var valid = LargeArrays.AllocateUninitialized<int>(train.Length);
        var n = 0;
        foreach (var r in train)
        {
            var v = value(r);
            if (double.IsFinite(v))
            {
                values[n] = v;
                valid[n++] = r;
            }
        }

        if (n < 3)
        {
            return Math.Max(n, 2);
        }

        var validCount = n;
        var grand = 0.0;
        for (var t = 0; t < n; t++)
        {
            grand += values[t];
        }

        grand /= n;

        // Groups by season year, in order of first appearance, rows in order within each (as a GroupBy would give);
        // group numbers looked up in an array over the years seen, or a dictionary when they span too much.
        int first = int.MaxValue, last = int.MinValue;
        for (var t = 0; t < n; t++)
        {
            first = Math.Min(first, keys[valid[t]].Season);
            last = Math.Max(last, keys[valid[t]].Season);
        }

        var byYear = (long)last - first < 1 << 20 ? new int[last - first + 1] : null;
        var groupIds = byYear is null ? new Dictionary<int, int>() : null;
        var groupOf = LargeArrays.AllocateUninitialized<int>(n);
        var sizes = new List<int>();
        for (var t = 0; t < n; t++)
        {
            var season = keys[valid[t]].Season;
            int id;
            if (byYear is not null)
            {
                // Stored as group number + 1 (0 = not seen yet).
                id = byYear[season - first] - 1;
                if (id < 0)
                {
                    id = sizes.Count;
                    byYear[season - first] = id + 1;
                    sizes.Add(0);
                }
            }
            else if (!groupIds!.TryGetValue(season, out id))
            {
                id = sizes.Count;
                groupIds.Add(season, id);
                sizes.Add(0);
            }

            groupOf[t] = id;
            sizes[id]++;
        }

        var g = sizes.Count;
        if (g > 1 && n > g)
        {
            var starts = new int[g + 1];
            for (var i = 0; i < g; i++)
            {
                starts[i + 1] = starts[i] + sizes[i];
            }

            var members = LargeArrays.AllocateUninitialized<double>(n);
            var fill = starts[..g];
            for (var t = 0; t < n; t++)
            {
                members[fill[groupOf[t]]++] = values[t];
            }

            double ssb = 0, ssw = 0, sumSq = 0;
            for (var i = 0; i < g; i++)
            {
                var grp = members.AsSpan(starts[i], sizes[i]);
                var m = 0.0;
                foreach (var x in grp)
                {
                    m += x;
                }

                m /= grp.Length;
                ssb += grp.Length * (m - grand) * (m - grand);
                foreach (var x in grp)
                {
                    ssw += (x - m) * (x - m);
                }

                sumSq += (double)grp.Length * grp.Length;
            }

            var msb = ssb / (g - 1);
            var msw = ssw / (n - g);
            var n0 = (n - (sumSq / n)) / (g - 1);
            var denom = msb + ((n0 - 1) * msw);
            icc = denom > 0 ? Math.Clamp((msb - msw) / denom, 0, 1) : 0;
            var deff = 1 + ((n0 - 1) * icc);
            n = (int)Math.Max(2, Math.Round(n / deff));
        }

        // Lag-1 within stations (rows are ordered by station then season).
        double num = 0, den = 0;
        var i0 = 0;
        while (i0 < validCount)
        {
            var j = i0;
            var station = keys[valid[i0]].Station;
            while (j < validCount && keys[valid[j]].Station == station)
            {
                j++;
            }

            var m = 0.0;
            for (var t = i0; t < j; t++)
            {
                m += values[t];
            }

            m /= j - i0;
            for (var t = i0; t < j; t++)
            {
                var a = values[t] - m;
                den += a * a;
                if (t + 1 < j && keys[valid[t + 1]].Season == keys[valid[t]].Season + 1)
                {
                    num += a * (values[t + 1] - m);
                }
            }

            i0 = j;
        }

        r1 = den > 0 ? Math.Clamp(num / den, 0, 0.95) : 0;
        var nStar = n * (1 - r1) / (1 + r1);
        return Math.Clamp(nStar, 2, validCount);
    }
}

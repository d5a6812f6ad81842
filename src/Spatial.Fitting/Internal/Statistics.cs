namespace Spatial.Fitting.Internal;

/// <summary>Small statistics used by the interpretation and the sampling errors.</summary>
internal static class Statistics
{
    /// <summary>Pearson correlation over pairs where both are finite; NaN with fewer than 3 pairs or zero variance.</summary>
    public static double Pearson(Func<int, double> x, Func<int, double> y, IReadOnlyList<int> rows)
    {
        double n = 0, mx = 0, my = 0;
        foreach (var r in rows)
        {
            var a = x(r);
            var b = y(r);
            if (double.IsFinite(a) && double.IsFinite(b))
            {
                n++;
                mx += a;
                my += b;
            }
        }

        if (n < 3)
        {
            return double.NaN;
        }

        mx /= n;
        my /= n;
        double sxx = 0, syy = 0, sxy = 0;
        foreach (var r in rows)
        {
            var a = x(r);
            var b = y(r);
            if (double.IsFinite(a) && double.IsFinite(b))
            {
                sxx += (a - mx) * (a - mx);
                syy += (b - my) * (b - my);
                sxy += (a - mx) * (b - my);
            }
        }

        return sxx > 0 && syy > 0 ? sxy / Math.Sqrt(sxx * syy) : double.NaN;
    }

    /// <summary>
    /// Effective number of independent seasons N* for the sampling errors, from the leading coefficients:
    /// N / Deff × (1 − r1)/(1 + r1). Deff = 1 + (n0 − 1)·ICC is the design effect of seasons sharing a season year
    /// (Kish 1965; ICC from one-way analysis of variance by season year, clipped to [0, 1], n0 the ANOVA mean group size);
    /// r1 the lag-1 autocorrelation of consecutive seasons within stations about each station's mean, clipped to [0, 0.95].
    /// N* is clipped to [2, N].
    /// </summary>
    public static double EffectiveSeasons(IReadOnlyList<Spatial.Core.SeasonKey> keys, int[] train, Func<int, double> value, out double icc, out double r1)
    {
        icc = 0;
        r1 = 0;
        var valid = train.Where(r => double.IsFinite(value(r))).ToArray();
        var n = valid.Length;
        if (n < 3)
        {
            return Math.Max(n, 2);
        }

        var grand = valid.Average(value);
        var groups = valid.GroupBy(r => keys[r].Season).Select(g => g.ToArray()).ToArray();
        var g = groups.Length;
        if (g > 1 && n > g)
        {
            double ssb = 0, ssw = 0, sumSq = 0;
            foreach (var grp in groups)
            {
                var m = grp.Average(value);
                ssb += grp.Length * (m - grand) * (m - grand);
                foreach (var r in grp)
                {
                    ssw += (value(r) - m) * (value(r) - m);
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
        var i = 0;
        while (i < valid.Length)
        {
            var j = i;
            while (j < valid.Length && keys[valid[j]].Station == keys[valid[i]].Station)
            {
                j++;
            }

            var m = 0.0;
            for (var t = i; t < j; t++)
            {
                m += value(valid[t]);
            }

            m /= j - i;
            for (var t = i; t < j; t++)
            {
                var a = value(valid[t]) - m;
                den += a * a;
                if (t + 1 < j && keys[valid[t + 1]].Season == keys[valid[t]].Season + 1)
                {
                    num += a * (value(valid[t + 1]) - m);
                }
            }

            i = j;
        }

        r1 = den > 0 ? Math.Clamp(num / den, 0, 0.95) : 0;
        var nStar = n * (1 - r1) / (1 + r1);
        return Math.Clamp(nStar, 2, valid.Length);
    }
}

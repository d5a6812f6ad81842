using Spatial.Core;

namespace Spatial.Scenario.Internal;

/// <summary>The metrics of one season's complete daily depth curve.</summary>
internal readonly record struct SeasonValues(int? Onset, int? Meltout, int Duration, int LongestCover, int SnowDays, int Peak, int? PeakDay, double? Centroid);

/// <summary>
/// Season metrics of a complete (gap-free) daily depth series, on the <see cref="SeasonCalendar"/> convention (day 0
/// = 1 September, 29 February dropped): a day is snow-covered when its depth is at least
/// <see cref="Climate.CoverThresholdMm"/>; onset = first covered day, melt-out = last covered day (both unknown in a
/// season without cover), duration = melt-out − onset + 1 (0 without cover), longest cover = longest run of covered
/// days, snow days = covered days, peak = the season's greatest depth (mm) and its first day (unknown when 0),
/// centroid = depth-weighted mean day Σ d·x_d / Σ x_d (unknown when the season has no depth).
/// </summary>
internal static class SeasonMetricsCalc
{
    public static SeasonValues[] Compute(short[] depth, RegionalWeather weather)
    {
        var result = new SeasonValues[weather.Seasons];
        var curve = new int[SeasonCalendar.DaysPerSeason];
        var t = 0;
        for (var s = 0; s < weather.Seasons; s++)
        {
            Array.Clear(curve);
            while (t < weather.Days && weather.SeasonIndex[t] == s)
            {
                var d = weather.SeasonDay[t];
                if (d >= 0)
                {
                    curve[d] = depth[t];
                }

                t++;
            }

            result[s] = Of(curve);
        }

        return result;
    }

    /// <summary>Metrics of one 365-day curve (mm).</summary>
    public static SeasonValues Of(ReadOnlySpan<int> curve)
    {
        int? onset = null;
        int? meltout = null;
        var snowDays = 0;
        var run = 0;
        var longest = 0;
        var peak = 0;
        int? peakDay = null;
        double sum = 0, weighted = 0;
        for (var d = 0; d < curve.Length; d++)
        {
            var v = curve[d];
            sum += v;
            weighted += (double)d * v;
            if (v > peak)
            {
                peak = v;
                peakDay = d;
            }

            if (v >= Climate.CoverThresholdMm)
            {
                onset ??= d;
                meltout = d;
                snowDays++;
                run++;
                longest = Math.Max(longest, run);
            }
            else
            {
                run = 0;
            }
        }

        var duration = onset is { } o && meltout is { } m ? m - o + 1 : 0;
        return new SeasonValues(onset, meltout, duration, longest, snowDays, peak, peakDay, sum > 0 ? weighted / sum : null);
    }
}

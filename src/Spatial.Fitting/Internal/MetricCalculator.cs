namespace Spatial.Fitting.Internal;

/// <summary>
/// Season metrics from an observed curve with gaps. A day is Snow (depth ≥ threshold), Bare, or missing. A run of at
/// most <see cref="MetricOptions.BridgeDays"/> missing days between two observed days of the same state takes that
/// state (bridged); any other missing day, and every missing run touching the season's first or last day, is of
/// unknown state. A metric is unknown when some assignment of the unknown days could change it.
/// </summary>
internal static class MetricCalculator
{
    private const byte Bare = 0;
    private const byte Snow = 1;
    private const byte Unknown = 2;
    private const byte Missing = 3;

    public static SeasonMetrics Compute(ReadOnlySpan<float> row, MetricOptions options, Span<byte> state, Span<bool> bridged)
    {
        var d = row.Length;
        var t = options.ThresholdMm;
        var anyObserved = false;
        for (var i = 0; i < d; i++)
        {
            var x = row[i];
            bridged[i] = false;
            if (float.IsNaN(x))
            {
                state[i] = Missing;
            }
            else
            {
                anyObserved = true;
                state[i] = x >= t ? Snow : Bare;
            }
        }

        if (!anyObserved)
        {
            return SeasonMetrics.Unknown;
        }

        var anyUnknown = false;
        for (var i = 0; i < d;)
        {
            if (state[i] != Missing)
            {
                i++;
                continue;
            }

            var a = i;
            while (i < d && state[i] == Missing)
            {
                i++;
            }

            var b = i - 1;
            var length = b - a + 1;
            byte fill = Unknown;
            if (a > 0 && b < d - 1 && length <= options.BridgeDays && state[a - 1] == state[b + 1])
            {
                fill = state[a - 1];
            }

            for (var j = a; j <= b; j++)
            {
                state[j] = fill;
                bridged[j] = fill != Unknown;
            }

            anyUnknown |= fill == Unknown;
        }

        // Onset and melt-out.
        var first = -1;
        var unknownBeforeFirst = false;
        for (var i = 0; i < d; i++)
        {
            if (state[i] == Snow)
            {
                first = i;
                break;
            }

            unknownBeforeFirst |= state[i] == Unknown;
        }

        var last = -1;
        var unknownAfterLast = false;
        for (var i = d - 1; i >= 0; i--)
        {
            if (state[i] == Snow)
            {
                last = i;
                break;
            }

            unknownAfterLast |= state[i] == Unknown;
        }

        var onset = first >= 0 && !unknownBeforeFirst ? first : double.NaN;
        var meltout = last >= 0 && !unknownAfterLast ? last : double.NaN;

        // Longest cover: known when no stretch of snow-or-unknown days is longer than the longest snow run.
        int longestSnow = 0, longestMaybe = 0, runSnow = 0, runMaybe = 0;
        for (var i = 0; i < d; i++)
        {
            runSnow = state[i] == Snow ? runSnow + 1 : 0;
            runMaybe = state[i] != Bare ? runMaybe + 1 : 0;
            longestSnow = Math.Max(longestSnow, runSnow);
            longestMaybe = Math.Max(longestMaybe, runMaybe);
        }

        var longest = longestMaybe == longestSnow ? longestSnow : double.NaN;

        if (anyUnknown)
        {
            return new SeasonMetrics(onset, meltout, longest, double.NaN, double.NaN, double.NaN, double.NaN);
        }

        var snowDays = 0;
        var peak = double.NegativeInfinity;
        var peakDay = -1;
        for (var i = 0; i < d; i++)
        {
            if (state[i] == Snow)
            {
                snowDays++;
            }

            if (!bridged[i] && row[i] > peak)
            {
                peak = row[i];
                peakDay = i;
            }
        }

        var peakKnown = !((peakDay > 0 && bridged[peakDay - 1]) || (peakDay < d - 1 && bridged[peakDay + 1]));
        var peakDepth = peakKnown ? peak : double.NaN;
        var peakAt = peakKnown && peak >= t ? peakDay : double.NaN;

        // Centroid: observed depths, bridged days interpolated linearly between their observed neighbours.
        double weighted = 0, total = 0;
        for (var i = 0; i < d;)
        {
            if (!bridged[i])
            {
                weighted += (double)i * row[i];
                total += row[i];
                i++;
                continue;
            }

            var a = i;
            while (i < d && bridged[i])
            {
                i++;
            }

            double left = row[a - 1], right = row[i];
            var span = i - a + 1;
            for (var j = a; j < i; j++)
            {
                var x = left + ((right - left) * (j - a + 1) / span);
                weighted += j * x;
                total += x;
            }
        }

        var centroid = total > 0 ? weighted / total : double.NaN;
        return new SeasonMetrics(onset, meltout, longest, snowDays, peakDepth, peakAt, centroid);
    }
}

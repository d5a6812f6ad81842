namespace Spatial.Fitting.Internal;

/// <summary>
/// Season metrics from an observed curve with gaps. A day is Snow (depth ≥ threshold), Bare, or missing. Each maximal
/// run of missing days is resolved, in this order:
/// <list type="number">
/// <item><b>Bridged</b>: at most <see cref="MetricOptions.BridgeDays"/> days between two observed days of the same state,
/// not touching day 0 or 364: it takes that state.</item>
/// <item><b>Modelled bare</b>: every observed day flanking the run is bare (both flanks, or the one flank of a run
/// touching day 0 or 364), and the season's own gappy reconstruction m_d + Σ_k c_k v_kd (the fitted mean and K
/// components with this season's coefficients, the same curve the residuals measure against) stays strictly below the
/// threshold on every day of the run: the run is taken as bare. Its depths stay unknown (somewhere in [0, threshold)),
/// only its state is taken; the days are counted in <see cref="SeasonMetrics.ModelledBareDays"/>.</item>
/// <item>Otherwise <b>unknown state</b>. In particular a run touching cover on either side stays unknown: it may hide
/// the season's edge or a longer cover run.</item>
/// </list>
/// The peak depth is the largest observed depth; it is unknown when that day borders a missing day, or when an
/// unknown-state run could hold a larger depth: the season's reconstruction somewhere in the run comes within
/// <see cref="PeakMarginMisfits"/> × the season's RMS misfit of the observed maximum (always so without a model). A
/// short gap at an edge, or a record that stops in a thin late-season pack, therefore no longer hides a peak the season's
/// own curve puts months away and hundreds of millimetres higher.
/// A metric is unknown when some assignment of the unknown-state days could change it (onset, melt-out, longest cover,
/// snow days), see <see cref="SeasonMetrics"/>. The model only ever decides whether a gap flanked by bare ground stayed
/// bare; no depth and no edge is taken from it.
/// </summary>
internal static class MetricCalculator
{
    /// <summary>
    /// The centroid of a season with modelled-bare days is reported only when every depth in [0, threshold) on those
    /// days keeps it within this many days (reported: the middle of that range, so within half a day of any curve
    /// consistent with the observations). Our choice: the centroid is a day index.
    /// </summary>
    public const double CentroidToleranceDays = 1.0;

    /// <summary>
    /// An unknown-state gap could hold the season's largest depth unless the season's reconstruction stays below the
    /// observed maximum by at least this many times the season's RMS misfit on its observed days. Our choice (two
    /// standard errors of the fit).
    /// </summary>
    public const double PeakMarginMisfits = 2.0;

    private const byte Bare = 0;
    private const byte Snow = 1;
    private const byte Unknown = 2;
    private const byte Missing = 3;

    /// <summary>Metrics without a model: every missing run that is not bridged is of unknown state.</summary>
    public static SeasonMetrics Compute(ReadOnlySpan<float> row, MetricOptions options, Span<byte> state, Span<bool> bridged) =>
        Compute(row, options, state, bridged, default, default, default);

    /// <summary>
    /// Metrics of <paramref name="row"/> (365 days, NaN = missing). <paramref name="mean"/> (365, NaN = never observed),
    /// <paramref name="componentsByDay"/> (day-major 365 × K) and <paramref name="coefficients"/> (K) give the season's
    /// reconstruction for the modelled-bare rule; empty spans (or a NaN coefficient) switch that rule off.
    /// <paramref name="rmsMisfitMm"/> is the season's RMS misfit on its observed days when the caller already has it
    /// (the gappy projection does); NaN = compute it here.
    /// </summary>
    public static SeasonMetrics Compute(
        ReadOnlySpan<float> row,
        MetricOptions options,
        Span<byte> state,
        Span<bool> bridged,
        ReadOnlySpan<double> mean,
        ReadOnlySpan<double> componentsByDay,
        ReadOnlySpan<double> coefficients,
        double rmsMisfitMm = double.NaN)
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

        var model = coefficients.Length > 0 && mean.Length == d && componentsByDay.Length == d * coefficients.Length;
        foreach (var c in coefficients)
        {
            model &= double.IsFinite(c);
        }

        var anyUnknown = false;
        var modelledDays = 0;

        // Largest reconstruction inside any unknown-state run (+∞ without a model): such a run could hold the season's
        // largest depth only if the season's own curve comes near the observed maximum there.
        var hiddenMax = double.NegativeInfinity;
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
            var leftBare = a == 0 || state[a - 1] == Bare;
            var rightBare = b == d - 1 || state[b + 1] == Bare;
            byte fill = Unknown;
            var bridge = false;
            if (a > 0 && b < d - 1 && length <= options.BridgeDays && state[a - 1] == state[b + 1])
            {
                fill = state[a - 1];
                bridge = true;
            }
            else
            {
                var top = model ? ReconstructionMax(mean, componentsByDay, coefficients, a, b) : double.PositiveInfinity;
                if (leftBare && rightBare && top < t)
                {
                    fill = Bare;
                    modelledDays += length;
                }
                else
                {
                    hiddenMax = Math.Max(hiddenMax, top);
                }
            }

            for (var j = a; j <= b; j++)
            {
                state[j] = fill;
                bridged[j] = bridge;
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
        int longestSnow = 0, longestMaybe = 0, runSnow = 0, runMaybe = 0, snowDays = 0;
        for (var i = 0; i < d; i++)
        {
            runSnow = state[i] == Snow ? runSnow + 1 : 0;
            runMaybe = state[i] != Bare ? runMaybe + 1 : 0;
            longestSnow = Math.Max(longestSnow, runSnow);
            longestMaybe = Math.Max(longestMaybe, runMaybe);
            snowDays += state[i] == Snow ? 1 : 0;
        }

        var longest = longestMaybe == longestSnow ? longestSnow : double.NaN;

        // Peak: the largest observed depth (bridged and modelled days have none); not searched when already unknowable.
        var peakDepth = double.NaN;
        var peakAt = double.NaN;
        if (hiddenMax != double.PositiveInfinity)
        {
            var peak = double.NegativeInfinity;
            var peakDay = -1;
            for (var i = 0; i < d; i++)
            {
                if (!float.IsNaN(row[i]) && row[i] > peak)
                {
                    peak = row[i];
                    peakDay = i;
                }
            }

            var bordersGap = (peakDay > 0 && float.IsNaN(row[peakDay - 1])) || (peakDay < d - 1 && float.IsNaN(row[peakDay + 1]));
            var peakKnown = !bordersGap
                && (hiddenMax == double.NegativeInfinity || hiddenMax < peak - (PeakMarginMisfits * (double.IsNaN(rmsMisfitMm) ? RmsMisfit(row, mean, componentsByDay, coefficients) : rmsMisfitMm)));
            peakDepth = peakKnown ? peak : double.NaN;
            peakAt = peakKnown && peak >= t ? peakDay : double.NaN;
        }

        if (anyUnknown)
        {
            return new SeasonMetrics(onset, meltout, longest, double.NaN, peakDepth, peakAt, double.NaN) { ModelledBareDays = modelledDays };
        }

        var centroid = Centroid(row, bridged, state, t, modelledDays);
        return new SeasonMetrics(onset, meltout, longest, snowDays, peakDepth, peakAt, centroid) { ModelledBareDays = modelledDays };
    }

    /// <summary>√(mean over observed days with a mean of (x_d − m_d − Σ_k c_k v_kd)²), mm.</summary>
    private static double RmsMisfit(ReadOnlySpan<float> row, ReadOnlySpan<double> mean, ReadOnlySpan<double> byDay, ReadOnlySpan<double> c)
    {
        var k = c.Length;
        double sum = 0;
        var n = 0;
        for (var j = 0; j < row.Length; j++)
        {
            if (float.IsNaN(row[j]) || double.IsNaN(mean[j]))
            {
                continue;
            }

            var e = row[j] - mean[j];
            var v = byDay.Slice(j * k, k);
            for (var q = 0; q < k; q++)
            {
                e -= c[q] * v[q];
            }

            sum += e * e;
            n++;
        }

        return n > 0 ? Math.Sqrt(sum / n) : double.PositiveInfinity;
    }

    /// <summary>Largest m_d + Σ_k c_k v_kd over days a…b; +∞ when the mean is NaN on one of them.</summary>
    private static double ReconstructionMax(ReadOnlySpan<double> mean, ReadOnlySpan<double> byDay, ReadOnlySpan<double> c, int a, int b)
    {
        var k = c.Length;
        var top = double.NegativeInfinity;
        for (var j = a; j <= b; j++)
        {
            var x = mean[j];
            if (double.IsNaN(x))
            {
                return double.PositiveInfinity;
            }

            var v = byDay.Slice(j * k, k);
            for (var q = 0; q < k; q++)
            {
                x += c[q] * v[q];
            }

            top = Math.Max(top, x);
        }

        return top;
    }

    /// <summary>
    /// Centroid Σ d·x / Σ x over observed days, bridged days linearly interpolated between their observed neighbours.
    /// With modelled-bare days (depth y_j anywhere in [0, t)) the centroid's exact range is found from the optimality
    /// condition of a linear-fractional function on a box — its minimum puts y_j = t on exactly the days before the
    /// minimum, i.e. a prefix of those days in day order (the maximum: a suffix) — and it is reported as the middle of
    /// that range only when the range is at most <see cref="CentroidToleranceDays"/>; otherwise NaN.
    /// </summary>
    private static double Centroid(ReadOnlySpan<float> row, ReadOnlySpan<bool> bridged, ReadOnlySpan<byte> state, double t, int modelledDays)
    {
        var d = row.Length;
        double weighted = 0, total = 0, modelledDaySum = 0;
        for (var i = 0; i < d;)
        {
            if (!bridged[i])
            {
                if (float.IsNaN(row[i]))
                {
                    modelledDaySum += i;
                }
                else
                {
                    weighted += (double)i * row[i];
                    total += row[i];
                }

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

        if (modelledDays == 0)
        {
            return total > 0 ? weighted / total : double.NaN;
        }

        if (!(total > 0))
        {
            return double.NaN;
        }

        // Prefixes (minimum) and suffixes (maximum) of the modelled days in day order, each day at depth t.
        double low = weighted / total, high = low, prefixDays = 0, prefixCount = 0;
        for (var i = 0; i < d; i++)
        {
            if (state[i] != Bare || !float.IsNaN(row[i]) || bridged[i])
            {
                continue;
            }

            prefixDays += i;
            prefixCount++;
            low = Math.Min(low, (weighted + (t * prefixDays)) / (total + (t * prefixCount)));
            var suffixDays = modelledDaySum - prefixDays + i;
            var suffixCount = modelledDays - prefixCount + 1;
            high = Math.Max(high, (weighted + (t * suffixDays)) / (total + (t * suffixCount)));
        }

        return high - low <= CentroidToleranceDays ? (low + high) / 2 : double.NaN;
    }
}

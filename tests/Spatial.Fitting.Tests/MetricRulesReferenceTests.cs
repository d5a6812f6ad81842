using Spatial.Fitting.Internal;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>
/// The season metrics (day states kept as bit masks, bridges found with shifted masks) against a day-by-day reading of
/// the same rules (<see cref="DayByDayMetrics"/>, one state byte per day, every missing run walked in turn), on seeded
/// random seasons: every metric bit for bit.
/// </summary>
public sealed class MetricRulesReferenceTests
{
    [Fact]
    public void Given_random_seasons_with_gaps_of_every_kind_When_measured_with_and_without_a_model_Then_the_metrics_equal_the_day_by_day_reading()
    {
        var rng = new Random(20240611);
        var compared = 0;
        for (var it = 0; it < 20_000; it++)
        {
            var (row, options, mean, byDay, coefficients, rms) = RandomSeason(rng);

            AssertSame(DayByDayMetrics.Compute(row, options, [], [], [], double.NaN), MetricCalculator.Compute(row, options), it);
            AssertSame(DayByDayMetrics.Compute(row, options, mean, byDay, coefficients, rms), MetricCalculator.Compute(row, options, mean, byDay, coefficients, rms), it);
            compared += 2;
        }

        Assert.Equal(40_000, compared);
    }

    private static void AssertSame(SeasonMetrics expected, SeasonMetrics actual, int season)
    {
        var e = expected.ToArray();
        var a = actual.ToArray();
        for (var m = 0; m < e.Length; m++)
        {
            Assert.True(BitConverter.DoubleToInt64Bits(e[m]) == BitConverter.DoubleToInt64Bits(a[m]), $"season {season}: {SeasonMetrics.Names[m]} expected {e[m]:R}, got {a[m]:R}");
        }

        Assert.Equal(expected.ModelledBareDays, actual.ModelledBareDays);
    }

    /// <summary>A snowpack bump with noise, some days missing at random, long gaps, cut edges; random rules and a random K-component model (invented data).</summary>
    private static (float[] Row, MetricOptions Options, double[] Mean, double[] ByDay, double[] Coefficients, double Rms) RandomSeason(Random rng)
    {
        const int days = 365;
        var row = new float[days];
        var amount = rng.NextDouble() * 800;
        var centre = 100 + (rng.NextDouble() * 200);
        var width = 10 + (rng.NextDouble() * 80);
        var noise = rng.Next(4) switch { 0 => 0, 1 => 2, 2 => 20, _ => 100 };
        var whole = rng.Next(3) == 0;
        for (var d = 0; d < days; d++)
        {
            var z = (d - centre) / width;
            var x = Math.Max(0, (amount * Math.Exp(-0.5 * z * z)) + (noise * (rng.NextDouble() - 0.5)));
            row[d] = (float)(whole ? Math.Round(x) : x);
            row[d] = rng.Next(50) == 0 ? 25f : row[d];
        }

        var missing = rng.Next(6) switch { 0 => 0.0, 1 => 0.05, 2 => 0.3, 3 => 0.5, 4 => 0.8, _ => 0.97 };
        for (var d = 0; d < days; d++)
        {
            row[d] = rng.NextDouble() < missing ? float.NaN : row[d];
        }

        for (var g = rng.Next(4); g > 0; g--)
        {
            var from = rng.Next(days);
            row.AsSpan(from, Math.Min(days - from, rng.Next(1, 80))).Fill(float.NaN);
        }

        if (rng.Next(5) == 0)
        {
            row.AsSpan(rng.Next(200, days)).Fill(float.NaN);
        }

        if (rng.Next(5) == 0)
        {
            row.AsSpan(0, rng.Next(0, 100)).Fill(float.NaN);
        }

        var options = new MetricOptions(
            rng.Next(4) switch { 0 => 25, 1 => 25.3, 2 => 0.5, _ => 100 },
            rng.Next(8) switch { 0 => 0, 1 => 1, 2 => 3, 3 => 10, 4 => 63, 5 => 64, 6 => 100, _ => 3 });
        var k = rng.Next(1, 6);
        var mean = new double[days];
        var byDay = new double[days * k];
        for (var d = 0; d < days; d++)
        {
            var z = (d - centre) / width;
            mean[d] = rng.Next(100) == 0 ? double.NaN : amount * Math.Exp(-0.5 * z * z) * (0.5 + (rng.NextDouble() * 0.01));
            for (var q = 0; q < k; q++)
            {
                byDay[(d * k) + q] = Math.Sin((q + 1) * d / 50.0) * 0.05;
            }
        }

        var coefficients = new double[k];
        for (var q = 0; q < k; q++)
        {
            coefficients[q] = (rng.NextDouble() - 0.5) * 400;
        }

        coefficients[0] = rng.Next(30) == 0 ? double.NaN : coefficients[0];
        var rms = rng.Next(3) == 0 ? double.NaN : rng.NextDouble() * 50;
        return (row, options, mean, byDay, coefficients, rms);
    }
}

/// <summary>
/// The season-metric rules (<see cref="MetricCalculator"/>) read day by day: one state byte per day, each missing run
/// resolved in turn (bridged, modelled bare, or unknown), then each metric from the states. Kept as the reference for
/// the bit-mask implementation.
/// </summary>
internal static class DayByDayMetrics
{
    private const byte Bare = 0;
    private const byte Snow = 1;
    private const byte Unknown = 2;
    private const byte Missing = 3;

    /// <summary>Metrics of <paramref name="row"/>; empty model spans (or a NaN coefficient) switch the modelled-bare rule off; a NaN misfit is computed when needed.</summary>
    public static SeasonMetrics Compute(
        ReadOnlySpan<float> row,
        MetricOptions options,
        ReadOnlySpan<double> mean,
        ReadOnlySpan<double> componentsByDay,
        ReadOnlySpan<double> coefficients,
        double rmsMisfitMm)
    {
        var d = row.Length;
        Span<byte> state = new byte[d];
        Span<bool> bridged = new bool[d];
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
                && (hiddenMax == double.NegativeInfinity || hiddenMax < peak - (MetricCalculator.PeakMarginMisfits * (double.IsNaN(rmsMisfitMm) ? RmsMisfit(row, mean, componentsByDay, coefficients) : rmsMisfitMm)));
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
    /// that range only when the range is at most <see cref="MetricCalculator.CentroidToleranceDays"/>; otherwise NaN.
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

        return high - low <= MetricCalculator.CentroidToleranceDays ? (low + high) / 2 : double.NaN;
    }
}

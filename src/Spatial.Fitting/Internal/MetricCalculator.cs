using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

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
/// <remarks>
/// Day states are kept as bit masks of the 365 days (observed, snow, bridged, modelled bare, unknown), and missing runs
/// are walked with bit scans, so a season costs in proportion to its runs, not its days. Sums over days (the centroid)
/// run in day order, as written in the definitions.
/// </remarks>
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

    /// <summary>Length a reconstruction buffer handed to <see cref="Compute(ReadOnlySpan{float}, MetricOptions, ReadOnlySpan{double}, double)"/> may have at most use of (days padded for vector stores).</summary>
    public const int ReconstructionLength = Layout.PaddedDays;

    private const int D = Layout.Days;

    /// <summary>64-bit words of a day mask (384 bits ≥ 365 days; bits 365… always clear).</summary>
    private const int Words = 6;

    /// <summary>Floats of a row copy padded with NaN to whole 8-float vectors.</summary>
    private const int PaddedFloats = Words * 64;

    /// <summary>Metrics without a model: every missing run that is not bridged is of unknown state.</summary>
    public static SeasonMetrics Compute(ReadOnlySpan<float> row, MetricOptions options) =>
        Compute(row, options, default, double.NaN);

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
        ReadOnlySpan<double> mean,
        ReadOnlySpan<double> componentsByDay,
        ReadOnlySpan<double> coefficients,
        double rmsMisfitMm = double.NaN)
    {
        var d = row.Length;
        var k = coefficients.Length;
        var model = k > 0 && mean.Length == d && componentsByDay.Length == d * k;
        foreach (var c in coefficients)
        {
            model &= double.IsFinite(c);
        }

        if (!model)
        {
            return Compute(row, options);
        }

        var reconstruction = new double[d];
        for (var j = 0; j < d; j++)
        {
            var x = mean[j];
            if (double.IsNaN(x))
            {
                reconstruction[j] = double.PositiveInfinity;
                continue;
            }

            var v = componentsByDay.Slice(j * k, k);
            for (var q = 0; q < k; q++)
            {
                x += coefficients[q] * v[q];
            }

            reconstruction[j] = x;
        }

        var rms = double.IsNaN(rmsMisfitMm) ? RmsMisfit(row, mean, componentsByDay, coefficients) : rmsMisfitMm;
        return Compute(row, options, reconstruction, rms);
    }

    /// <summary>
    /// Metrics of <paramref name="row"/> (365 days, NaN = missing) given the season's reconstruction m_d + Σ_k c_k v_kd
    /// (<paramref name="reconstruction"/>, 365 days or more, +∞ on a day whose mean is NaN; empty = no model) and its RMS
    /// misfit on the observed days, mm (used with a model only).
    /// </summary>
    [SkipLocalsInit]
    public static SeasonMetrics Compute(ReadOnlySpan<float> row, MetricOptions options, ReadOnlySpan<double> reconstruction, double rmsMisfitMm)
    {
        ArgumentOutOfRangeException.ThrowIfNotEqual(row.Length, D);
        var model = reconstruction.Length >= D;
        var t = options.ThresholdMm;
        Span<float> xs = stackalloc float[PaddedFloats];
        row.CopyTo(xs);
        xs[D..].Fill(float.NaN);
        Span<ulong> observed = stackalloc ulong[Words];
        Span<ulong> snow = stackalloc ulong[Words];
        DayMasks(xs, SnowThreshold(t), observed, snow);
        if (IsEmpty(observed))
        {
            return SeasonMetrics.Unknown;
        }

        // Missing runs: bridged (the flanks' state), modelled bare, or unknown.
        Span<ulong> missing = stackalloc ulong[Words];
        Span<ulong> bridged = stackalloc ulong[Words];
        Span<ulong> modelled = stackalloc ulong[Words];
        Span<ulong> unknown = stackalloc ulong[Words];
        bridged.Clear();
        modelled.Clear();
        unknown.Clear();
        for (var w = 0; w < Words; w++)
        {
            missing[w] = ~observed[w] & ValidDays(w);
        }

        BridgeShortRuns(missing, snow, bridged, options.BridgeDays);
        var anyUnknown = false;
        var modelledDays = 0;

        // Largest reconstruction inside any unknown-state run (+∞ without a model): such a run could hold the season's
        // largest depth only if the season's own curve comes near the observed maximum there.
        var hiddenMax = double.NegativeInfinity;
        for (var a = NextSet(missing, 0); a < D;)
        {
            // Runs bridged in bulk are gone from the missing mask; a longer bridgeable run (bridge days ≥ 64) is bridged here.
            var end = NextClear(missing, a);
            var b = end - 1;
            var length = end - a;
            var leftSnow = a > 0 && Test(snow, a - 1);
            var rightSnow = b < D - 1 && Test(snow, b + 1);
            if (a > 0 && b < D - 1 && length <= options.BridgeDays && leftSnow == rightSnow)
            {
                SetRange(bridged, a, end);
                if (leftSnow)
                {
                    SetRange(snow, a, end);
                }
            }
            else
            {
                var top = model ? RangeMax(reconstruction, a, b) : double.PositiveInfinity;
                if (!leftSnow && !rightSnow && top < t)
                {
                    SetRange(modelled, a, end);
                    modelledDays += length;
                }
                else
                {
                    hiddenMax = Math.Max(hiddenMax, top);
                    SetRange(unknown, a, end);
                    anyUnknown = true;
                }
            }

            a = NextSet(missing, end);
        }

        // Onset and melt-out: known when no unknown day lies before the first (after the last) snow day.
        var first = NextSet(snow, 0);
        var last = PreviousSet(snow);
        var onset = first < D && NextSet(unknown, 0) > first ? first : double.NaN;
        var meltout = last >= 0 && PreviousSet(unknown) < last ? last : double.NaN;

        // Longest cover: known when no stretch of snow-or-unknown days is longer than the longest snow run.
        var longestSnow = LongestRun(snow);
        var longest = (double)longestSnow;
        if (anyUnknown)
        {
            Span<ulong> maybe = stackalloc ulong[Words];
            for (var w = 0; w < Words; w++)
            {
                maybe[w] = snow[w] | unknown[w];
            }

            longest = LongestRun(maybe) == longestSnow ? longestSnow : double.NaN;
        }

        // Peak: the largest observed depth (bridged and modelled days have none); not searched when already unknowable.
        var peakDepth = double.NaN;
        var peakAt = double.NaN;
        if (hiddenMax != double.PositiveInfinity)
        {
            var peakDay = FirstMaximum(xs);
            var peak = peakDay >= 0 ? xs[peakDay] : double.NegativeInfinity;
            var bordersGap = (peakDay > 0 && float.IsNaN(row[peakDay - 1])) || (peakDay < D - 1 && float.IsNaN(row[peakDay + 1]));
            var peakKnown = !bordersGap
                && (hiddenMax == double.NegativeInfinity || hiddenMax < peak - (PeakMarginMisfits * rmsMisfitMm));
            peakDepth = peakKnown ? peak : double.NaN;
            peakAt = peakKnown && peak >= t ? peakDay : double.NaN;
        }

        if (anyUnknown)
        {
            return new SeasonMetrics(onset, meltout, longest, double.NaN, peakDepth, peakAt, double.NaN) { ModelledBareDays = modelledDays };
        }

        var centroid = Centroid(xs, observed, bridged, modelled, t, modelledDays);
        return new SeasonMetrics(onset, meltout, longest, PopCount(snow), peakDepth, peakAt, centroid) { ModelledBareDays = modelledDays };
    }

    /// <summary>
    /// Bridges, all at once, every missing run of at most <paramref name="bridgeDays"/> days (up to 63) that lies inside
    /// the season and whose two flanking observed days are on the same side of the threshold: marks its days in
    /// <paramref name="bridged"/>, in <paramref name="snow"/> when the flanks are snow, and removes them from
    /// <paramref name="missing"/>. Runs of each length k are found with shifts of the masks: a run starts where a day is
    /// missing and the day before is not, is k long where days i…i+k−1 are missing and day i+k is not.
    /// </summary>
    private static void BridgeShortRuns(Span<ulong> missing, Span<ulong> snow, Span<ulong> bridged, int bridgeDays)
    {
        var m = new DayBits(missing);
        var longest = Math.Min(bridgeDays, 63);
        if (longest < 1 || m.IsEmpty)
        {
            return;
        }

        var s = new DayBits(snow);
        var starts = m.AndNot(m.Later(1));
        var leftSnow = s.Later(1);
        var runsAtLeast = m;
        DayBits days = default, snowDays = default;
        for (var k = 1; k <= longest; k++)
        {
            var next = m.Earlier(k);
            var agree = (starts & runsAtLeast).AndNot(next) & DayBits.Range(1, D - 1 - k) & ~(leftSnow ^ s.Earlier(k));
            if (!agree.IsEmpty)
            {
                var run = agree;
                var snowRun = agree & leftSnow;
                for (var j = 1; j < k; j++)
                {
                    run |= agree.Later(j);
                    snowRun |= (agree & leftSnow).Later(j);
                }

                days |= run;
                snowDays |= snowRun;
            }

            runsAtLeast &= next;
            if ((runsAtLeast & starts).IsEmpty)
            {
                break;
            }
        }

        days.CopyTo(bridged);
        (s | snowDays).CopyTo(snow);
        m.AndNot(days).CopyTo(missing);
    }

    /// <summary>The least float f with (double)f ≥ <paramref name="threshold"/>: for every float x, x ≥ f exactly when (double)x ≥ threshold.</summary>
    internal static float SnowThreshold(double threshold)
    {
        var f = (float)threshold;
        return f < threshold ? MathF.BitIncrement(f) : f;
    }

    /// <summary>Bit masks of the observed days and of the observed days at or above <paramref name="threshold"/>, 8 days at a time.</summary>
    private static void DayMasks(ReadOnlySpan<float> xs, float threshold, Span<ulong> observed, Span<ulong> snow)
    {
        var tv = Vector256.Create(threshold);
        for (var w = 0; w < Words; w++)
        {
            ulong o = 0, s = 0;
            for (var q = 0; q < 8; q++)
            {
                var v = Vector256.Create(xs.Slice((w * 64) + (q * 8), 8));
                o |= (ulong)Vector256.Equals(v, v).ExtractMostSignificantBits() << (q * 8);
                s |= (ulong)Vector256.GreaterThanOrEqual(v, tv).ExtractMostSignificantBits() << (q * 8);
            }

            observed[w] = o;
            snow[w] = s;
        }
    }

    /// <summary>Index of the first largest observed value of <paramref name="xs"/> (NaN = missing), −1 when no observed value exceeds −∞.</summary>
    private static int FirstMaximum(ReadOnlySpan<float> xs)
    {
        var none = Vector256.Create(float.NegativeInfinity);
        var top = none;
        for (var i = 0; i < PaddedFloats; i += 8)
        {
            var v = Vector256.Create(xs.Slice(i, 8));
            top = Avx.IsSupported ? Avx.Max(top, Vector256.ConditionalSelect(Vector256.Equals(v, v), v, none)) : Vector256.Max(top, Vector256.ConditionalSelect(Vector256.Equals(v, v), v, none));
        }

        var m = float.NegativeInfinity;
        for (var lane = 0; lane < 8; lane++)
        {
            m = Math.Max(m, top[lane]);
        }

        if (m == float.NegativeInfinity)
        {
            return -1;
        }

        var mv = Vector256.Create(m);
        for (var i = 0; i < PaddedFloats; i += 8)
        {
            var hits = Vector256.Equals(Vector256.Create(xs.Slice(i, 8)), mv).ExtractMostSignificantBits();
            if (hits != 0)
            {
                return i + BitOperations.TrailingZeroCount(hits);
            }
        }

        return -1;
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

    /// <summary>Largest reconstruction over days a…b; +∞ as soon as one of them has none (+∞).</summary>
    private static double RangeMax(ReadOnlySpan<double> reconstruction, int a, int b)
    {
        var top = double.NegativeInfinity;
        for (var j = a; j <= b; j++)
        {
            var x = reconstruction[j];
            if (x == double.PositiveInfinity)
            {
                return double.PositiveInfinity;
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
    /// <remarks>Sums run in day order; days without a depth add nothing, so only the stretch between the first and the
    /// last nonzero depth is summed.</remarks>
    [SkipLocalsInit]
    private static double Centroid(ReadOnlySpan<float> xs, ReadOnlySpan<ulong> observed, ReadOnlySpan<ulong> bridged, ReadOnlySpan<ulong> modelled, double t, int modelledDays)
    {
        Span<double> depth = stackalloc double[PaddedFloats];
        for (var i = 0; i < PaddedFloats; i += 8)
        {
            var (lo, hi) = Vector256.Widen(Vector256.Create(xs.Slice(i, 8)));
            (lo & Vector256.Equals(lo, lo)).CopyTo(depth.Slice(i, 4));
            (hi & Vector256.Equals(hi, hi)).CopyTo(depth.Slice(i + 4, 4));
        }

        for (var a = NextSet(bridged, 0); a < D;)
        {
            var end = NextClear(bridged, a);
            double left = xs[a - 1], right = xs[end];
            var span = end - a + 1;
            for (var j = a; j < end; j++)
            {
                depth[j] = left + ((right - left) * (j - a + 1) / span);
            }

            a = NextSet(bridged, end);
        }

        var from = 0;
        while (from < D && depth[from] == 0)
        {
            from++;
        }

        var to = D - 1;
        while (to > from && depth[to] == 0)
        {
            to--;
        }

        double weighted = 0, total = 0;
        for (var i = from; i <= to; i++)
        {
            weighted += i * depth[i];
            total += depth[i];
        }

        if (modelledDays == 0)
        {
            return total > 0 ? weighted / total : double.NaN;
        }

        if (!(total > 0))
        {
            return double.NaN;
        }

        long modelledDaySum = 0;
        for (var i = NextSet(modelled, 0); i < D; i = NextSet(modelled, i + 1))
        {
            modelledDaySum += i;
        }

        // Prefixes (minimum) and suffixes (maximum) of the modelled days in day order, each day at depth t.
        double low = weighted / total, high = low, prefixDays = 0, prefixCount = 0;
        for (var i = NextSet(modelled, 0); i < D; i = NextSet(modelled, i + 1))
        {
            prefixDays += i;
            prefixCount++;
            low = Math.Min(low, (weighted + (t * prefixDays)) / (total + (t * prefixCount)));
            var suffixDays = modelledDaySum - prefixDays + i;
            var suffixCount = modelledDays - prefixCount + 1;
            high = Math.Max(high, (weighted + (t * suffixDays)) / (total + (t * suffixCount)));
        }

        return high - low <= CentroidToleranceDays ? (low + high) / 2 : double.NaN;
    }

    /// <summary>365 day bits in six words, with shifts that carry across words; bits 365… stay clear.</summary>
    private readonly struct DayBits
    {
        private const ulong LastWord = (1UL << (D % 64)) - 1;

        private readonly ulong w0, w1, w2, w3, w4, w5;

        public DayBits(ReadOnlySpan<ulong> words)
            : this(words[0], words[1], words[2], words[3], words[4], words[5])
        {
        }

        private DayBits(ulong w0, ulong w1, ulong w2, ulong w3, ulong w4, ulong w5)
        {
            this.w0 = w0;
            this.w1 = w1;
            this.w2 = w2;
            this.w3 = w3;
            this.w4 = w4;
            this.w5 = w5 & LastWord;
        }

        public bool IsEmpty => (w0 | w1 | w2 | w3 | w4 | w5) == 0;

        public static DayBits operator &(DayBits a, DayBits b) => new(a.w0 & b.w0, a.w1 & b.w1, a.w2 & b.w2, a.w3 & b.w3, a.w4 & b.w4, a.w5 & b.w5);

        public static DayBits operator |(DayBits a, DayBits b) => new(a.w0 | b.w0, a.w1 | b.w1, a.w2 | b.w2, a.w3 | b.w3, a.w4 | b.w4, a.w5 | b.w5);

        public static DayBits operator ^(DayBits a, DayBits b) => new(a.w0 ^ b.w0, a.w1 ^ b.w1, a.w2 ^ b.w2, a.w3 ^ b.w3, a.w4 ^ b.w4, a.w5 ^ b.w5);

        public static DayBits operator ~(DayBits a) => new(~a.w0, ~a.w1, ~a.w2, ~a.w3, ~a.w4, ~a.w5);

        /// <summary>Days d with d ≥ <paramref name="first"/> and d ≤ <paramref name="last"/> (empty when last &lt; first).</summary>
        public static DayBits Range(int first, int last)
        {
            if (last < first)
            {
                return default;
            }

            Span<ulong> w = stackalloc ulong[Words];
            w.Clear();
            SetRange(w, first, last + 1);
            return new DayBits(w);
        }

        public DayBits AndNot(DayBits b) => new(w0 & ~b.w0, w1 & ~b.w1, w2 & ~b.w2, w3 & ~b.w3, w4 & ~b.w4, w5 & ~b.w5);

        /// <summary>Bit d holds day d − <paramref name="k"/> (1 ≤ k ≤ 63).</summary>
        public DayBits Later(int k)
        {
            var r = 64 - k;
            return new(w0 << k, (w1 << k) | (w0 >> r), (w2 << k) | (w1 >> r), (w3 << k) | (w2 >> r), (w4 << k) | (w3 >> r), (w5 << k) | (w4 >> r));
        }

        /// <summary>Bit d holds day d + <paramref name="k"/> (1 ≤ k ≤ 63).</summary>
        public DayBits Earlier(int k)
        {
            var r = 64 - k;
            return new((w0 >> k) | (w1 << r), (w1 >> k) | (w2 << r), (w2 >> k) | (w3 << r), (w3 >> k) | (w4 << r), (w4 >> k) | (w5 << r), w5 >> k);
        }

        public void CopyTo(Span<ulong> words)
        {
            words[0] = w0;
            words[1] = w1;
            words[2] = w2;
            words[3] = w3;
            words[4] = w4;
            words[5] = w5;
        }
    }

    /// <summary>Bits of word <paramref name="w"/> that are days of the season (0…364).</summary>
    private static ulong ValidDays(int w) => w < D / 64 ? ulong.MaxValue : w == D / 64 ? (1UL << (D % 64)) - 1 : 0;

    private static bool Test(ReadOnlySpan<ulong> mask, int day) => ((mask[day >> 6] >> (day & 63)) & 1) != 0;

    private static bool IsEmpty(ReadOnlySpan<ulong> mask)
    {
        foreach (var w in mask)
        {
            if (w != 0)
            {
                return false;
            }
        }

        return true;
    }

    private static int PopCount(ReadOnlySpan<ulong> mask)
    {
        var n = 0;
        foreach (var w in mask)
        {
            n += BitOperations.PopCount(w);
        }

        return n;
    }

    /// <summary>First set bit at or after <paramref name="from"/>; the mask's bit length when there is none.</summary>
    private static int NextSet(ReadOnlySpan<ulong> mask, int from)
    {
        var w = from >> 6;
        if (w >= mask.Length)
        {
            return mask.Length * 64;
        }

        var bits = mask[w] & (ulong.MaxValue << (from & 63));
        while (bits == 0)
        {
            if (++w == mask.Length)
            {
                return mask.Length * 64;
            }

            bits = mask[w];
        }

        return (w * 64) + BitOperations.TrailingZeroCount(bits);
    }

    /// <summary>First clear bit at or after <paramref name="from"/>; the mask's bit length when there is none.</summary>
    private static int NextClear(ReadOnlySpan<ulong> mask, int from)
    {
        var w = from >> 6;
        if (w >= mask.Length)
        {
            return mask.Length * 64;
        }

        var bits = ~mask[w] & (ulong.MaxValue << (from & 63));
        while (bits == 0)
        {
            if (++w == mask.Length)
            {
                return mask.Length * 64;
            }

            bits = ~mask[w];
        }

        return (w * 64) + BitOperations.TrailingZeroCount(bits);
    }

    /// <summary>Last set bit; −1 when there is none.</summary>
    private static int PreviousSet(ReadOnlySpan<ulong> mask)
    {
        for (var w = mask.Length - 1; w >= 0; w--)
        {
            if (mask[w] != 0)
            {
                return (w * 64) + 63 - BitOperations.LeadingZeroCount(mask[w]);
            }
        }

        return -1;
    }

    /// <summary>Sets bits [<paramref name="from"/>, <paramref name="end"/>).</summary>
    private static void SetRange(Span<ulong> mask, int from, int end)
    {
        for (var w = from >> 6; w <= (end - 1) >> 6; w++)
        {
            var lo = w == from >> 6 ? from & 63 : 0;
            var hi = w == (end - 1) >> 6 ? (end - 1) & 63 : 63;
            mask[w] |= (ulong.MaxValue >> (63 - hi)) & (ulong.MaxValue << lo);
        }
    }

    /// <summary>Length of the longest run of set bits.</summary>
    private static int LongestRun(ReadOnlySpan<ulong> mask)
    {
        var longest = 0;
        for (var a = NextSet(mask, 0); a < mask.Length * 64;)
        {
            var end = NextClear(mask, a);
            longest = Math.Max(longest, end - a);
            a = NextSet(mask, end);
        }

        return longest;
    }
}

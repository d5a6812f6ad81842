using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using MathNet.Numerics;

namespace Spatial.Fitting.Internal;

/// <summary>Result of the Mann–Kendall test.</summary>
internal readonly record struct MannKendallResult(int N, double S, double VarianceS, double Z, double PTwoSided);

/// <summary>Mann–Kendall trend test with the tie correction, Sen's slope, and sample quantiles.</summary>
/// <remarks>
/// Mann (1945), Kendall (1975); formulas as in Gilbert (1987, ch. 16): S = Σ_{i&lt;j} sign(y_j − y_i) with x ascending;
/// Var(S) = [n(n−1)(2n+5) − Σ_t t(t−1)(2t+5)]/18 over groups of tied y; Z = (S − 1)/√Var for S &gt; 0,
/// (S + 1)/√Var for S &lt; 0, 0 for S = 0; p = 2(1 − Φ(|Z|)). Sen (1968): median of the pairwise slopes
/// (y_j − y_i)/(x_j − x_i) over pairs with x_j ≠ x_i. Fewer than 3 values: everything NaN.
/// </remarks>
internal static class Trend
{
    public static MannKendallResult MannKendall(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var n = y.Length;
        if (n < 3)
        {
            return new MannKendallResult(n, double.NaN, double.NaN, double.NaN, double.NaN);
        }

        var strictly = IsStrictlyAscending(x);
        var order = strictly || IsAscending(x) ? null : SortedOrder(x);
        long s = 0;
        for (var i = 0; i < n && strictly; i++)
        {
            // x strictly ascending: every pair counts, and sign(y_j − y_i) = [y_j > y_i] − [y_j < y_i] for finite y.
            s += SignSum(y[(i + 1)..], y[i]);
        }

        for (var i = 0; i < n && !strictly; i++)
        {
            var oi = order is null ? i : order[i];
            for (var j = i + 1; j < n; j++)
            {
                var oj = order is null ? j : order[j];
                var dx = x[oj] - x[oi];
                if (dx == 0)
                {
                    continue;
                }

                s += Math.Sign(y[oj] - y[oi]);
            }
        }

        var rented = System.Buffers.ArrayPool<double>.Shared.Rent(n);
        var sorted = rented.AsSpan(0, n);
        y.CopyTo(sorted);
        sorted.Sort();
        double ties = 0;
        for (var i = 0; i < n;)
        {
            var j = i;
            while (j < n && sorted[j] == sorted[i])
            {
                j++;
            }

            double t = j - i;
            if (t > 1)
            {
                ties += t * (t - 1) * ((2 * t) + 5);
            }

            i = j;
        }

        System.Buffers.ArrayPool<double>.Shared.Return(rented);
        var variance = ((n * (n - 1.0) * ((2.0 * n) + 5)) - ties) / 18.0;
        var z = s > 0 ? (s - 1) / Math.Sqrt(variance) : s < 0 ? (s + 1) / Math.Sqrt(variance) : 0.0;
        var p = variance > 0 ? SpecialFunctions.Erfc(Math.Abs(z) / Math.Sqrt(2.0)) : double.NaN;
        return new MannKendallResult(n, s, variance, variance > 0 ? z : double.NaN, p);
    }

    /// <summary>Sen's slope (median pairwise slope), y units per x unit; NaN with fewer than 3 values or no pair with distinct x.</summary>
    public static double SenSlope(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var n = y.Length;
        if (n < 3)
        {
            return double.NaN;
        }

        var slopes = System.Buffers.ArrayPool<double>.Shared.Rent(n * (n - 1) / 2);
        var m = 0;
        var strictly = IsStrictlyAscending(x);
        for (var i = 0; i < n && strictly; i++)
        {
            // x strictly ascending: every pair has a slope, written in the same order as below.
            Slopes(x[(i + 1)..], y[(i + 1)..], x[i], y[i], slopes.AsSpan(m, n - 1 - i));
            m += n - 1 - i;
        }

        for (var i = 0; i < n && !strictly; i++)
        {
            for (var j = i + 1; j < n; j++)
            {
                var dx = x[j] - x[i];
                if (dx != 0)
                {
                    slopes[m++] = (y[j] - y[i]) / dx;
                }
            }
        }

        if (m == 0)
        {
            System.Buffers.ArrayPool<double>.Shared.Return(slopes);
            return double.NaN;
        }

        var span = slopes.AsSpan(0, m);
        var work = System.Buffers.ArrayPool<double>.Shared.Rent(m);
        var spare = System.Buffers.ArrayPool<double>.Shared.Rent(m);
        var upper = OrderStatistic(span, m / 2, work, spare);
        var median = m % 2 == 1 ? upper : 0.5 * (OrderStatistic(span, (m / 2) - 1, work, spare) + upper);
        System.Buffers.ArrayPool<double>.Shared.Return(spare);
        System.Buffers.ArrayPool<double>.Shared.Return(work);
        System.Buffers.ArrayPool<double>.Shared.Return(slopes);
        return median;
    }

    /// <summary>
    /// The value of rank <paramref name="rank"/> (0-based, ascending) among <paramref name="values"/> (no NaN), which
    /// are left as they are; <paramref name="work"/> and <paramref name="spare"/>, each at least as long, are overwritten.
    /// </summary>
    /// <remarks>
    /// Quickselect (Hoare 1961) with a three-way partition written without branches: each value is stored both after the
    /// smaller ones and before the larger ones found so far, and only the matching end moves; the values equal to the
    /// pivot are left in the middle (a comparison is added as its byte, 0 or 1). The partitions alternate between the two buffers. A range of 16 or fewer values, or
    /// one still open after 64 partitions, is sorted. (A Floyd–Rivest sample to bracket the rank first gained nothing on
    /// the 1,225 slopes of a 50-season station.)
    /// </remarks>
    internal static double OrderStatistic(ReadOnlySpan<double> values, int rank, Span<double> work, Span<double> spare)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(rank);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(rank, values.Length);
        ArgumentOutOfRangeException.ThrowIfLessThan(work.Length, values.Length);
        ArgumentOutOfRangeException.ThrowIfLessThan(spare.Length, values.Length);
        var from = work[..values.Length];
        var to = spare[..values.Length];
        values.CopyTo(from);
        int lo = 0, hi = values.Length;
        for (var pass = 0; ; pass++)
        {
            var n = hi - lo;
            if (n <= 16 || pass == 64)
            {
                var range = from[lo..hi];
                range.Sort();
                return range[rank - lo];
            }

            var pivot = MedianOfThree(from[lo], from[lo + (n / 2)], from[hi - 1]);
            int less = lo, greater = hi;

            // lo ≤ less ≤ greater − 1 < hi before every store: at most i − lo values have moved an end.
            ref var source = ref MemoryMarshal.GetReference(from);
            ref var target = ref MemoryMarshal.GetReference(to);
            for (var i = lo; i < hi; i++)
            {
                var x = Unsafe.Add(ref source, i);
                Unsafe.Add(ref target, less) = x;
                Unsafe.Add(ref target, greater - 1) = x;
                var isLess = x < pivot;
                var isGreater = x > pivot;
                less += Unsafe.As<bool, byte>(ref isLess);
                greater -= Unsafe.As<bool, byte>(ref isGreater);
            }

            if (rank < less)
            {
                hi = less;
            }
            else if (rank >= greater)
            {
                lo = greater;
            }
            else
            {
                return pivot;
            }

            var swap = from;
            from = to;
            to = swap;
        }
    }

    private static double MedianOfThree(double a, double b, double c) =>
        a < b ? (b < c ? b : (a < c ? c : a)) : (a < c ? a : (b < c ? c : b));

    /// <summary>Quantile of sorted values by linear interpolation between order statistics (Hyndman &amp; Fan 1996 type 7, numpy's default); NaN when empty.</summary>
    public static double Quantile(ReadOnlySpan<double> sorted, double probability)
    {
        if (sorted.Length == 0)
        {
            return double.NaN;
        }

        var h = (sorted.Length - 1) * probability;
        var lo = (int)Math.Floor(h);
        var hi = Math.Min(lo + 1, sorted.Length - 1);
        return sorted[lo] + ((h - lo) * (sorted[hi] - sorted[lo]));
    }

    /// <summary>Σ_j sign(y_j − <paramref name="yi"/>) over finite <paramref name="y"/>, four at a time.</summary>
    private static long SignSum(ReadOnlySpan<double> y, double yi)
    {
        var j = 0;
        long s = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            var pivot = Vector256.Create(yi);
            var acc = Vector256<long>.Zero;
            for (; j + 4 <= y.Length; j += 4)
            {
                var v = Vector256.Create(y.Slice(j, 4));
                // Comparison masks are −1 where true: (lt − gt) counts +1 for y_j > y_i.
                acc += Vector256.LessThan(v, pivot).AsInt64() - Vector256.GreaterThan(v, pivot).AsInt64();
            }

            s = Vector256.Sum(acc);
        }

        for (; j < y.Length; j++)
        {
            s += Math.Sign(y[j] - yi);
        }

        return s;
    }

    /// <summary>(y_j − <paramref name="yi"/>) / (x_j − <paramref name="xi"/>) for every j, into <paramref name="slopes"/>.</summary>
    private static void Slopes(ReadOnlySpan<double> x, ReadOnlySpan<double> y, double xi, double yi, Span<double> slopes)
    {
        var j = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            var px = Vector256.Create(xi);
            var py = Vector256.Create(yi);
            for (; j + 4 <= y.Length; j += 4)
            {
                ((Vector256.Create(y.Slice(j, 4)) - py) / (Vector256.Create(x.Slice(j, 4)) - px)).CopyTo(slopes.Slice(j, 4));
            }
        }

        for (; j < y.Length; j++)
        {
            slopes[j] = (y[j] - yi) / (x[j] - xi);
        }
    }

    private static bool IsStrictlyAscending(ReadOnlySpan<double> x)
    {
        for (var i = 1; i < x.Length; i++)
        {
            if (!(x[i] > x[i - 1]))
            {
                return false;
            }
        }

        return true;
    }

    private static bool IsAscending(ReadOnlySpan<double> x)
    {
        for (var i = 1; i < x.Length; i++)
        {
            if (!(x[i] >= x[i - 1]))
            {
                return false;
            }
        }

        return true;
    }

    private static int[] SortedOrder(ReadOnlySpan<double> x)
    {
        var copy = x.ToArray();
        var order = Enumerable.Range(0, x.Length).ToArray();
        Array.Sort(copy, order);
        return order;
    }
}

using System.Runtime.InteropServices;

namespace Spatial.Fitting.Internal;

/// <summary>Least-significant-digit radix sort of finite doubles (11-bit digits), ascending; linear in the count.</summary>
/// <remarks>
/// Each double is mapped to an unsigned key whose order is the numeric order (sign bit set for positives, all bits
/// flipped for negatives; −0 sorts just before +0), sorted stably digit by digit, and mapped back. Digits on which all
/// keys agree are skipped. NaN has no place in the order: callers pass finite values only.
/// </remarks>
internal static class RadixSort
{
    private const int DigitBits = 11;
    private const int Buckets = 1 << DigitBits;
    private const int Passes = (64 + DigitBits - 1) / DigitBits;

    /// <summary>Sorts <paramref name="values"/> in place; <paramref name="scratch"/> must be at least as long.</summary>
    public static void Sort(Span<double> values, Span<double> scratch)
    {
        var n = values.Length;
        ArgumentOutOfRangeException.ThrowIfLessThan(scratch.Length, n);
        if (n < 2)
        {
            return;
        }

        var keys = MemoryMarshal.Cast<double, ulong>(values);
        var other = MemoryMarshal.Cast<double, ulong>(scratch[..n]);
        var counts = new int[Passes * Buckets];
        for (var i = 0; i < n; i++)
        {
            var bits = keys[i];
            var key = (bits & (1UL << 63)) != 0 ? ~bits : bits | (1UL << 63);
            keys[i] = key;
            for (var p = 0; p < Passes; p++)
            {
                counts[(p * Buckets) + (int)((key >> (p * DigitBits)) & (Buckets - 1))]++;
            }
        }

        var from = keys;
        var to = other;
        for (var p = 0; p < Passes; p++)
        {
            var count = counts.AsSpan(p * Buckets, Buckets);
            var shift = p * DigitBits;
            if (count[(int)((from[0] >> shift) & (Buckets - 1))] == n)
            {
                continue;
            }

            var offset = 0;
            for (var b = 0; b < Buckets; b++)
            {
                var c = count[b];
                count[b] = offset;
                offset += c;
            }

            foreach (var key in from)
            {
                to[count[(int)((key >> shift) & (Buckets - 1))]++] = key;
            }

            var swap = from;
            from = to;
            to = swap;
        }

        for (var i = 0; i < n; i++)
        {
            var key = from[i];
            keys[i] = (key & (1UL << 63)) != 0 ? key & ~(1UL << 63) : ~key;
        }
    }
}

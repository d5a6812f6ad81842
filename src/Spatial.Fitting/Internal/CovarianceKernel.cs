using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace Spatial.Fitting.Internal;

/// <summary>
/// The hot loop of the fit: for a block of <see cref="Layout.BlockRows"/> centred rows (row-major, each padded to
/// <see cref="Layout.PaddedDays"/> floats, missing days zero), adds the upper triangle of AᵀA into a double
/// accumulator, and adds the pairwise observed counts from per-day bit masks.
/// </summary>
/// <remarks>
/// Register-blocked 4×16 tiles: each step loads two 8-float vectors of the column strip and broadcasts four
/// scalars of the row strip, 8 fused multiply-adds. The column strip (BlockRows × 16 floats = 16 KB) stays in L1
/// across all row tiles. Products are summed in float within a block (at most 256 terms) and then added into
/// double, so rounding does not grow with the number of seasons.
/// </remarks>
internal static unsafe class CovarianceKernel
{
    public const int TileRows = 4;
    public const int TileCols = 16;

    /// <summary>Words of 64 rows per block.</summary>
    public const int MaskWords = Layout.BlockRows / 64;

    /// <summary>True when the AVX2+FMA kernel runs (otherwise a portable Vector&lt;float&gt; kernel).</summary>
    public static bool Accelerated => Fma.IsSupported && Avx.IsSupported;

    /// <summary>Adds the upper triangle (i ≤ j) of AᵀA, A = block (rows × PaddedDays), into <paramref name="sums"/> (PaddedDays²).</summary>
    public static void AddProducts(ReadOnlySpan<float> block, int rows, Span<double> sums)
    {
        const int p = Layout.PaddedDays;
        if (block.Length < rows * p || sums.Length < p * p)
        {
            throw new ArgumentException("block or sums too short");
        }

        fixed (float* a = block)
        fixed (double* s = sums)
        {
            for (var jb = 0; jb < p; jb += TileCols)
            {
                var iEnd = Math.Min(jb + TileCols, Layout.Days);
                for (var ib = 0; ib < iEnd; ib += TileRows)
                {
                    if (Accelerated)
                    {
                        TileAvx(a, rows, ib, jb, s);
                    }
                    else
                    {
                        TilePortable(a, rows, ib, jb, s);
                    }
                }
            }
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static void TileAvx(float* a, int rows, int ib, int jb, double* s)
    {
        const int p = Layout.PaddedDays;
        var c00 = Vector256<float>.Zero;
        var c01 = Vector256<float>.Zero;
        var c10 = Vector256<float>.Zero;
        var c11 = Vector256<float>.Zero;
        var c20 = Vector256<float>.Zero;
        var c21 = Vector256<float>.Zero;
        var c30 = Vector256<float>.Zero;
        var c31 = Vector256<float>.Zero;
        var pa = a + ib;
        var pb = a + jb;
        for (var r = 0; r < rows; r++)
        {
            var b0 = Avx.LoadVector256(pb);
            var b1 = Avx.LoadVector256(pb + 8);
            var x = Vector256.Create(pa[0]);
            c00 = Fma.MultiplyAdd(x, b0, c00);
            c01 = Fma.MultiplyAdd(x, b1, c01);
            x = Vector256.Create(pa[1]);
            c10 = Fma.MultiplyAdd(x, b0, c10);
            c11 = Fma.MultiplyAdd(x, b1, c11);
            x = Vector256.Create(pa[2]);
            c20 = Fma.MultiplyAdd(x, b0, c20);
            c21 = Fma.MultiplyAdd(x, b1, c21);
            x = Vector256.Create(pa[3]);
            c30 = Fma.MultiplyAdd(x, b0, c30);
            c31 = Fma.MultiplyAdd(x, b1, c31);
            pa += p;
            pb += p;
        }

        AddRow(s + ((ib + 0) * p) + jb, c00, c01);
        AddRow(s + ((ib + 1) * p) + jb, c10, c11);
        AddRow(s + ((ib + 2) * p) + jb, c20, c21);
        AddRow(s + ((ib + 3) * p) + jb, c30, c31);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void AddRow(double* dst, Vector256<float> lo, Vector256<float> hi)
    {
        Avx.Store(dst, Avx.Add(Avx.LoadVector256(dst), Avx.ConvertToVector256Double(lo.GetLower())));
        Avx.Store(dst + 4, Avx.Add(Avx.LoadVector256(dst + 4), Avx.ConvertToVector256Double(lo.GetUpper())));
        Avx.Store(dst + 8, Avx.Add(Avx.LoadVector256(dst + 8), Avx.ConvertToVector256Double(hi.GetLower())));
        Avx.Store(dst + 12, Avx.Add(Avx.LoadVector256(dst + 12), Avx.ConvertToVector256Double(hi.GetUpper())));
    }

    private static void TilePortable(float* a, int rows, int ib, int jb, double* s)
    {
        const int p = Layout.PaddedDays;
        Span<float> acc = stackalloc float[TileRows * TileCols];
        acc.Clear();
        var w = Vector<float>.Count;
        for (var r = 0; r < rows; r++)
        {
            var row = new ReadOnlySpan<float>(a + ((long)r * p), p);
            for (var ii = 0; ii < TileRows; ii++)
            {
                var x = row[ib + ii];
                if (x == 0f)
                {
                    continue;
                }

                var dst = acc.Slice(ii * TileCols, TileCols);
                for (var jj = 0; jj < TileCols; jj += w)
                {
                    var v = new Vector<float>(row.Slice(jb + jj, w));
                    var d = new Vector<float>(dst.Slice(jj, w));
                    (d + (v * x)).CopyTo(dst.Slice(jj, w));
                }
            }
        }

        for (var ii = 0; ii < TileRows; ii++)
        {
            for (var jj = 0; jj < TileCols; jj++)
            {
                s[((ib + ii) * p) + jb + jj] += acc[(ii * TileCols) + jj];
            }
        }
    }

    /// <summary>
    /// Adds, for each day pair i ≤ j (&lt; 365), the number of block rows observed on both days: popcount of the
    /// AND of the two days' masks (<see cref="MaskWords"/> words per day).
    /// </summary>
    public static void AddPairCounts(ReadOnlySpan<ulong> masks, Span<int> counts)
    {
        const int p = Layout.PaddedDays;
        const int d = Layout.Days;
        for (var i = 0; i < d; i++)
        {
            var mi = masks.Slice(i * MaskWords, MaskWords);
            if (mi[0] == 0 && mi[1] == 0 && mi[2] == 0 && mi[3] == 0)
            {
                continue;
            }

            var row = counts.Slice(i * p, p);
            for (var j = i; j < d; j++)
            {
                var mj = masks.Slice(j * MaskWords, MaskWords);
                row[j] += BitOperations.PopCount(mi[0] & mj[0]) + BitOperations.PopCount(mi[1] & mj[1])
                    + BitOperations.PopCount(mi[2] & mj[2]) + BitOperations.PopCount(mi[3] & mj[3]);
            }
        }
    }

    /// <summary>The plain baseline: a dense dot product of two float spans, one multiply-add per element, no blocking.</summary>
    public static float PlainDot(ReadOnlySpan<float> x, ReadOnlySpan<float> y)
    {
        var sum = 0f;
        for (var i = 0; i < x.Length; i++)
        {
            sum += x[i] * y[i];
        }

        return sum;
    }
}

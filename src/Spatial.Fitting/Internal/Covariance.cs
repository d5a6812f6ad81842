using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using Spatial.Core;

namespace Spatial.Fitting.Internal;

/// <summary>Values that replace missing days during the EM refinement: previous mean + previous reconstruction.</summary>
/// <param name="Mean">Previous mean curve [365].</param>
/// <param name="ComponentsByDay">Previous components, day-major [365 × K].</param>
/// <param name="K">Number of components.</param>
/// <param name="Coefficients">Previous coefficients per training row [train × K].</param>
internal sealed record EmFill(double[] Mean, double[] ComponentsByDay, int K, double[] Coefficients)
{
    public double Value(int trainIndex, int day)
    {
        var v = Mean[day];
        var c = trainIndex * K;
        var vd = day * K;
        for (var k = 0; k < K; k++)
        {
            v += ComponentsByDay[vd + k] * Coefficients[c + k];
        }

        return v;
    }
}

/// <summary>Mean curve and covariance of the season matrix with missing days.</summary>
/// <remarks>
/// Pairwise-complete covariance: for days i, j, C_ij = Σ (x_si − m_i)(x_sj − m_j) / (n_ij − 1), the sum over the
/// training seasons s observed on both days, n_ij their number, m the mean of all observed values of each day.
/// The denominator n_ij − 1 makes C the usual unbiased sample covariance when nothing is missing (so it matches
/// LAPACK/numpy <c>cov</c> on complete data); a pair seen together in fewer than two seasons gets 0.
/// </remarks>
internal static class Covariance
{
    /// <summary>Mean of observed values per day over the training rows; NaN for a day never observed. <paramref name="counts"/> gets the observed counts.</summary>
    public static double[] Mean(SeasonMatrix matrix, int[] train, EmFill? fill, ParallelOptions po, out long[] counts)
    {
        const int d = Layout.Days;
        var chunks = Layout.Chunks(train.Length);
        var sums = new double[chunks.Length][];
        var cnts = new long[chunks.Length][];
        var memory = matrix.DepthsMemory;
        Parallel.For(0, chunks.Length, po, c =>
        {
            var s = new double[Layout.PaddedDays];
            var n = new long[d];
            var counts = new double[Layout.PaddedDays];
            var span = memory.Span;
            for (var t = chunks[c].Start; t < chunks[c].End; t++)
            {
                var row = span.Slice(train[t] * d, d);
                if (fill is null)
                {
                    AddObserved(row, s, counts);
                    continue;
                }

                for (var j = 0; j < d; j++)
                {
                    var x = row[j];
                    if (!float.IsNaN(x))
                    {
                        s[j] += x;
                        n[j]++;
                    }
                    else
                    {
                        s[j] += fill.Value(t, j);
                        n[j]++;
                    }
                }
            }

            for (var j = 0; j < d; j++)
            {
                n[j] += (long)counts[j];
            }

            sums[c] = s;
            cnts[c] = n;
        });
        var mean = new double[d];
        counts = new long[d];
        for (var c = 0; c < chunks.Length; c++)
        {
            for (var j = 0; j < d; j++)
            {
                mean[j] += sums[c][j];
                counts[j] += cnts[c][j];
            }
        }

        for (var j = 0; j < d; j++)
        {
            mean[j] = counts[j] > 0 ? mean[j] / counts[j] : double.NaN;
        }

        return mean;
    }

    /// <summary>Adds the observed depths of a row to <paramref name="sums"/> and 1 per observed day to <paramref name="counts"/>, four days at a time without branches (counts stay exact in double below 2^53).</summary>
    private static unsafe void AddObserved(ReadOnlySpan<float> row, double[] sums, double[] counts)
    {
        const int d = Layout.Days;
        fixed (float* px = row)
        fixed (double* ps = sums, pc = counts)
        {
            var j = 0;
            if (Avx.IsSupported)
            {
                var one = Vector128.Create(1f);
                for (; j + 4 <= d; j += 4)
                {
                    var x4 = Vector128.Load(px + j);
                    var ok = Vector128.Equals(x4, x4);
                    Vector256.Store(Vector256.Load(ps + j) + Avx.ConvertToVector256Double(x4 & ok), ps + j);
                    Vector256.Store(Vector256.Load(pc + j) + Avx.ConvertToVector256Double(one & ok), pc + j);
                }
            }

            for (; j < d; j++)
            {
                var x = px[j];
                var observed = !float.IsNaN(x);
                ps[j] += observed ? x : 0f;
                pc[j] += observed ? 1 : 0;
            }
        }
    }

    /// <summary>
    /// Centres one row into the block (missing or unusable days → 0) and sets its bit in the day masks, four days at a
    /// time without branches: x − m in double (as the scalar code would), then rounded to float.
    /// </summary>
    private static unsafe void FillPairwise(ReadOnlySpan<float> row, Span<float> dst, ulong[] masks, int word, int bitIndex, double[] meanD, uint[] usableBits)
    {
        const int d = Layout.Days;
        const int w = CovarianceKernel.MaskWords;
        fixed (float* px = row, pd = dst)
        fixed (double* pm = meanD)
        fixed (uint* pu = usableBits)
        fixed (ulong* pk = masks)
        {
            var j = 0;
            if (Avx.IsSupported)
            {
                for (; j + 4 <= d; j += 4)
                {
                    var x4 = Vector128.Load(px + j);
                    var ok = Vector128.Equals(x4, x4).AsUInt32() & Vector128.Load(pu + j);
                    var y = Avx.ConvertToVector256Double(x4) - Vector256.Load(pm + j);
                    var y4 = Avx.ConvertToVector128Single(y).AsUInt32() & ok;
                    Vector128.Store(y4.AsSingle(), pd + j);
                    var bits = (ulong)ok.ExtractMostSignificantBits();
                    pk[(j * w) + word] |= (bits & 1) << bitIndex;
                    pk[((j + 1) * w) + word] |= ((bits >> 1) & 1) << bitIndex;
                    pk[((j + 2) * w) + word] |= ((bits >> 2) & 1) << bitIndex;
                    pk[((j + 3) * w) + word] |= ((bits >> 3) & 1) << bitIndex;
                }
            }

            for (; j < d; j++)
            {
                var x = px[j];
                var observed = !float.IsNaN(x) && pu[j] != 0;
                pd[j] = observed ? (float)(x - pm[j]) : 0f;
                pk[(j * w) + word] |= (observed ? 1UL : 0UL) << bitIndex;
            }
        }
    }

    /// <summary>
    /// The covariance [365 × 365], symmetric. Without <paramref name="fill"/>: pairwise-complete (see remarks of the class),
    /// <paramref name="pairCounts"/> gets n_ij. With it: the complete covariance of the filled data (denominator n − 1).
    /// </summary>
    public static double[] Estimate(SeasonMatrix matrix, int[] train, double[] mean, EmFill? fill, ParallelOptions po, Action<double>? progress, out int[] pairCounts)
    {
        const int d = Layout.Days;
        const int p = Layout.PaddedDays;
        const int br = Layout.BlockRows;
        var chunks = Layout.Chunks(train.Length);
        var memory = matrix.DepthsMemory;
        var usable = new bool[d];
        for (var j = 0; j < d; j++)
        {
            usable[j] = !double.IsNaN(mean[j]);
        }

        var meanD = new double[Layout.PaddedDays];
        var usableBits = new uint[Layout.PaddedDays];
        for (var j = 0; j < d; j++)
        {
            meanD[j] = usable[j] ? mean[j] : 0;
            usableBits[j] = usable[j] ? uint.MaxValue : 0;
        }

        // Chunks are taken in increasing order by the workers and added into the total in chunk order as soon as all
        // earlier ones are in (the same sums, in the same order, as adding every chunk at the end); a chunk's
        // accumulators go back to a pool once added, so only a few exist at a time.
        var s = new double[p * p];
        var n = fill is null ? new int[p * p] : [];
        var pool = new Stack<(double[] Sums, int[] Counts)>();
        var finished = new (double[] Sums, int[] Counts)?[chunks.Length];
        var nextToAdd = 0;
        var nextChunk = -1;
        long done = 0;
        var workers = Math.Min(chunks.Length, po.MaxDegreeOfParallelism > 0 ? po.MaxDegreeOfParallelism : Environment.ProcessorCount);
        Parallel.For(0, workers, po, _ =>
        {
            var block = new float[br * p];
            var masks = new ulong[d * CovarianceKernel.MaskWords];
            var span = memory.Span;
            int c;
            while ((c = Interlocked.Increment(ref nextChunk)) < chunks.Length)
            {
                (double[] Sums, int[] Counts) acc;
                lock (pool)
                {
                    acc = pool.Count > 0 ? pool.Pop() : (new double[p * p], fill is null ? new int[p * p] : []);
                }

                var sums = acc.Sums;
                var counts = fill is null ? acc.Counts : null;
                var inBlock = 0;
                for (var t = chunks[c].Start; t < chunks[c].End; t++)
                {
                    var row = span.Slice(train[t] * d, d);
                    var dst = block.AsSpan(inBlock * p, p);
                    var word = inBlock >> 6;
                    var bitIndex = inBlock & 63;
                    if (fill is null)
                    {
                        FillPairwise(row, dst, masks, word, bitIndex, meanD, usableBits);
                    }
                    else
                    {
                        var bit = 1UL << bitIndex;
                        for (var j = 0; j < d; j++)
                        {
                            var x = row[j];
                            if (!usable[j])
                            {
                                dst[j] = 0f;
                            }
                            else if (!float.IsNaN(x))
                            {
                                dst[j] = (float)(x - mean[j]);
                                masks[(j * CovarianceKernel.MaskWords) + word] |= bit;
                            }
                            else
                            {
                                dst[j] = (float)(fill.Value(t, j) - mean[j]);
                            }
                        }
                    }

                    inBlock++;
                    if (inBlock == br || t == chunks[c].End - 1)
                    {
                        CovarianceKernel.AddProducts(block, inBlock, sums);
                        if (counts is not null)
                        {
                            CovarianceKernel.AddPairCounts(masks, counts);
                        }

                        Array.Clear(masks);
                        var total = Interlocked.Add(ref done, inBlock);
                        progress?.Invoke((double)total / train.Length);
                        inBlock = 0;
                    }
                }

                lock (pool)
                {
                    finished[c] = acc;
                    while (nextToAdd < chunks.Length && finished[nextToAdd] is { } ready)
                    {
                        for (var k = 0; k < s.Length; k++)
                        {
                            s[k] += ready.Sums[k];
                        }

                        if (fill is null)
                        {
                            for (var k = 0; k < n.Length; k++)
                            {
                                n[k] += ready.Counts[k];
                            }
                        }

                        Array.Clear(ready.Sums);
                        Array.Clear(ready.Counts);
                        pool.Push(ready);
                        finished[nextToAdd++] = null;
                    }
                }
            }
        });

        var cov = new double[d * d];
        pairCounts = new int[d * d];
        for (var i = 0; i < d; i++)
        {
            for (var j = i; j < d; j++)
            {
                var count = fill is null ? n[(i * p) + j] : (usable[i] && usable[j] ? train.Length : 0);
                var v = count >= 2 ? s[(i * p) + j] / (count - 1) : 0.0;
                cov[(i * d) + j] = v;
                cov[(j * d) + i] = v;
                pairCounts[(i * d) + j] = count;
                pairCounts[(j * d) + i] = count;
            }
        }

        return cov;
    }
}

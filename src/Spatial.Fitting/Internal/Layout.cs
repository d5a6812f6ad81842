namespace Spatial.Fitting.Internal;

/// <summary>Fixed shapes shared by the kernels.</summary>
internal static class Layout
{
    /// <summary>Days per season.</summary>
    public const int Days = Spatial.Core.SeasonCalendar.DaysPerSeason;

    /// <summary>Days padded to a multiple of 16 floats (the covariance tile width).</summary>
    public const int PaddedDays = 368;

    /// <summary>Rows per covariance block (float accumulation within a block, double across blocks).</summary>
    public const int BlockRows = 256;

    /// <summary>
    /// Rows are cut into at most this many chunks, a partition that depends only on the row count; each chunk is
    /// summed on its own and chunks are added in order, so results do not depend on the thread count.
    /// </summary>
    public const int MaxChunks = 32;

    /// <summary>Fewest rows per chunk.</summary>
    public const int MinChunkRows = 2048;

    /// <summary>Row ranges [start, end) of the deterministic chunks of <paramref name="rows"/> rows.</summary>
    public static (int Start, int End)[] Chunks(int rows)
    {
        var count = Math.Clamp(rows / MinChunkRows, 1, MaxChunks);
        var result = new (int, int)[count];
        for (var c = 0; c < count; c++)
        {
            result[c] = ((int)((long)rows * c / count), (int)((long)rows * (c + 1) / count));
        }

        return result;
    }

    /// <summary>Parallel options bounded by <paramref name="maxThreads"/>.</summary>
    public static ParallelOptions Parallel(int? maxThreads) =>
        new() { MaxDegreeOfParallelism = maxThreads is > 0 ? maxThreads.Value : Environment.ProcessorCount };
}

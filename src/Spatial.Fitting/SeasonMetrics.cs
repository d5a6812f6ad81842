namespace Spatial.Fitting;

/// <summary>
/// Metrics of one season's observed curve. Days are season day indices 0…364; NaN = unknown (gaps make it
/// unknowable, or the season has no snow cover so the metric does not exist).
/// </summary>
/// <param name="OnsetDay">First snow-covered day (depth ≥ threshold); unknown when any earlier day is of unknown state.</param>
/// <param name="MeltoutDay">Last snow-covered day; unknown when any later day is of unknown state.</param>
/// <param name="LongestCoverDays">Longest run of snow-covered days (observed and bridged); unknown when an unknown stretch could make a longer run.</param>
/// <param name="SnowDays">Snow-covered days, observed plus bridged; unknown when any day is of unknown state.</param>
/// <param name="PeakDepthMm">Largest observed depth, mm; unknown when any day is of unknown state or the maximum borders a bridged gap.</param>
/// <param name="PeakDay">Day of <paramref name="PeakDepthMm"/> (first on ties); unknown as it, and when the peak is below the threshold.</param>
/// <param name="CentroidDay">Depth-weighted mean day Σ d·x_d / Σ x_d (bridged days linearly interpolated); unknown when any day is of unknown state or the season has no depth.</param>
public readonly record struct SeasonMetrics(
    double OnsetDay,
    double MeltoutDay,
    double LongestCoverDays,
    double SnowDays,
    double PeakDepthMm,
    double PeakDay,
    double CentroidDay)
{
    /// <summary>Column names of the metrics, in the order of <see cref="ToArray"/>.</summary>
    public static IReadOnlyList<string> Names { get; } =
        ["onset_day", "meltout_day", "longest_cover_days", "snow_days", "peak_depth_mm", "peak_day", "centroid_day"];

    /// <summary>All metrics unknown.</summary>
    public static SeasonMetrics Unknown { get; } = new(double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);

    /// <summary>The metrics in the order of <see cref="Names"/>.</summary>
    public double[] ToArray() => [OnsetDay, MeltoutDay, LongestCoverDays, SnowDays, PeakDepthMm, PeakDay, CentroidDay];

    /// <summary>Metric number <paramref name="index"/> in the order of <see cref="Names"/>.</summary>
    public double this[int index] => index switch
    {
        0 => OnsetDay,
        1 => MeltoutDay,
        2 => LongestCoverDays,
        3 => SnowDays,
        4 => PeakDepthMm,
        5 => PeakDay,
        6 => CentroidDay,
        _ => throw new ArgumentOutOfRangeException(nameof(index), index, "metric index is 0…6"),
    };
}

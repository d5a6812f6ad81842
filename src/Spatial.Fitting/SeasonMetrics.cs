namespace Spatial.Fitting;

/// <summary>
/// Metrics of one season's observed curve. Days are season day indices 0…364; NaN = unknown (gaps make it
/// unknowable, or the season has no snow cover so the metric does not exist).
/// </summary>
/// <remarks>
/// Missing days are bridged (short gap between days of the same state), modelled bare (a gap flanked only by bare
/// days over which the season's own reconstruction stays below the threshold; counted in <see cref="ModelledBareDays"/>),
/// or of unknown state (every other gap, in particular any gap touching cover); see the fitting stage's metric rules.
/// Modelled-bare days count as bare but carry no depth.
/// </remarks>
/// <param name="OnsetDay">First snow-covered day (depth ≥ threshold); unknown when any earlier day is of unknown state.</param>
/// <param name="MeltoutDay">Last snow-covered day; unknown when any later day is of unknown state.</param>
/// <param name="LongestCoverDays">Longest run of snow-covered days (observed and bridged); unknown when an unknown stretch could make a longer run.</param>
/// <param name="SnowDays">Snow-covered days, observed plus bridged; unknown when any day is of unknown state.</param>
/// <param name="PeakDepthMm">Largest observed depth, mm; unknown when that day borders a missing day, or when an unknown-state gap could hold a larger depth: the season's reconstruction somewhere in the gap comes within 2 × the season's RMS misfit (on its observed days) of the observed maximum; without a model, any unknown-state gap.</param>
/// <param name="PeakDay">Day of <paramref name="PeakDepthMm"/> (first on ties); unknown as it, and when the peak is below the threshold.</param>
/// <param name="CentroidDay">Depth-weighted mean day Σ d·x_d / Σ x_d (bridged days linearly interpolated); unknown when any day is of unknown state or the season has no depth; with modelled-bare days (depth anywhere in [0, threshold)) the middle of the centroid's exact range, reported only when that range is at most 1 day.</param>
public readonly record struct SeasonMetrics(
    double OnsetDay,
    double MeltoutDay,
    double LongestCoverDays,
    double SnowDays,
    double PeakDepthMm,
    double PeakDay,
    double CentroidDay)
{
    /// <summary>
    /// Missing days taken as bare by the modelled-bare rule (a gap flanked only by observed bare days, or by the season's
    /// end and a bare day, over which the season's own reconstruction m + Σ c_k v_k stays below the threshold). They count
    /// as bare for every metric but carry no depth. Not a metric (no correlation or station summary); written as the
    /// seasons.csv column <c>modelled_bare_days</c>.
    /// </summary>
    public int ModelledBareDays { get; init; }

    /// <summary>Column names of the metrics, in the order of <see cref="ToArray"/>.</summary>
    public static IReadOnlyList<string> Names { get; } =
        ["onset_day", "meltout_day", "longest_cover_days", "snow_days", "peak_depth_mm", "peak_day", "centroid_day"];

    /// <summary>Number of metrics (<see cref="Names"/>).</summary>
    internal const int Count = 7;

    /// <summary>All metrics unknown.</summary>
    public static SeasonMetrics Unknown { get; } = new(double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);

    /// <summary>The metrics in the order of <see cref="Names"/>.</summary>
    public double[] ToArray()
    {
        var values = new double[Count];
        CopyTo(values);
        return values;
    }

    /// <summary>Writes the metrics in the order of <see cref="Names"/> into <paramref name="destination"/>.</summary>
    internal void CopyTo(Span<double> destination)
    {
        destination[6] = CentroidDay; // the last index first: one bounds check for all seven
        destination[0] = OnsetDay;
        destination[1] = MeltoutDay;
        destination[2] = LongestCoverDays;
        destination[3] = SnowDays;
        destination[4] = PeakDepthMm;
        destination[5] = PeakDay;
    }

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

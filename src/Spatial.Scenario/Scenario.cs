using NetTopologySuite.Geometries;
using Spatial.Core;

namespace Spatial.Scenario;

/// <summary>
/// The generated demo region: DEM, coastline, stations, daily records and ground truth. Everything is invented.
/// </summary>
/// <param name="Options">The options it was generated with.</param>
/// <param name="Dem">Heights in metres, UTM zone 25N (EPSG:32625), 250 m cells, no data over the sea.</param>
/// <param name="Coastline">Land polygons in WGS 84 longitude/latitude (x = longitude), exteriors counter-clockwise; the main island first.</param>
/// <param name="Stations">The stations, ordered by id.</param>
/// <param name="Records">The observed daily depths (with faults) of every station.</param>
/// <param name="Truth">Noise-free ground truth.</param>
public sealed record Scenario(ScenarioOptions Options, RasterGrid Dem, MultiPolygon Coastline, IReadOnlyList<ScenarioStation> Stations, DailyRecords Records, ScenarioTruth Truth);

/// <summary>A station of the demo network with its true place.</summary>
/// <param name="Station">As listed: id, name, WGS 84 position, listed elevation (true elevation + survey error, or a gross error).</param>
/// <param name="ElevationTrueM">True elevation, metres: the DEM interpolated bilinearly between cell centres (the containing cell's value next to the sea).</param>
/// <param name="CoastKm">Distance to the coastline (nearest land-polygon boundary) in UTM zone 25N, km (within 0.05 % of the geodesic distance).</param>
/// <param name="EastingM">UTM zone 25N easting, metres.</param>
/// <param name="NorthingM">UTM zone 25N northing, metres.</param>
/// <param name="WindwardIndex">−1 (deep in the lee, east of the ridge) … +1 (deep on the windward west side).</param>
/// <param name="Faults">The observation faults put into this station's records.</param>
public sealed record ScenarioStation(Station Station, double ElevationTrueM, double CoastKm, double EastingM, double NorthingM, double WindwardIndex, StationFaults Faults);

/// <summary>An inclusive span of calendar days.</summary>
public sealed record DaySpan(DateOnly First, DateOnly Last);

/// <summary>The observation faults of one station.</summary>
/// <param name="ListedElevationErrorM">Listed − true elevation, metres.</param>
/// <param name="GrossElevationError">True when the listed elevation is grossly wrong (hundreds of metres).</param>
/// <param name="SummersUnreported">True when no day of June, July or August is reported.</param>
/// <param name="Sparse">True when only a small fraction of days is reported.</param>
/// <param name="FlatLine">The days on which the sensor repeated one value, or null.</param>
/// <param name="CentimetreSeasons">Seasons whose depths are written in cm although the file says mm.</param>
/// <param name="Outages">Multi-week spans with no report.</param>
/// <param name="SpikeDays">Days whose value is a one-day spike.</param>
/// <param name="MissingDays">Days left out at random (single missing days).</param>
public sealed record StationFaults(
    double ListedElevationErrorM,
    bool GrossElevationError,
    bool SummersUnreported,
    bool Sparse,
    DaySpan? FlatLine,
    IReadOnlyList<int> CentimetreSeasons,
    IReadOnlyList<DaySpan> Outages,
    IReadOnlyList<DateOnly> SpikeDays,
    int MissingDays);

/// <summary>
/// Observed daily depths: for station i (in <see cref="Scenario.Stations"/> order) and day t after
/// <see cref="FirstDate"/>, <c>DepthMm[i][t]</c> is the reported whole-millimetre value, or −1 when not reported.
/// </summary>
/// <param name="FirstDate">The first day (1 September of the first season).</param>
/// <param name="DepthMm">Per station, per day; do not modify.</param>
public sealed record DailyRecords(DateOnly FirstDate, IReadOnlyList<short[]> DepthMm)
{
    /// <summary>Number of days per station.</summary>
    public int Days => DepthMm.Count == 0 ? 0 : DepthMm[0].Length;
}

/// <summary>
/// A set of the season metrics: onset and melt-out season day (0 = 1 September), duration (melt-out − onset + 1, days),
/// longest continuous cover (days), snow days, peak depth (mm), depth-weighted centroid day. NaN where unknown.
/// </summary>
public sealed record SnowMetrics(double OnsetDay, double MeltoutDay, double DurationDays, double LongestCoverDays, double SnowDays, double PeakDepthMm, double CentroidDay)
{
    /// <summary>The metric names as written in files, in property order.</summary>
    public static IReadOnlyList<string> Names { get; } = ["onset_day", "meltout_day", "duration_days", "longest_cover_days", "snow_days", "peak_depth_mm", "centroid_day"];

    /// <summary>The values in <see cref="Names"/> order.</summary>
    public double[] ToArray() => [OnsetDay, MeltoutDay, DurationDays, LongestCoverDays, SnowDays, PeakDepthMm, CentroidDay];

    /// <summary>From values in <see cref="Names"/> order.</summary>
    public static SnowMetrics FromArray(ReadOnlySpan<double> v) => new(v[0], v[1], v[2], v[3], v[4], v[5], v[6]);
}

/// <summary>One season of a station's noise-free snowpack (before any observation fault).</summary>
/// <param name="Season">Season (calendar year in which it starts).</param>
/// <param name="OnsetDay">First day with depth ≥ 25 mm; null without cover.</param>
/// <param name="MeltoutDay">Last day with depth ≥ 25 mm; null without cover.</param>
/// <param name="DurationDays">Melt-out − onset + 1; 0 without cover.</param>
/// <param name="LongestCoverDays">Longest run of days with depth ≥ 25 mm.</param>
/// <param name="SnowDays">Days with depth ≥ 25 mm.</param>
/// <param name="PeakDepthMm">Greatest depth, mm.</param>
/// <param name="PeakDay">First day of the greatest depth; null when it is 0.</param>
/// <param name="CentroidDay">Depth-weighted mean day Σ d·x_d / Σ x_d; null when the season has no depth.</param>
/// <param name="PhaseDays">The region's season phase anomaly of this season, days (+ = the seasonal cycle runs late).</param>
public sealed record SeasonTruth(int Season, int? OnsetDay, int? MeltoutDay, int DurationDays, int LongestCoverDays, int SnowDays, int PeakDepthMm, int? PeakDay, double? CentroidDay, double PhaseDays);

/// <summary>A station's noise-free truth.</summary>
/// <param name="Station">Station id.</param>
/// <param name="Mean">Means over seasons (onset and melt-out over the seasons with cover; NaN when none has).</param>
/// <param name="Median">Medians over the same seasons.</param>
/// <param name="CoverSeasonFraction">Fraction of seasons with at least one covered day.</param>
/// <param name="Seasons">Every season's values.</param>
public sealed record StationTruth(StationId Station, SnowMetrics Mean, SnowMetrics Median, double CoverSeasonFraction, IReadOnlyList<SeasonTruth> Seasons);

/// <summary>
/// An ordinary least-squares fit of a station-mean truth metric on elevation (km), coast distance (per 10 km) and
/// latitude (degrees), over the stations: what a regression with exactly these predictors estimates from perfect data.
/// </summary>
public sealed record OlsEffect(string Response, int Stations, double Intercept, double ElevationKm, double Coast10Km, double LatitudeDeg, double R2);

/// <summary>
/// The region's known effects. Finite-difference effects are averages over stations of central differences of the
/// station-mean metric of the noise-free generator (same random numbers, one input moved): elevation ±100 m, coast
/// distance ±1 km, latitude ±0.05°, and a uniform temperature offset ±0.15 °C (0.3 °C = one decade of the trend).
/// Onset and melt-out differences use the seasons with cover in both runs and the stations with cover in at least
/// half of them (<see cref="TimingStations"/>). <see cref="Ols"/> regresses the station means, <see cref="OlsMedian"/>
/// the station medians (the same stations and predictors): what a regression of station medians recovers from perfect data.
/// </summary>
public sealed record RegionEffects(
    int Stations,
    int TimingStations,
    SnowMetrics PerKmElevation,
    SnowMetrics Per10KmCoast,
    SnowMetrics PerDegreeLatitude,
    SnowMetrics PerDecadeWarming,
    SnowMetrics PerDecadeRealised,
    IReadOnlyList<OlsEffect> Ols,
    IReadOnlyList<OlsEffect> OlsMedian);

/// <summary>All ground truth of a scenario.</summary>
/// <param name="Stations">Per station, in <see cref="Scenario.Stations"/> order.</param>
/// <param name="Effects">The region's effects, or null when not computed.</param>
public sealed record ScenarioTruth(IReadOnlyList<StationTruth> Stations, RegionEffects? Effects);

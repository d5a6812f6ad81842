using Spatial.Core;

namespace Spatial.Records;

/// <summary>Header names of the daily-records columns (matched without regard to case or surrounding spaces).</summary>
/// <param name="Station">Station id column (required).</param>
/// <param name="Date">Date column, ISO 8601 <c>YYYY-MM-DD</c> (required).</param>
/// <param name="Depth">Snow depth column (required); empty = missing day.</param>
/// <param name="Unit">Per-row unit column (optional): mm, cm, m, in; empty = the file-wide unit.</param>
/// <param name="Flag">Quality-flag column (optional).</param>
/// <param name="Element">Measured-element column (optional), for files that hold several elements.</param>
public sealed record RecordColumns(
    string Station = "station",
    string Date = "date",
    string Depth = "depth",
    string Unit = "unit",
    string Flag = "flag",
    string Element = "element");

/// <summary>
/// What <see cref="RecordsImport.Run"/> reads and the thresholds of its quality rules. Defaults follow the
/// project's documented conventions (season from 1 September, 250 observed days, depth above 10 m implausible,
/// a one-day spike of more than 50 cm, a flat line of 30 days: common practice).
/// </summary>
/// <param name="RecordsPath">Daily records (CSV, plain or gzip).</param>
/// <param name="StationsPath">Station list (CSV).</param>
public sealed record ImportOptions(string RecordsPath, string StationsPath)
{
    /// <summary>
    /// Converts station coordinates given in another CRS (the station list's <c>crs</c> column names an EPSG code) to
    /// WGS 84: (EPSG code, x, y) → (longitude, latitude). Null refuses such rows. The command line supplies the
    /// terrain stage's transforms.
    /// </summary>
    public Func<int, double, double, (double Longitude, double Latitude)>? StationCrsToWgs84 { get; init; }

    /// <summary>Season convention (default: seasons start on 1 September).</summary>
    public SeasonCalendar Calendar { get; init; } = SeasonCalendar.Default;

    /// <summary>A season with fewer observed days is kept but marked <c>below_min_days</c> (0…365; default 250).</summary>
    public int MinDays { get; init; } = 250;

    /// <summary>Unit of depths whose row gives none (default millimetres).</summary>
    public DepthUnit Unit { get; init; } = DepthUnit.Millimetre;

    /// <summary>Column names of the records file.</summary>
    public RecordColumns Columns { get; init; } = new();

    /// <summary>
    /// The value of the element column that means snow depth. Null: the usual spellings are accepted
    /// (<see cref="DefaultElementNames"/>). Ignored when the file has no element column.
    /// </summary>
    public string? Element { get; init; }

    /// <summary>Rows whose flag column holds one of these flags (compared without regard to case) are dropped and counted.</summary>
    public IReadOnlyList<string> BadFlags { get; init; } = [];

    /// <summary>A depth above this, in millimetres, is implausible and removed (default 10,000 mm = 10 m; common practice).</summary>
    public double MaxDepthMm { get; init; } = 10_000;

    /// <summary>A day higher than both neighbours by more than this, in millimetres, is an isolated spike and removed (default 500 mm).</summary>
    public double SpikeJumpMm { get; init; } = 500;

    /// <summary>A run of at least this many consecutive observed days with the same non-zero depth is a flat-lined sensor and removed (default 30).</summary>
    public int FlatlineDays { get; init; } = 30;

    /// <summary>
    /// Rows with an unparseable depth are dropped and counted while they are at most this percentage of all rows
    /// (default 1 %); above it the import fails at the first such row, since the column is probably not a depth.
    /// </summary>
    public double MaxUnparseablePercent { get; init; } = 1.0;

    /// <summary>Element spellings accepted as snow depth when <see cref="Element"/> is null.</summary>
    public static IReadOnlyList<string> DefaultElementNames { get; } = ["snow_depth", "snowdepth", "snow depth", "depth", "hs", "sd"];

    /// <summary>Throws <see cref="ArgumentOutOfRangeException"/> when a threshold is out of its range.</summary>
    public void Validate()
    {
        ArgumentException.ThrowIfNullOrEmpty(RecordsPath);
        ArgumentException.ThrowIfNullOrEmpty(StationsPath);
        ArgumentNullException.ThrowIfNull(Calendar);
        ArgumentNullException.ThrowIfNull(Columns);
        ArgumentNullException.ThrowIfNull(BadFlags);
        ArgumentOutOfRangeException.ThrowIfNegative(MinDays);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(MinDays, SeasonCalendar.DaysPerSeason);
        if (!(MaxDepthMm > 0) || !double.IsFinite(MaxDepthMm))
        {
            throw new ArgumentOutOfRangeException(nameof(MaxDepthMm), MaxDepthMm, "must be a positive number of millimetres");
        }

        if (!(SpikeJumpMm > 0) || !double.IsFinite(SpikeJumpMm))
        {
            throw new ArgumentOutOfRangeException(nameof(SpikeJumpMm), SpikeJumpMm, "must be a positive number of millimetres");
        }

        ArgumentOutOfRangeException.ThrowIfLessThan(FlatlineDays, 2);
        if (!(MaxUnparseablePercent >= 0 && MaxUnparseablePercent <= 100))
        {
            throw new ArgumentOutOfRangeException(nameof(MaxUnparseablePercent), MaxUnparseablePercent, "must be 0…100");
        }
    }
}

using Spatial.Core;

namespace Spatial.Records;

/// <summary>The reasons a daily row is removed on import. Each is counted in the <see cref="QualityReport"/>.</summary>
public enum QualityRule
{
    /// <summary>The depth is not a number (dropped while rare; see <see cref="ImportOptions.MaxUnparseablePercent"/>).</summary>
    UnparseableDepth,

    /// <summary>The depth is below zero.</summary>
    NegativeDepth,

    /// <summary>The depth is above <see cref="ImportOptions.MaxDepthMm"/>.</summary>
    ImplausibleDepth,

    /// <summary>The flag column holds one of <see cref="ImportOptions.BadFlags"/>.</summary>
    Flagged,

    /// <summary>The date is 29 February, which the season convention drops.</summary>
    LeapDay,

    /// <summary>The station is not in the station list.</summary>
    UnknownStation,

    /// <summary>The station has two or more different depths for the day: all of its rows are dropped and the day is reported.</summary>
    DuplicateConflict,

    /// <summary>A day higher than both neighbours by more than <see cref="ImportOptions.SpikeJumpMm"/>.</summary>
    Spike,

    /// <summary>A run of at least <see cref="ImportOptions.FlatlineDays"/> consecutive observed days with one non-zero depth.</summary>
    Flatline,
}

/// <summary>One reported event of a quality rule (for the first few of each kind).</summary>
/// <param name="Rule">The rule.</param>
/// <param name="Station">The station.</param>
/// <param name="Date">The day (first day of a run).</param>
/// <param name="Days">Days affected (1 except for a flat line).</param>
/// <param name="Detail">What was seen, e.g. the conflicting values in millimetres.</param>
public sealed record QualityEvent(QualityRule Rule, StationId Station, DateOnly Date, int Days, string Detail);

/// <summary>Per-station counts.</summary>
/// <param name="Station">The station.</param>
/// <param name="Seasons">Seasons in the matrix.</param>
/// <param name="SeasonsBelowMinDays">Of which below the minimum observed days.</param>
/// <param name="RowsKept">Days with a depth in the matrix.</param>
/// <param name="Removed">Rows removed, indexed by <see cref="QualityRule"/> (the unknown-station rule is always 0 here).</param>
public sealed record StationQuality(StationId Station, int Seasons, int SeasonsBelowMinDays, long RowsKept, IReadOnlyList<long> Removed);

/// <summary>
/// What an import read, kept and removed. Every data row is counted once:
/// <c>RowsRead = RowsKept + DuplicatesMerged + EmptyDepth + OtherElement + Σ Removed</c>.
/// </summary>
/// <param name="RecordsFile">The records file as given.</param>
/// <param name="StationsFile">The station list as given.</param>
/// <param name="Options">The options of the run.</param>
/// <param name="StationsListed">Stations in the list.</param>
/// <param name="Stations">Stations with at least one season in the matrix.</param>
/// <param name="Seasons">Station-seasons in the matrix.</param>
/// <param name="SeasonsBelowMinDays">Of which below <see cref="ImportOptions.MinDays"/> observed days.</param>
/// <param name="RowsRead">Data rows in the file (the header and blank lines not counted).</param>
/// <param name="RowsKept">Rows whose depth is in the matrix.</param>
/// <param name="DuplicatesMerged">Extra rows repeating a station-day with the same depth (merged into one).</param>
/// <param name="EmptyDepth">Rows with an empty (or NA) depth: missing days, not errors.</param>
/// <param name="OtherElement">Rows of another measured element (skipped).</param>
/// <param name="Removed">Rows removed, indexed by <see cref="QualityRule"/>.</param>
/// <param name="ConflictingDays">Station-days dropped because their rows disagree.</param>
/// <param name="UnknownStations">Station ids of the records that are missing from the list, with their row counts (ordinal order).</param>
/// <param name="PerStation">Counts per listed station with data (ordinal order).</param>
/// <param name="Events">The first events of each rule, for people to check.</param>
/// <param name="Warnings">Located warnings (from the station list and the records).</param>
public sealed record QualityReport(
    string RecordsFile,
    string StationsFile,
    ImportOptions Options,
    int StationsListed,
    int Stations,
    int Seasons,
    int SeasonsBelowMinDays,
    long RowsRead,
    long RowsKept,
    long DuplicatesMerged,
    long EmptyDepth,
    long OtherElement,
    IReadOnlyList<long> Removed,
    long ConflictingDays,
    IReadOnlyList<KeyValuePair<string, long>> UnknownStations,
    IReadOnlyList<StationQuality> PerStation,
    IReadOnlyList<QualityEvent> Events,
    IReadOnlyList<Diagnostic> Warnings)
{
    /// <summary>Rows removed by <paramref name="rule"/>.</summary>
    public long RemovedBy(QualityRule rule) => Removed[(int)rule];

    /// <summary>The report as written to <c>quality.json</c> (indented JSON, invariant numbers).</summary>
    public string ToJson() => Import.QualityFiles.Json(this);

    /// <summary>The report as written to <c>quality.txt</c> (a short table for people).</summary>
    public string ToText() => Import.QualityFiles.Text(this);

    /// <summary>Rows removed by all rules.</summary>
    public long RemovedTotal => Removed.Sum();

    /// <summary>The snake-case name of a rule as written in <c>quality.json</c>.</summary>
    public static string RuleName(QualityRule rule) => rule switch
    {
        QualityRule.UnparseableDepth => "unparseable_depth",
        QualityRule.NegativeDepth => "negative_depth",
        QualityRule.ImplausibleDepth => "implausible_depth",
        QualityRule.Flagged => "flagged",
        QualityRule.LeapDay => "leap_day",
        QualityRule.UnknownStation => "unknown_station",
        QualityRule.DuplicateConflict => "duplicate_conflict",
        QualityRule.Spike => "spike",
        QualityRule.Flatline => "flatline",
        _ => throw new ArgumentOutOfRangeException(nameof(rule), rule, "unknown rule"),
    };
}

/// <summary>The result of <see cref="RecordsImport.Run"/>.</summary>
/// <param name="Matrix">The season matrix (millimetres, NaN for missing).</param>
/// <param name="Stations">The station list as read.</param>
/// <param name="Quality">What was read, kept and removed.</param>
public sealed record ImportResult(SeasonMatrix Matrix, StationList Stations, QualityReport Quality);

using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Records.Csv;
using Spatial.Records.Import;

namespace Spatial.Records;

/// <summary>
/// The records stage: daily snow-depth rows (CSV, plain or gzip) and a station list → a season matrix and a
/// quality report. One streaming pass; memory is bounded by the matrix (one 365-day row per station-season),
/// never by the text.
/// </summary>
public static class RecordsImport
{
    /// <summary>
    /// Reads the station list and the daily records of <paramref name="options"/> and assembles the season matrix.
    /// Depths are converted to millimetres (1 in = 25.4 mm exactly, NIST SP 811); a missing or removed day is NaN;
    /// nothing is filled in. Throws <see cref="SpatialDataException"/> (file and line) for input that cannot be
    /// read, and <see cref="ArgumentOutOfRangeException"/> for an option out of range. Writes nothing.
    /// </summary>
    /// <param name="options">Files, column names, season convention and rule thresholds.</param>
    /// <param name="progress">Receives the share of the records file read (0…1), from the reading thread.</param>
    /// <param name="cancel">Stops the run (checked every 65,536 rows).</param>
    public static ImportResult Run(ImportOptions options, IProgress<double>? progress = null, CancellationToken cancel = default)
    {
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        var stations = StationListFile.Read(options.StationsPath, options.StationCrsToWgs84);
        using var csv = CsvRecordReader.Open(options.RecordsPath);
        return new ImportRun(options, stations, csv).Run(progress, cancel);
    }

    /// <summary>
    /// Writes <paramref name="result"/> into <paramref name="folder"/>: <c>matrix.parquet</c>, <c>station_list.csv</c>,
    /// <c>quality.json</c> and <c>quality.txt</c> (names from <see cref="ResultLayout"/>), each atomically.
    /// </summary>
    public static void WriteResults(string folder, ImportResult result)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        ArgumentNullException.ThrowIfNull(result);
        Directory.CreateDirectory(folder);
        SeasonMatrixFile.Write(Path.Combine(folder, ResultLayout.SeasonMatrix), result.Matrix);
        StationListFile.Write(Path.Combine(folder, ResultLayout.StationList), result.Stations.Stations);
        QualityFiles.WriteJson(Path.Combine(folder, ResultLayout.QualityJson), result.Quality);
        AtomicFile.WriteAllText(Path.Combine(folder, ResultLayout.QualityText), QualityFiles.Text(result.Quality));
    }
}

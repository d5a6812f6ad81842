using Spatial.Core;
using Spatial.Records;

namespace Spatial.Benchmarks;

/// <summary>
/// Season-matrix file speed: write and read of a generated matrix (default 200,000 station-seasons, 20 % missing
/// days) beside a bare read of the same file's bytes in the same run.
/// </summary>
public sealed class MatrixFileBenchmark : IBenchmark
{
    /// <inheritdoc />
    public string Name => "matrix-file";

    /// <inheritdoc />
    public string Description => "matrix.parquet write/read of N station-seasons (default 200000) vs a bare read of its bytes";

    /// <inheritdoc />
    public void Run(BenchReport report, string[] args)
    {
        var rows = args.Length > 0 ? int.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 200_000;
        var folder = Path.Combine(Path.GetTempPath(), $"spatial-bench-matrix-{Environment.ProcessId}");
        Directory.CreateDirectory(folder);
        try
        {
            var matrix = Generate(rows, seed: 17);
            var path = Path.Combine(folder, "matrix.parquet");
            var write = BenchReport.BestSeconds(2, () => SeasonMatrixFile.Write(path, matrix));
            var bytes = new FileInfo(path).Length;
            var bare = BenchReport.BestSeconds(3, () => File.ReadAllBytes(path));
            SeasonMatrix? back = null;
            var read = BenchReport.BestSeconds(3, () => back = SeasonMatrixFile.Read(path));
            if (back!.Rows != rows)
            {
                throw new InvalidOperationException("read back a different number of rows");
            }

            report.Figure("station-seasons", rows, "rows");
            report.Figure("file size", bytes / 1e6, "MB");
            report.Figure("write", write, "s");
            report.Figure("read (SeasonMatrixFile.Read)", read, "s");
            report.Figure("read rate", rows / read, "rows/s");
            report.Figure("baseline: bare read of the file's bytes", bare, "s");
            report.Figure("read / bare read", read / bare, "×");
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    private static SeasonMatrix Generate(int rows, int seed)
    {
        var rng = new Random(seed);
        var keys = new SeasonKey[rows];
        var depths = new float[(long)rows * SeasonCalendar.DaysPerSeason];
        const int seasonsPerStation = 50;
        for (var i = 0; i < rows; i++)
        {
            var observed = 0;
            for (var d = 0; d < SeasonCalendar.DaysPerSeason; d++)
            {
                // Integer millimetres as the demo writes them, a fifth of the days missing.
                var v = rng.NextDouble() < 0.2 ? float.NaN : rng.Next(0, 2500);
                depths[((long)i * SeasonCalendar.DaysPerSeason) + d] = v;
                observed += float.IsNaN(v) ? 0 : 1;
            }

            keys[i] = new SeasonKey(new StationId($"S{i / seasonsPerStation:000000}"), 1950 + (i % seasonsPerStation), observed, observed < 250);
        }

        return new SeasonMatrix(SeasonCalendar.Default, keys, depths);
    }
}

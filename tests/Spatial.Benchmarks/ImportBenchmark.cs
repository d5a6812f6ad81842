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

/// <summary>
/// Import throughput on a generated daily-records file (<c>station,date,depth</c>, integer mm, missing days as
/// absent rows; default 20 million rows, written to the temp folder and deleted afterwards), reported beside a
/// bare line-by-line read of the same file in the same run, for the plain and the gzip file; plus the tokenizer
/// alone and CsvHelper 34's reader on the same bytes.
/// </summary>
public sealed class ImportBenchmark : IBenchmark
{
    /// <inheritdoc />
    public string Name => "import";

    /// <inheritdoc />
    public string Description => "spatial import rows/s on a generated N-row file (default 20000000) vs a bare line-by-line read; CsvHelper vs span reader";

    /// <inheritdoc />
    public void Run(BenchReport report, string[] args)
    {
        var rows = args.Length > 0 ? long.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 20_000_000;
        var folder = Path.Combine(Path.GetTempPath(), $"spatial-bench-import-{Environment.ProcessId}");
        Directory.CreateDirectory(folder);
        try
        {
            var csv = Path.Combine(folder, "records.csv");
            var gz = csv + ".gz";
            var stationsPath = Path.Combine(folder, "stations.csv");
            var sw = System.Diagnostics.Stopwatch.StartNew();
            var (written, stationCount) = DailyRecordsGenerator.Write(csv, gz, stationsPath, rows, seed: 2024);
            report.Line(FormattableString.Invariant($"  generated {written} rows for {stationCount} stations in {sw.Elapsed.TotalSeconds:0.0} s: {new FileInfo(csv).Length / 1e6:0} MB plain, {new FileInfo(gz).Length / 1e6:0} MB gzip"));

            foreach (var (label, path) in new[] { ("plain", csv), ("gzip", gz) })
            {
                var bare = BenchReport.BestSeconds(2, () => BareLineCount(path));
                var tokens = BenchReport.BestSeconds(2, () => SpanTokenize(path));
                var helper = BenchReport.BestSeconds(2, () => CsvHelperTokenize(path));
                ImportResult? result = null;
                var import = BenchReport.BestSeconds(2, () => result = RecordsImport.Run(new ImportOptions(path, stationsPath)));
                if (result!.Quality.RowsRead != written)
                {
                    throw new InvalidOperationException($"import read {result.Quality.RowsRead} rows; the file has {written}");
                }

                report.Line($"  -- {label} file");
                report.Figure($"baseline: bare line-by-line read (StreamReader.ReadLine)", bare, "s");
                report.Figure("tokenize only: our span reader (SpanCsvReader)", tokens, "s");
                report.Figure("tokenize only: CsvHelper 34 (CsvRecordReader, line numbers on)", helper, "s");
                report.Figure("full import (RecordsImport.Run)", import, "s");
                report.Figure("import throughput", written / import, "rows/s");
                report.Figure("import / bare read", import / bare, "×");
                report.Figure("CsvHelper tokenize / span tokenize", helper / tokens, "×");
            }

            GC.Collect();
            report.Figure("peak working set of the process", Environment.WorkingSet / 1e6, "MB (now)");
            report.Figure("peak working set of the process (max)", System.Diagnostics.Process.GetCurrentProcess().PeakWorkingSet64 / 1e6, "MB");
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    private static Stream Open(string path)
    {
        var file = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan);
        return path.EndsWith(".gz", StringComparison.Ordinal) ? new System.IO.Compression.GZipStream(file, System.IO.Compression.CompressionMode.Decompress) : file;
    }

    private static long BareLineCount(string path)
    {
        using var reader = new StreamReader(Open(path), System.Text.Encoding.UTF8, true, 1 << 16);
        long n = 0;
        while (reader.ReadLine() is not null)
        {
            n++;
        }

        return n;
    }

    private static long SpanTokenize(string path)
    {
        using var reader = Spatial.Records.Csv.SpanCsvReader.Open(path);
        long sum = 0;
        while (reader.Read())
        {
            sum += reader.Field(reader.FieldCount - 1).Length;
        }

        return sum;
    }

    private static long CsvHelperTokenize(string path)
    {
        // The import's reader: CsvHelper 34 with line numbers, strict quoting and the record-size guard.
        using var reader = Spatial.Records.Csv.CsvRecordReader.Open(path);
        long sum = 0;
        while (reader.Read())
        {
            sum += reader.Field(reader.FieldCount - 1).Length;
        }

        return sum;
    }
}

/// <summary>Writes a synthetic daily-records file like the demo's: station,date,depth with integer mm, absent rows for missing days.</summary>
internal static class DailyRecordsGenerator
{
    public static (long Rows, int Stations) Write(string csvPath, string gzPath, string stationsPath, long targetRows, int seed)
    {
        const int years = 60;
        var stations = (int)Math.Max(1, Math.Ceiling(targetRows / (years * 365.0 * 0.9)));
        using (var st = new StreamWriter(stationsPath))
        {
            st.Write("station,name,longitude,latitude,elevation_m\n");
            for (var s = 0; s < stations; s++)
            {
                st.Write(FormattableString.Invariant($"MF{s:00000},Station {s},{-6 + (s % 100) * 0.01},{57 + (s / 100) * 0.01},{100 + s % 900}\n"));
            }
        }

        var rng = new Random(seed);
        long written = 0;
        using var plain = new FileStream(csvPath, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 20);
        using var gzFile = new FileStream(gzPath, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 20);
        using var gz = new System.IO.Compression.GZipStream(gzFile, System.IO.Compression.CompressionLevel.Fastest);
        var line = new byte[64];
        var header = "station,date,depth\n"u8.ToArray();
        plain.Write(header);
        gz.Write(header);
        var buffer = new MemoryStream(1 << 20);
        for (var s = 0; s < stations && written < targetRows; s++)
        {
            var day = new DateOnly(1960, 9, 1);
            var end = day.AddYears(years);
            var id = System.Text.Encoding.ASCII.GetBytes(FormattableString.Invariant($"MF{s:00000},"));
            for (; day < end && written < targetRows; day = day.AddDays(1))
            {
                if (rng.NextDouble() < 0.1)
                {
                    continue;
                }

                // A seasonal curve peaking in February, with noise; zero in summer.
                var doy = day.DayOfYear;
                var phase = Math.Cos((doy - 45) / 365.0 * 2 * Math.PI);
                var depth = Math.Max(0, (int)((phase - 0.2) * 900 + rng.Next(-40, 40)));
                var n = 0;
                id.CopyTo(line, 0);
                n += id.Length;
                day.TryFormat(line.AsSpan(n), out var w, "yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture);
                n += w;
                line[n++] = (byte)',';
                depth.TryFormat(line.AsSpan(n), out w, default, System.Globalization.CultureInfo.InvariantCulture);
                n += w;
                line[n++] = (byte)'\n';
                buffer.Write(line, 0, n);
                written++;
                if (buffer.Length > (1 << 20) - 64)
                {
                    plain.Write(buffer.GetBuffer(), 0, (int)buffer.Length);
                    gz.Write(buffer.GetBuffer(), 0, (int)buffer.Length);
                    buffer.SetLength(0);
                }
            }
        }

        plain.Write(buffer.GetBuffer(), 0, (int)buffer.Length);
        gz.Write(buffer.GetBuffer(), 0, (int)buffer.Length);
        return (written, stations);
    }
}

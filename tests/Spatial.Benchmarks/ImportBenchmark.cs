using System.Buffers;
using System.IO.Compression;
using System.Text;
using Spatial.Core;
using Spatial.Records;
using Spatial.Records.Csv;

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
        using var reader = SpanCsvReader.Open(path);
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

/// <summary>
/// Memory of a large import: a generated plain file of N rows (default 100 million, about 2.2 GB, written to the
/// temp folder and deleted afterwards) is imported once; the peak working set is reported beside the file size and
/// the size of the season matrix (the bound the import is designed to keep).
/// </summary>
public sealed class ImportMemoryBenchmark : IBenchmark
{
    /// <inheritdoc />
    public string Name => "import-memory";

    /// <inheritdoc />
    public string Description => "peak memory of importing a generated N-row file (default 100000000) vs the file and matrix sizes";

    /// <inheritdoc />
    public void Run(BenchReport report, string[] args)
    {
        var rows = args.Length > 0 ? long.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 100_000_000;
        var folder = Path.Combine(Path.GetTempPath(), $"spatial-bench-memory-{Environment.ProcessId}");
        Directory.CreateDirectory(folder);
        try
        {
            var csv = Path.Combine(folder, "records.csv");
            var stationsPath = Path.Combine(folder, "stations.csv");
            var (written, _) = DailyRecordsGenerator.Write(csv, null, stationsPath, rows, seed: 7);
            GC.Collect();
            var before = System.Diagnostics.Process.GetCurrentProcess().PeakWorkingSet64;
            ImportResult? result = null;
            var seconds = BenchReport.BestSeconds(1, () => result = RecordsImport.Run(new ImportOptions(csv, stationsPath)));
            var peak = System.Diagnostics.Process.GetCurrentProcess().PeakWorkingSet64;
            report.Figure("rows", written, "rows");
            report.Figure("file size", new FileInfo(csv).Length / 1e6, "MB");
            report.Figure("import time", seconds, "s");
            report.Figure("import throughput", written / seconds, "rows/s");
            report.Figure("season matrix (station-seasons × 365 × 4 bytes)", result!.Matrix.Rows * 365.0 * 4 / 1e6, "MB");
            report.Figure("peak working set before the import (generator)", before / 1e6, "MB");
            report.Figure("peak working set after the import", peak / 1e6, "MB");
            report.Figure("peak working set / matrix size", peak / (result.Matrix.Rows * 365.0 * 4), "×");
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }
}

/// <summary>Writes a synthetic daily-records file like the demo's: station,date,depth with integer mm, absent rows for missing days.</summary>
internal static class DailyRecordsGenerator
{
    public static (long Rows, int Stations) Write(string csvPath, string? gzPath, string stationsPath, long targetRows, int seed)
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
        using var gz = gzPath is null ? Stream.Null : new GZipStream(new FileStream(gzPath, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 20), CompressionLevel.Fastest);
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

/// <summary>
/// The alternative measured against CsvHelper in <see cref="ImportBenchmark"/>: our own streaming CSV tokenizer over UTF-8 bytes (RFC 4180 quoting, comma, semicolon or tab detected from the
/// header line). Holds at most one record in memory (bounded by <see cref="MaxRecordBytes"/>). Skips a UTF-8
/// byte-order mark, accepts LF and CRLF line ends, skips blank lines. Every failure is a located
/// <see cref="SpatialDataException"/> naming the file and the line on which the record starts.
/// </summary>
/// <remarks>
/// Lines without a quote are split on the fast path (a vectorised search for the line end, then for the
/// delimiter); a line holding a quote is parsed by a small state machine that copies unescaped bytes aside.
/// </remarks>
public sealed class SpanCsvReader : IDisposable
{
    /// <summary>Longest record accepted, in bytes (1 MiB).</summary>
    public const int MaxRecordBytes = 1 << 20;

    private static readonly SearchValues<byte> LineSpecial = SearchValues.Create("\n\"\0"u8);

    private readonly Stream stream;
    private readonly FileStream? file;
    private readonly byte[] buffer = new byte[2 * MaxRecordBytes];
    private byte[] scratch = new byte[4096];
    private int[] fieldStart = new int[16];
    private int[] fieldLength = new int[16];
    private int start;
    private int end;
    private bool eof;
    private bool begun;
    private long linesConsumed;
    private byte[] backing;

    /// <summary>Reads CSV from <paramref name="stream"/>; <paramref name="fileName"/> names it in messages. Takes ownership of the stream.</summary>
    public SpanCsvReader(Stream stream, string fileName, FileStream? file = null)
    {
        this.stream = stream;
        this.file = file;
        FileName = fileName;
        backing = buffer;
    }

    /// <summary>The file name used in messages.</summary>
    public string FileName { get; }

    /// <summary>The delimiter (detected on the first record).</summary>
    public byte Delimiter { get; private set; } = (byte)',';

    /// <summary>1-based line on which the current record starts.</summary>
    public long Line { get; private set; }

    /// <summary>Fields in the current record.</summary>
    public int FieldCount { get; private set; }

    /// <summary>Share of the file read so far (0…1), from the position in the (possibly compressed) file; 0 when unknown.</summary>
    public double Fraction => file is { Length: > 0 } f ? Math.Clamp((double)f.Position / f.Length, 0, 1) : 0;

    /// <summary>Bytes of the (decompressed) text consumed so far.</summary>
    public long BytesConsumed { get; private set; }

    /// <summary>Opens <paramref name="path"/> for reading: gzip is recognised by its magic bytes (whatever the extension).</summary>
    public static SpanCsvReader Open(string path, string? displayName = null)
    {
        var name = displayName ?? path;
        var file = CsvRecordReader.OpenFile(path, name);
        Stream s = CsvRecordReader.IsGzip(file) ? new GZipStream(new BufferedStream(file, 1 << 16), CompressionMode.Decompress) : file;
        return new SpanCsvReader(s, name, file);
    }

    /// <summary>The bytes of field <paramref name="index"/> of the current record (unescaped, not trimmed).</summary>
    public ReadOnlySpan<byte> Field(int index) => backing.AsSpan(fieldStart[index], fieldLength[index]);

    /// <summary>Field <paramref name="index"/> as a string (UTF-8, trimmed); throws a located error on invalid UTF-8.</summary>
    public string FieldString(int index)
    {
        var bytes = Field(index);
        if (!System.Text.Unicode.Utf8.IsValid(bytes))
        {
            throw Error("the text is not valid UTF-8", "save the file as UTF-8", index);
        }

        return Encoding.UTF8.GetString(bytes).Trim();
    }

    /// <summary>A located error at the current record (and field, 0-based, when given).</summary>
    public SpatialDataException Error(string message, string hint, int field = -1) =>
        new(FileName, Line, field >= 0 ? $"column {field + 1}: {message}" : message, hint);

    /// <summary>Reads the next non-blank record. Returns false at the end of the file.</summary>
    public bool Read()
    {
        if (!begun)
        {
            Begin();
        }

        while (true)
        {
            Line = linesConsumed + 1;
            if (start == end && !Fill())
            {
                return false;
            }

            var rel = buffer.AsSpan(start, end - start).IndexOfAny(LineSpecial);
            if (rel < 0)
            {
                if (end - start > MaxRecordBytes)
                {
                    throw TooLong();
                }

                if (Fill())
                {
                    continue;
                }

                // Last line without a line end.
                rel = end - start;
                if (SplitFast(start, rel))
                {
                    Consume(rel, 0);
                    return true;
                }

                Consume(rel, 0);
                continue;
            }

            var b = buffer[start + rel];
            if (b == (byte)'\n')
            {
                if (rel > MaxRecordBytes)
                {
                    throw TooLong();
                }

                var isRecord = SplitFast(start, rel);
                Consume(rel, 1);
                if (isRecord)
                {
                    return true;
                }

                continue;
            }

            if (b == 0)
            {
                throw new SpatialDataException(FileName, Line, "binary data (a NUL byte) where text was expected", "give a plain-text CSV file (UTF-8), optionally gzip-compressed");
            }

            if (ReadQuoted())
            {
                return true;
            }
        }
    }

    /// <inheritdoc />
    public void Dispose() => stream.Dispose();

    private SpatialDataException TooLong() =>
        new(FileName, Line, $"line is longer than {MaxRecordBytes / (1 << 20)} MiB", "check that this is a CSV file with one record per line");

    private void Begin()
    {
        begun = true;
        while (!eof && end < 4)
        {
            RawFill();
        }

        var head = buffer.AsSpan(0, end);
        if (head.StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF]))
        {
            start = 3;
        }
        else if (head.StartsWith((ReadOnlySpan<byte>)[0xFF, 0xFE]) || head.StartsWith((ReadOnlySpan<byte>)[0xFE, 0xFF]))
        {
            throw new SpatialDataException(FileName, 1, "the file is UTF-16 text", "save it as UTF-8");
        }

        // Detect the delimiter from the first non-blank line (outside quotes).
        var pos = start;
        while (true)
        {
            var nl = buffer.AsSpan(pos, end - pos).IndexOf((byte)'\n');
            if (nl < 0)
            {
                if (eof || end - start >= MaxRecordBytes)
                {
                    nl = end - pos;
                }
                else
                {
                    var before = start;
                    RawFill();
                    pos -= before - start;
                    continue;
                }
            }

            var line = buffer.AsSpan(pos, nl);
            if (IsBlank(line) && pos + nl < end)
            {
                pos += nl + 1;
                continue;
            }

            Delimiter = DetectDelimiter(line);
            break;
        }
    }

    private static byte DetectDelimiter(ReadOnlySpan<byte> line)
    {
        int comma = 0, semi = 0, tab = 0;
        var quoted = false;
        foreach (var c in line)
        {
            if (c == (byte)'"')
            {
                quoted = !quoted;
            }
            else if (!quoted)
            {
                if (c == (byte)',')
                {
                    comma++;
                }
                else if (c == (byte)';')
                {
                    semi++;
                }
                else if (c == (byte)'\t')
                {
                    tab++;
                }
            }
        }

        if (semi > comma && semi >= tab)
        {
            return (byte)';';
        }

        if (tab > comma && tab > semi)
        {
            return (byte)'\t';
        }

        return (byte)',';
    }

    private static bool IsBlank(ReadOnlySpan<byte> line)
    {
        foreach (var c in line)
        {
            if (c is not ((byte)' ' or (byte)'\r'))
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>Moves unread bytes to the front and reads more. Returns false when nothing more could be read.</summary>
    private bool Fill()
    {
        if (eof)
        {
            return false;
        }

        var before = end - start;
        RawFill();
        return end - start > before;
    }

    private void RawFill()
    {
        if (start > 0)
        {
            Buffer.BlockCopy(buffer, start, buffer, 0, end - start);
            end -= start;
            start = 0;
        }

        while (end < buffer.Length)
        {
            int n;
            try
            {
                n = stream.Read(buffer, end, buffer.Length - end);
            }
            catch (InvalidDataException e)
            {
                throw new SpatialDataException(FileName, linesConsumed + 1, $"the compressed data are damaged ({e.Message})", "download or compress the file again");
            }
            catch (IOException e)
            {
                throw new SpatialDataException(FileName, linesConsumed + 1, $"cannot read the file ({e.Message})", "check the file");
            }

            if (n == 0)
            {
                eof = true;
                return;
            }

            end += n;
            if (end - start >= MaxRecordBytes + 1)
            {
                return;
            }
        }
    }

    private void Consume(int length, int lineEnd)
    {
        start += length + lineEnd;
        BytesConsumed += length + lineEnd;
        linesConsumed++;
    }

    /// <summary>Splits an unquoted line. Returns false for a blank line.</summary>
    private bool SplitFast(int lineStart, int length)
    {
        if (length > 0 && buffer[lineStart + length - 1] == (byte)'\r')
        {
            length--;
        }

        var line = buffer.AsSpan(lineStart, length);
        if (length == 0 || (line[0] == (byte)' ' && IsBlank(line)))
        {
            return false;
        }

        backing = buffer;
        var count = 0;
        var pos = 0;
        while (true)
        {
            var d = line[pos..].IndexOf(Delimiter);
            if (count == fieldStart.Length)
            {
                Grow();
            }

            fieldStart[count] = lineStart + pos;
            if (d < 0)
            {
                fieldLength[count] = length - pos;
                count++;
                break;
            }

            fieldLength[count] = d;
            count++;
            pos += d + 1;
        }

        FieldCount = count;
        return true;
    }

    private void Grow()
    {
        Array.Resize(ref fieldStart, fieldStart.Length * 2);
        Array.Resize(ref fieldLength, fieldLength.Length * 2);
    }

    private enum State
    {
        FieldStart,
        Unquoted,
        Quoted,
        AfterQuote,
    }

    /// <summary>Parses a record holding quotes (which may span lines). Returns false for a blank line.</summary>
    private bool ReadQuoted()
    {
        var state = State.FieldStart;
        var outLen = 0;
        var count = 0;
        var fieldBegin = 0;
        var k = 0;
        var lines = 1L;
        var lastWasQuoted = false;
        while (true)
        {
            if (start + k >= end)
            {
                if (k > MaxRecordBytes)
                {
                    throw TooLong();
                }

                if (!Fill())
                {
                    if (state == State.Quoted)
                    {
                        throw new SpatialDataException(FileName, Line, "a quoted field is not closed before the end of the file", "close the quote (\"), or double a quote that belongs to the text (\"\")");
                    }

                    break;
                }

                continue;
            }

            if (k > MaxRecordBytes)
            {
                throw TooLong();
            }

            var c = buffer[start + k];
            k++;
            if (c == 0)
            {
                throw new SpatialDataException(FileName, Line + lines - 1, "binary data (a NUL byte) where text was expected", "give a plain-text CSV file (UTF-8), optionally gzip-compressed");
            }

            switch (state)
            {
                case State.FieldStart:
                    if (c == (byte)'"')
                    {
                        state = State.Quoted;
                        lastWasQuoted = true;
                    }
                    else if (c == Delimiter)
                    {
                        EmitField(ref count, fieldBegin, outLen, false);
                        fieldBegin = outLen;
                    }
                    else if (c == (byte)'\n')
                    {
                        goto done;
                    }
                    else
                    {
                        Append(ref outLen, c);
                        state = State.Unquoted;
                        lastWasQuoted = false;
                    }

                    break;
                case State.Unquoted:
                    if (c == Delimiter)
                    {
                        EmitField(ref count, fieldBegin, outLen, true);
                        fieldBegin = outLen;
                        state = State.FieldStart;
                    }
                    else if (c == (byte)'\n')
                    {
                        goto done;
                    }
                    else
                    {
                        Append(ref outLen, c);
                    }

                    break;
                case State.Quoted:
                    if (c == (byte)'"')
                    {
                        state = State.AfterQuote;
                    }
                    else
                    {
                        if (c == (byte)'\n')
                        {
                            lines++;
                        }

                        Append(ref outLen, c);
                    }

                    break;
                case State.AfterQuote:
                    if (c == (byte)'"')
                    {
                        Append(ref outLen, c);
                        state = State.Quoted;
                    }
                    else if (c == Delimiter)
                    {
                        EmitField(ref count, fieldBegin, outLen, false);
                        fieldBegin = outLen;
                        state = State.FieldStart;
                    }
                    else if (c == (byte)'\n')
                    {
                        goto done;
                    }
                    else if (c is not ((byte)'\r' or (byte)' '))
                    {
                        throw new SpatialDataException(FileName, Line, $"column {count + 1}: unexpected character '{(char)c}' after a closing quote", "quote the whole field, and double any quote inside it (\"\")");
                    }

                    break;
            }
        }

    done:
        // The record ends here (k bytes consumed including the line end, if any).
        var hadFields = count > 0 || outLen > 0 || lastWasQuoted || state != State.FieldStart;
        EmitField(ref count, fieldBegin, outLen, state == State.Unquoted);
        start += k;
        BytesConsumed += k;
        linesConsumed += lines;
        backing = scratch;
        FieldCount = count;
        return hadFields;
    }

    private void Append(ref int outLen, byte c)
    {
        if (outLen == scratch.Length)
        {
            Array.Resize(ref scratch, scratch.Length * 2);
        }

        scratch[outLen++] = c;
    }

    private void EmitField(ref int count, int begin, int outLen, bool unquoted)
    {
        var len = outLen - begin;
        if (unquoted && len > 0 && scratch[begin + len - 1] == (byte)'\r')
        {
            len--;
        }

        if (count == fieldStart.Length)
        {
            Grow();
        }

        fieldStart[count] = begin;
        fieldLength[count] = len;
        count++;
    }
}

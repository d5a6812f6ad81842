using System.Globalization;
using System.Runtime.CompilerServices;
using System.Runtime.ExceptionServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using Microsoft.Win32.SafeHandles;
using Parquet;
using Parquet.Schema;
using Spatial.Core;
using Spatial.Core.IO;

namespace Spatial.Records;

/// <summary>
/// Reads and writes the season matrix as Apache Parquet (<c>matrix.parquet</c>): columns <c>station</c>
/// (string), <c>season</c> (int32), <c>observed_days</c> (int32), <c>below_min_days</c> (bool), then
/// <c>d000</c>…<c>d364</c> (float, millimetres, NaN for a missing day), one row per station-season in the
/// matrix's order; file metadata <c>season_start</c> = <c>MM-DD</c>.
/// </summary>
/// <remarks>
/// Written in row groups of <see cref="RowGroupRows"/> rows, uncompressed (Snappy made reading five times slower in a 200,000-row benchmark for a 30 % smaller file). Read
/// one row group per worker at a time (each worker with its own reader), a few day columns at a time copied into the rows; a day
/// column chunk that is one plain uncompressed page, as written here, is copied straight from the file (<see cref="PlainFloatPages"/>).
/// A day column written by another tool may be nullable: a null is read as NaN.
/// </remarks>
public static class SeasonMatrixFile
{
    /// <summary>Rows per Parquet row group.</summary>
    internal const int RowGroupRows = 32_768;

    /// <summary>The file metadata key holding the season start (MM-DD).</summary>
    public const string SeasonStartKey = "season_start";

    private static readonly DataField<string> StationField = new("station", false);
    private static readonly DataField<int> SeasonField = new("season", false);
    private static readonly DataField<int> ObservedField = new("observed_days", false);
    private static readonly DataField<bool> BelowField = new("below_min_days", false);
    private static readonly DataField<float>[] DayFields =
        [.. Enumerable.Range(0, SeasonCalendar.DaysPerSeason).Select(d => new DataField<float>(DayColumn(d), false))];

    private static readonly ParquetSchema Schema = new([StationField, SeasonField, ObservedField, BelowField, .. DayFields]);

    /// <summary>Name of the column of season day <paramref name="day"/> (0…364): <c>d000</c>…<c>d364</c>.</summary>
    public static string DayColumn(int day) => "d" + day.ToString("000", CultureInfo.InvariantCulture);

    /// <summary>Writes <paramref name="matrix"/> to <paramref name="path"/> atomically (the destination is replaced only when complete).</summary>
    public static void Write(string path, SeasonMatrix matrix)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(matrix);
        AtomicFile.Write(path, stream => WriteAsync(stream, matrix, RowGroupRows).GetAwaiter().GetResult());
    }

    /// <summary>As <see cref="Write(string, SeasonMatrix)"/> with row groups of <paramref name="rowGroupRows"/> rows (tests of files with many groups).</summary>
    internal static void Write(string path, SeasonMatrix matrix, int rowGroupRows)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(rowGroupRows, 1);
        AtomicFile.Write(path, stream => WriteAsync(stream, matrix, rowGroupRows).GetAwaiter().GetResult());
    }

    /// <summary>
    /// Reads the season matrix at <paramref name="path"/>. Throws <see cref="SpatialDataException"/> naming the file
    /// when it is missing, not Parquet, lacks a column or the <c>season_start</c> metadata, or holds rows that are
    /// out of order, duplicated, or whose <c>observed_days</c> disagree with the data.
    /// </summary>
    public static SeasonMatrix Read(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "season matrix file not found", "run 'spatial import' first, or check the path");
        }

        try
        {
            return ReadAsync(path).GetAwaiter().GetResult();
        }
        catch (SpatialDataException)
        {
            throw;
        }
        catch (Exception e) when (e is IOException or ParquetException or InvalidDataException or InvalidOperationException or ArgumentException or NotSupportedException or IndexOutOfRangeException or OverflowException or FormatException)
        {
            throw new SpatialDataException(path, 0, $"not a readable season matrix ({e.GetType().Name}: {e.Message})", "write it again with 'spatial import'");
        }
    }

    private static async Task WriteAsync(Stream stream, SeasonMatrix matrix, int rowGroupRows)
    {
        var options = new ParquetOptions { CompressionMethod = CompressionMethod.None };
        await using var writer = await ParquetWriter.CreateAsync(Schema, stream, options).ConfigureAwait(false);
        writer.CustomMetadata = new Dictionary<string, string>(StringComparer.Ordinal) { [SeasonStartKey] = matrix.Calendar.StartText };
        var rows = matrix.Rows;
        var depths = matrix.DepthsMemory;
        var column = new float[Math.Min(rowGroupRows, Math.Max(rows, 1))];
        for (var first = 0; first < rows || (rows == 0 && first == 0); first += rowGroupRows)
        {
            var n = Math.Min(rowGroupRows, rows - first);
            using var group = writer.CreateRowGroup();
            var stations = new string[n];
            var seasons = new int[n];
            var observed = new int[n];
            var below = new bool[n];
            for (var r = 0; r < n; r++)
            {
                var key = matrix.Keys[first + r];
                stations[r] = key.Station.Value;
                seasons[r] = key.Season;
                observed[r] = key.ObservedDays;
                below[r] = key.BelowMinDays;
            }

            await group.WriteAsync(StationField, stations).ConfigureAwait(false);
            await group.WriteAsync(SeasonField, (ReadOnlyMemory<int>)seasons).ConfigureAwait(false);
            await group.WriteAsync(ObservedField, (ReadOnlyMemory<int>)observed).ConfigureAwait(false);
            await group.WriteAsync(BelowField, (ReadOnlyMemory<bool>)below).ConfigureAwait(false);
            for (var d = 0; d < SeasonCalendar.DaysPerSeason; d++)
            {
                var span = depths.Span;
                for (var r = 0; r < n; r++)
                {
                    column[r] = span[((first + r) * SeasonCalendar.DaysPerSeason) + d];
                }

                await group.WriteAsync(DayFields[d], (ReadOnlyMemory<float>)column.AsMemory(0, n)).ConfigureAwait(false);
            }

            group.CompleteValidate();
            if (rows == 0)
            {
                break;
            }
        }
    }

    private static async Task<SeasonMatrix> ReadAsync(string path)
    {
        await using var reader = await ParquetReader.CreateAsync(path).ConfigureAwait(false);
        if (!reader.CustomMetadata.TryGetValue(SeasonStartKey, out var startText))
        {
            throw new SpatialDataException(path, 0, $"the file has no '{SeasonStartKey}' metadata", "write it again with 'spatial import'");
        }

        var calendar = SeasonCalendar.TryParse(startText)
            ?? throw new SpatialDataException(path, 0, $"'{SeasonStartKey}' metadata '{startText}' is not a valid MM-DD season start", "write it again with 'spatial import'");

        var fields = reader.Schema.DataFields;
        DataField Field(string name, Type type)
        {
            var f = fields.FirstOrDefault(x => x.Name == name)
                ?? throw new SpatialDataException(path, 0, $"the file has no column '{name}'", "write it again with 'spatial import'");
            var ok = f.ClrType == type || (type == typeof(string) && f.ClrType == typeof(ReadOnlyMemory<char>));
            if (!ok || f.IsArray)
            {
                throw new SpatialDataException(path, 0, $"column '{name}' holds {f.ClrType.Name}; expected {type.Name}", "write it again with 'spatial import'");
            }

            return f;
        }

        var stationField = Field("station", typeof(string));
        var seasonField = Field("season", typeof(int));
        var observedField = Field("observed_days", typeof(int));
        var belowField = Field("below_min_days", typeof(bool));
        var dayFields = new DataField[SeasonCalendar.DaysPerSeason];
        for (var d = 0; d < dayFields.Length; d++)
        {
            dayFields[d] = Field(DayColumn(d), typeof(float));
        }

        var groupRows = new int[reader.RowGroupCount];
        var groupStart = new long[reader.RowGroupCount + 1];
        for (var g = 0; g < reader.RowGroupCount; g++)
        {
            using var group = reader.OpenRowGroupReader(g);
            groupRows[g] = checked((int)group.RowCount);
            groupStart[g + 1] = groupStart[g] + groupRows[g];
        }

        var total = groupStart[^1];
        if (total * SeasonCalendar.DaysPerSeason > Array.MaxLength)
        {
            throw new SpatialDataException(path, 0, $"the file holds {total} rows, more than one matrix can hold", "split the network into smaller imports");
        }

        var rows = (int)total;
        var keys = new SeasonKey[rows];

        // Every element is written below.
        var depths = LargeArrays.AllocateUninitialized<float>(rows * SeasonCalendar.DaysPerSeason);
        // Row groups are independent: each worker reads every workers-th group through its own reader. A failing group
        // does not stop the others; the failure of the first failing group in file order is the one reported.
        var failures = new ExceptionDispatchInfo?[reader.RowGroupCount];
        var largestGroup = groupRows.Length > 0 ? groupRows.Max() : 0;
        using var file = File.OpenHandle(path, FileMode.Open, FileAccess.Read, FileShare.Read, FileOptions.RandomAccess);
        async Task ReadGroups(ParquetReader own, int first, int step)
        {
            var tile = new float[DayTile * largestGroup];
            for (var g = first; g < own.RowGroupCount; g += step)
            {
                try
                {
                    await ReadGroup(own, file, g, (int)groupStart[g], groupRows[g], stationField, seasonField, observedField, belowField, dayFields, keys, depths, tile, path).ConfigureAwait(false);
                }
                catch (Exception e)
                {
                    failures[g] = ExceptionDispatchInfo.Capture(e);
                }
            }
        }

        // Worker 0 reads through the reader already open; the others open their own.
        var workers = Math.Clamp(Environment.ProcessorCount, 1, Math.Max(1, reader.RowGroupCount));
        var tasks = new Task[workers];
        for (var w = 1; w < workers; w++)
        {
            var first = w;
            tasks[w] = Task.Run(async () =>
            {
                await using var own = await ParquetReader.CreateAsync(path).ConfigureAwait(false);
                await ReadGroups(own, first, workers).ConfigureAwait(false);
            });
        }

        tasks[0] = Task.Run(() => ReadGroups(reader, 0, workers));
        await Task.WhenAll(tasks).ConfigureAwait(false);

        foreach (var failure in failures)
        {
            failure?.Throw();
        }

        ShareStationIds(keys, groupStart);
        try
        {
            return SeasonMatrix.TakingKeys(calendar, keys, depths);
        }
        catch (ArgumentException e)
        {
            throw new SpatialDataException(path, 0, $"the rows are not a valid season matrix: {e.Message.Split(" (Parameter", 2)[0]}", "write it again with 'spatial import'");
        }
    }

    /// <summary>Days read per pass of a row group: that many columns are read, then copied into the rows as short runs.</summary>
    private const int DayTile = 32;

    /// <summary>Reads row group <paramref name="g"/> into <paramref name="keys"/> and <paramref name="depths"/> from row <paramref name="offset"/>; <paramref name="tile"/> holds <see cref="DayTile"/> columns of the group.</summary>
    private static async Task ReadGroup(
        ParquetReader reader,
        SafeFileHandle file,
        int g,
        int offset,
        int n,
        DataField stationField,
        DataField seasonField,
        DataField observedField,
        DataField belowField,
        DataField[] dayFields,
        SeasonKey[] keys,
        float[] depths,
        float[] tile,
        string path)
    {
        using var group = reader.OpenRowGroupReader(g);
        if (group.RowCount != n)
        {
            throw new InvalidDataException($"row group {g} holds {group.RowCount} rows, not {n}");
        }

        var stations = new string?[n];
        var seasons = new int[n];
        var observed = new int[n];
        var below = new bool[n];
        await group.ReadAsync(stationField, stations.AsMemory()).ConfigureAwait(false);
        await ReadNonNull(group, seasonField, seasons, path).ConfigureAwait(false);
        await ReadNonNull(group, observedField, observed, path).ConfigureAwait(false);
        await ReadNonNull(group, belowField, below, path).ConfigureAwait(false);
        StationId? previous = null;
        for (var r = 0; r < n; r++)
        {
            // Consecutive rows of one station share one id instance.
            if (previous is not { } p || !string.Equals(p.Value, stations[r], StringComparison.Ordinal))
            {
                if (!StationId.IsValid(stations[r], out var why))
                {
                    throw new SpatialDataException(path, 0, $"row {offset + r + 1}: station '{stations[r]}' is not a valid id: {why}", "write it again with 'spatial import'");
                }

                previous = new StationId(stations[r]!);
            }

            keys[offset + r] = new SeasonKey(previous.Value, seasons[r], observed[r], below[r]);
        }

        const int days = SeasonCalendar.DaysPerSeason;
        if (n == 0)
        {
            return;
        }

        float?[]? nullable = null;
        for (var d0 = 0; d0 < days; d0 += DayTile)
        {
            var width = Math.Min(DayTile, days - d0);
            for (var j = 0; j < width; j++)
            {
                var column = tile.AsMemory(j * n, n);
                var field = dayFields[d0 + j];
                if (field.IsNullable)
                {
                    nullable ??= new float?[n];
                    await group.ReadAsync<float>(field, nullable.AsMemory()).ConfigureAwait(false);
                    var span = column.Span;
                    for (var r = 0; r < n; r++)
                    {
                        span[r] = nullable[r] ?? float.NaN;
                    }
                }
                else if (!PlainFloatPages.TryRead(file, group, field, column.Span))
                {
                    await group.ReadAsync<float>(field, column).ConfigureAwait(false);
                }
            }

            Transpose(tile, n, width, depths.AsSpan((offset * days) + d0));
        }
    }

    /// <summary>Copies <paramref name="width"/> columns of <paramref name="n"/> values (column-major in <paramref name="tile"/>) into the first days of n consecutive rows of the matrix starting at <paramref name="destination"/>; 8 × 8 blocks are transposed in registers.</summary>
    private static void Transpose(ReadOnlySpan<float> tile, int n, int width, Span<float> destination)
    {
        const int days = SeasonCalendar.DaysPerSeason;
        var blockedRows = Avx.IsSupported ? n / 8 * 8 : 0;
        var blockedColumns = width / 8 * 8;
        for (var r = 0; r < blockedRows; r += 8)
        {
            for (var j = 0; j < blockedColumns; j += 8)
            {
                Transpose8(tile, n, r, j, destination);
            }

            for (var i = r; i < r + 8; i++)
            {
                for (var j = blockedColumns; j < width; j++)
                {
                    destination[(i * days) + j] = tile[(j * n) + i];
                }
            }
        }

        for (var i = blockedRows; i < n; i++)
        {
            var row = destination.Slice(i * days, width);
            for (var j = 0; j < width; j++)
            {
                row[j] = tile[(j * n) + i];
            }
        }
    }

    /// <summary>Rows r…r+7 of columns j…j+7 of the tile into days j…j+7 of those rows.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Transpose8(ReadOnlySpan<float> tile, int n, int r, int j, Span<float> destination)
    {
        const int days = SeasonCalendar.DaysPerSeason;
        var c0 = Vector256.Create(tile.Slice((j * n) + r, 8));
        var c1 = Vector256.Create(tile.Slice(((j + 1) * n) + r, 8));
        var c2 = Vector256.Create(tile.Slice(((j + 2) * n) + r, 8));
        var c3 = Vector256.Create(tile.Slice(((j + 3) * n) + r, 8));
        var c4 = Vector256.Create(tile.Slice(((j + 4) * n) + r, 8));
        var c5 = Vector256.Create(tile.Slice(((j + 5) * n) + r, 8));
        var c6 = Vector256.Create(tile.Slice(((j + 6) * n) + r, 8));
        var c7 = Vector256.Create(tile.Slice(((j + 7) * n) + r, 8));
        var t0 = Avx.UnpackLow(c0, c1);
        var t1 = Avx.UnpackHigh(c0, c1);
        var t2 = Avx.UnpackLow(c2, c3);
        var t3 = Avx.UnpackHigh(c2, c3);
        var t4 = Avx.UnpackLow(c4, c5);
        var t5 = Avx.UnpackHigh(c4, c5);
        var t6 = Avx.UnpackLow(c6, c7);
        var t7 = Avx.UnpackHigh(c6, c7);
        var s0 = Avx.Shuffle(t0, t2, 0x44);
        var s1 = Avx.Shuffle(t0, t2, 0xEE);
        var s2 = Avx.Shuffle(t1, t3, 0x44);
        var s3 = Avx.Shuffle(t1, t3, 0xEE);
        var s4 = Avx.Shuffle(t4, t6, 0x44);
        var s5 = Avx.Shuffle(t4, t6, 0xEE);
        var s6 = Avx.Shuffle(t5, t7, 0x44);
        var s7 = Avx.Shuffle(t5, t7, 0xEE);
        Avx.Permute2x128(s0, s4, 0x20).CopyTo(destination.Slice((r * days) + j, 8));
        Avx.Permute2x128(s1, s5, 0x20).CopyTo(destination.Slice(((r + 1) * days) + j, 8));
        Avx.Permute2x128(s2, s6, 0x20).CopyTo(destination.Slice(((r + 2) * days) + j, 8));
        Avx.Permute2x128(s3, s7, 0x20).CopyTo(destination.Slice(((r + 3) * days) + j, 8));
        Avx.Permute2x128(s0, s4, 0x31).CopyTo(destination.Slice(((r + 4) * days) + j, 8));
        Avx.Permute2x128(s1, s5, 0x31).CopyTo(destination.Slice(((r + 5) * days) + j, 8));
        Avx.Permute2x128(s2, s6, 0x31).CopyTo(destination.Slice(((r + 6) * days) + j, 8));
        Avx.Permute2x128(s3, s7, 0x31).CopyTo(destination.Slice(((r + 7) * days) + j, 8));
    }

    /// <summary>Rows of one station on both sides of a row-group boundary share the id instance of the first, as within a group.</summary>
    private static void ShareStationIds(SeasonKey[] keys, long[] groupStart)
    {
        for (var g = 1; g < groupStart.Length - 1; g++)
        {
            var first = (int)groupStart[g];
            if (first == 0 || first >= keys.Length)
            {
                continue;
            }

            var before = keys[first - 1].Station;
            for (var r = first; r < groupStart[g + 1] && keys[r].Station == before && !ReferenceEquals(keys[r].Station.Value, before.Value); r++)
            {
                keys[r] = keys[r] with { Station = before };
            }
        }
    }

    private static async Task ReadNonNull<T>(ParquetRowGroupReader group, DataField field, T[] values, string path)
        where T : struct
    {
        if (field.IsNullable)
        {
            var nullable = new T?[values.Length];
            await group.ReadAsync<T>(field, nullable.AsMemory()).ConfigureAwait(false);
            for (var i = 0; i < values.Length; i++)
            {
                values[i] = nullable[i] ?? throw new SpatialDataException(path, 0, $"row {i + 1} of a row group: column '{field.Name}' is empty", "write it again with 'spatial import'");
            }
        }
        else
        {
            await group.ReadAsync<T>(field, values.AsMemory()).ConfigureAwait(false);
        }
    }
}

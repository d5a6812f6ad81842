using Parquet;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Records.Tests;

public sealed class SeasonMatrixFileTests : IDisposable
{
    private readonly string folder = TestData.NewScratchFolder("matrix");

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private static SeasonMatrix Sample(int stations, int seasonsPerStation, int seed, SeasonCalendar? calendar = null)
    {
        var rng = new Random(seed);
        var keys = new List<SeasonKey>();
        var depths = new List<float>();
        for (var s = 0; s < stations; s++)
        {
            for (var y = 0; y < seasonsPerStation; y++)
            {
                var observed = 0;
                for (var d = 0; d < SeasonCalendar.DaysPerSeason; d++)
                {
                    var v = rng.NextDouble() < 0.2 ? float.NaN : (float)(rng.NextDouble() * 3000);
                    observed += float.IsNaN(v) ? 0 : 1;
                    depths.Add(v);
                }

                keys.Add(new SeasonKey(new StationId($"ST{s:000000}"), 1950 + y, observed, observed < 250));
            }
        }

        return new SeasonMatrix(calendar ?? SeasonCalendar.Default, keys, [.. depths]);
    }

    private static void AssertSame(SeasonMatrix expected, SeasonMatrix actual)
    {
        Assert.Equal(expected.Calendar, actual.Calendar);
        Assert.Equal(expected.Keys, actual.Keys);
        var a = expected.Depths;
        var b = actual.Depths;
        Assert.Equal(a.Length, b.Length);
        for (var i = 0; i < a.Length; i++)
        {
            // Bit-exact: float32 is stored as float32, NaN stays NaN.
            Assert.Equal(BitConverter.SingleToInt32Bits(a[i]), BitConverter.SingleToInt32Bits(b[i]));
        }
    }

    [Fact]
    public void A_matrix_in_many_row_groups_reads_back_bit_for_bit_and_a_station_across_groups_keeps_one_id_instance()
    {
        // Given 9 stations × 7 seasons in row groups of 19 rows (groups are read in parallel, days in blocks of 8 rows × 8 days and a remainder)
        var matrix = Sample(9, 7, seed: 23);
        var path = Path.Combine(folder, "groups.parquet");
        SeasonMatrixFile.Write(path, matrix, rowGroupRows: 19);

        // When read back
        var back = SeasonMatrixFile.Read(path);

        // Then every key and depth is the same, and rows 18 and 19 (one station, two groups) share the id's string
        AssertSame(matrix, back);
        Assert.Same(back.Keys[18].Station.Value, back.Keys[19].Station.Value);
    }

    [Fact]
    public async Task A_day_column_as_written_here_is_one_plain_page_whose_values_are_copied_as_they_lie()
    {
        // Given a matrix written by this class (one uncompressed PLAIN data page per column chunk)
        var matrix = Sample(3, 4, seed: 31);
        var path = Path.Combine(folder, "plain.parquet");
        SeasonMatrixFile.Write(path, matrix);
        await using var reader = await ParquetReader.CreateAsync(path);
        using var group = reader.OpenRowGroupReader(0);
        using var file = File.OpenHandle(path);
        var d100 = reader.Schema.DataFields[4 + 100];

        // When day 100 is read straight from the file
        var values = new float[matrix.Rows];
        var direct = PlainFloatPages.TryRead(file, group, d100, values);

        // Then it is taken, bit for bit; a chunk that does not hold as many values as asked is left to Parquet.Net
        Assert.True(direct);
        for (var r = 0; r < matrix.Rows; r++)
        {
            Assert.Equal(BitConverter.SingleToInt32Bits(matrix.Row(r)[100]), BitConverter.SingleToInt32Bits(values[r]));
        }

        Assert.False(PlainFloatPages.TryRead(file, group, d100, new float[matrix.Rows - 1]));
    }

    [Fact]
    public void A_page_header_that_is_not_one_plain_data_page_of_the_expected_values_is_refused()
    {
        // Thrift compact PageHeader (parquet.thrift): type 0 (DATA_PAGE), sizes 8 and 8, data_page_header {num_values 2, encoding 0 (PLAIN)}.
        byte[] plain = [0x15, 0x00, 0x15, 0x10, 0x15, 0x10, 0x2C, 0x15, 0x04, 0x15, 0x00, 0x00, 0x00];
        Assert.True(PlainFloatPages.IsPlainDataPage(plain, 2, out var length));
        Assert.Equal(plain.Length, length);

        // The same with 3 values declared, with RLE_DICTIONARY (8) as encoding, and cut short.
        Assert.False(PlainFloatPages.IsPlainDataPage(plain, 3, out _));
        byte[] dictionary = [0x15, 0x00, 0x15, 0x10, 0x15, 0x10, 0x2C, 0x15, 0x04, 0x15, 0x10, 0x00, 0x00];
        Assert.False(PlainFloatPages.IsPlainDataPage(dictionary, 2, out _));
        Assert.False(PlainFloatPages.IsPlainDataPage(plain.AsSpan(0, 9), 2, out _));
    }

    [Fact]
    public void A_written_matrix_reads_back_bit_for_bit_with_its_keys_and_calendar()
    {
        var matrix = Sample(7, 5, seed: 11, calendar: new SeasonCalendar(3, 1));
        var path = Path.Combine(folder, "matrix.parquet");

        SeasonMatrixFile.Write(path, matrix);
        var back = SeasonMatrixFile.Read(path);

        AssertSame(matrix, back);
        Assert.Equal("03-01", back.Calendar.StartText);
    }

    [Fact]
    public void A_matrix_larger_than_one_row_group_reads_back_in_order()
    {
        var matrix = Sample(SeasonMatrixFile.RowGroupRows + 5, 1, seed: 3);
        var path = Path.Combine(folder, "big.parquet");

        SeasonMatrixFile.Write(path, matrix);
        var back = SeasonMatrixFile.Read(path);

        AssertSame(matrix, back);
    }

    [Fact]
    public void An_empty_matrix_round_trips()
    {
        var matrix = new SeasonMatrix(SeasonCalendar.Default, [], []);
        var path = Path.Combine(folder, "empty.parquet");

        SeasonMatrixFile.Write(path, matrix);

        Assert.Equal(0, SeasonMatrixFile.Read(path).Rows);
    }

    [Fact]
    public async Task The_file_has_the_contract_columns_in_order_and_the_season_start_metadata()
    {
        // Contract: DEVELOPERS.md "import → matrix.parquet".
        var path = Path.Combine(folder, "m.parquet");
        SeasonMatrixFile.Write(path, Sample(2, 2, seed: 5));

        await using var reader = await ParquetReader.CreateAsync(path);
        var fields = reader.Schema.DataFields;
        Assert.Equal(4 + 365, fields.Length);
        Assert.Equal(["station", "season", "observed_days", "below_min_days", "d000", "d001"], fields.Take(6).Select(f => f.Name));
        Assert.Equal("d364", fields[^1].Name);
        Assert.Contains(fields[0].ClrType, new[] { typeof(string), typeof(ReadOnlyMemory<char>) });
        Assert.Equal(typeof(int), fields[1].ClrType);
        Assert.Equal(typeof(int), fields[2].ClrType);
        Assert.Equal(typeof(bool), fields[3].ClrType);
        Assert.All(fields.Skip(4), f => Assert.Equal(typeof(float), f.ClrType));
        Assert.Equal("09-01", reader.CustomMetadata["season_start"]);
    }

    [Fact]
    public void Writing_over_an_existing_file_replaces_it_and_leaves_no_temporary_file()
    {
        var path = Path.Combine(folder, "m.parquet");
        SeasonMatrixFile.Write(path, Sample(3, 1, seed: 1));
        var second = Sample(2, 2, seed: 2);

        SeasonMatrixFile.Write(path, second);

        AssertSame(second, SeasonMatrixFile.Read(path));
        Assert.Equal(["m.parquet"], Directory.GetFiles(folder).Select(Path.GetFileName));
    }

    [Fact]
    public void A_file_that_is_not_parquet_is_refused_with_a_message_naming_it()
    {
        var path = Path.Combine(folder, "not.parquet");
        File.WriteAllText(path, "station,season\nA,1990\n");

        var e = Assert.Throws<SpatialDataException>(() => SeasonMatrixFile.Read(path));

        Assert.Contains(path, e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_truncated_file_is_refused_with_a_message_naming_it()
    {
        var path = Path.Combine(folder, "cut.parquet");
        SeasonMatrixFile.Write(path, Sample(3, 2, seed: 9));
        var bytes = File.ReadAllBytes(path);
        File.WriteAllBytes(path, bytes[..(bytes.Length / 2)]);

        var e = Assert.Throws<SpatialDataException>(() => SeasonMatrixFile.Read(path));

        Assert.Contains(path, e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_missing_file_is_refused_with_a_message_naming_it()
    {
        var path = Path.Combine(folder, "absent.parquet");

        var e = Assert.Throws<SpatialDataException>(() => SeasonMatrixFile.Read(path));

        Assert.Contains("absent.parquet", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task A_parquet_file_without_the_day_columns_is_refused_naming_the_missing_column()
    {
        var path = Path.Combine(folder, "other.parquet");
        var field = new Parquet.Schema.DataField<int>("season", false);
        await using (var stream = File.Create(path))
        {
            await using var writer = await ParquetWriter.CreateAsync(new Parquet.Schema.ParquetSchema(field), stream);
            writer.CustomMetadata = new Dictionary<string, string> { ["season_start"] = "09-01" };
            using var group = writer.CreateRowGroup();
            await group.WriteAsync(field, (ReadOnlyMemory<int>)new[] { 1990 });
        }

        var e = Assert.Throws<SpatialDataException>(() => SeasonMatrixFile.Read(path));

        Assert.Contains("'station'", e.Message, StringComparison.Ordinal);
    }
}

public sealed class SeasonMatrixFileInteropTests
{
    [Fact]
    public void A_matrix_written_by_the_apache_parquet_cpp_writer_with_nullable_days_reads_correctly()
    {
        // Fixture written by Apache Parquet C++ (ParquetSharp 25.0.1.2); see data/SOURCES.md for its recipe.
        var m = SeasonMatrixFile.Read(TestData.Path("matrix_written_by_parquet_cpp.parquet"));

        Assert.Equal("03-01", m.Calendar.StartText);
        Assert.Equal(
            [new SeasonKey(new StationId("MF001"), 1990, 312, false), new SeasonKey(new StationId("MF001"), 1991, 313, false), new SeasonKey(new StationId("MF017"), 1990, 313, false)],
            m.Keys);
        for (var r = 0; r < 3; r++)
        {
            for (var d = 0; d < 365; d++)
            {
                var expected = d % 7 == r ? float.NaN : ((r * 1000) + d) * 0.5f;
                Assert.Equal(expected, m.Row(r)[d]);
            }
        }
    }
}

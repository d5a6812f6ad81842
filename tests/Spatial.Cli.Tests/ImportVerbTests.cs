using System.Text;
using System.Text.Json;
using Spatial.Records;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

public sealed class ImportVerbTests : IDisposable
{
    private readonly string scratch = TestData.NewScratchFolder("import-verb");

    public void Dispose() => Directory.Delete(scratch, recursive: true);

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    private static string Data(string name) => TestData.Path("import", name);

    [Fact]
    public void A_valid_import_writes_the_matrix_station_list_quality_files_and_manifest()
    {
        var outDir = Path.Combine(scratch, "out");

        var (code, stdout, err) = Run("import", "--records", Data("records.csv"), "--stations", Data("stations.csv"), "--out", outDir);

        Assert.Equal(0, code);
        Assert.Equal(string.Empty, err);
        Assert.Contains("imported 3 of 3 rows", stdout, StringComparison.Ordinal);
        foreach (var name in new[] { "matrix.parquet", "station_list.csv", "quality.json", "quality.txt", "manifest.json" })
        {
            Assert.True(File.Exists(Path.Combine(outDir, name)), name);
        }

        var matrix = SeasonMatrixFile.Read(Path.Combine(outDir, "matrix.parquet"));
        Assert.Equal(2, matrix.Rows);
        Assert.Equal(5f, matrix.Row(0)[122]); // A, 2001-01-01: day 122 of season 2000 (Sep 30 + Oct 31 + Nov 30 + Dec 31 days before)
        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(outDir, "manifest.json")));
        Assert.Equal(2, manifest.RootElement.GetProperty("runs").GetProperty("import").GetProperty("inputs").GetArrayLength());
    }

    [Fact]
    public void The_json_summary_gives_the_counts()
    {
        var records = Path.Combine(scratch, "r.csv");
        File.WriteAllText(records, "station,date,depth,flag\nA,2001-01-01,5,\nA,2001-01-01,5,\nA,2001-01-02,-1,\nA,2001-01-03,7,X\nC,2001-01-01,1,\nB,2001-01-01,20000,\n");

        var (code, stdout, _) = Run("import", "--records", records, "--stations", Data("stations.csv"), "--out", Path.Combine(scratch, "o"), "--bad-flags", "X", "--json");

        Assert.Equal(0, code);
        using var doc = JsonDocument.Parse(stdout);
        var counts = doc.RootElement.GetProperty("counts");
        Assert.Equal(6, counts.GetProperty("rows_read").GetInt64());
        Assert.Equal(1, counts.GetProperty("rows_kept").GetInt64());
        Assert.Equal(1, counts.GetProperty("duplicates_merged").GetInt64());
        Assert.Equal(1, counts.GetProperty("stations").GetInt32());
        Assert.Equal(1, counts.GetProperty("seasons").GetInt32());
        Assert.Equal(1, counts.GetProperty("seasons_below_min_days").GetInt32());
        var removed = counts.GetProperty("removed");
        Assert.Equal(1, removed.GetProperty("negative_depth").GetInt64());
        Assert.Equal(1, removed.GetProperty("flagged").GetInt64());
        Assert.Equal(1, removed.GetProperty("unknown_station").GetInt64());
        Assert.Equal(1, removed.GetProperty("implausible_depth").GetInt64());
    }

    [Fact]
    public void A_semicolon_file_with_a_bom_crlf_and_decimal_commas_in_cm_imports()
    {
        var records = Path.Combine(scratch, "r.csv");
        File.WriteAllBytes(records, [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes("station;date;depth\r\n\"A\";2001-01-01;12,5\r\nB;2001-01-01;3\r\n\r\n")]);

        var (code, _, err) = Run("import", "--records", records, "--stations", Data("stations.csv"), "--out", Path.Combine(scratch, "o"), "--unit", "cm");

        Assert.Equal(0, code);
        Assert.Equal(string.Empty, err);
        var matrix = SeasonMatrixFile.Read(Path.Combine(scratch, "o", "matrix.parquet"));
        Assert.Equal(125f, matrix.Row(0)[122]);
        Assert.Equal(30f, matrix.Row(1)[122]);
    }

    [Fact]
    public void A_southern_season_start_is_recorded_in_the_matrix()
    {
        var (code, _, _) = Run("import", "--records", Data("records.csv"), "--stations", Data("stations.csv"), "--out", Path.Combine(scratch, "o"), "--season-start", "03-01", "--min-days", "1");

        Assert.Equal(0, code);
        var matrix = SeasonMatrixFile.Read(Path.Combine(scratch, "o", "matrix.parquet"));
        Assert.Equal("03-01", matrix.Calendar.StartText);
        Assert.False(matrix.Keys[0].BelowMinDays);
    }

    // Each broken input: the exit code is 1 and the one-line message names the file and the line.
    [Theory]
    [InlineData("empty.csv", 1)]
    [InlineData("header_only.csv", 2)]
    [InlineData("missing_depth_column.csv", 1)]
    [InlineData("short_row.csv", 3)]
    [InlineData("long_row.csv", 2)]
    [InlineData("non_numeric_depth.csv", 3)]
    [InlineData("impossible_date.csv", 3)]
    [InlineData("month_13.csv", 2)]
    [InlineData("date_before_1800.csv", 2)]
    [InlineData("date_not_iso.csv", 3)]
    [InlineData("year_zero.csv", 2)]
    [InlineData("day_zero.csv", 2)]
    [InlineData("negative_year.csv", 2)]
    [InlineData("unterminated_quote.csv", 3)]
    [InlineData("text_after_closing_quote.csv", 2)]
    [InlineData("unknown_unit.csv", 3)]
    [InlineData("binary_garbage.csv", 1)]
    [InlineData("nul_in_depth.csv", 2)]
    [InlineData("empty_station_id.csv", 3)]
    [InlineData("station_id_too_long.csv", 2)]
    [InlineData("invalid_utf8_station.csv", 2)]
    [InlineData("no_listed_station.csv", 2)]
    [InlineData("wrong_element.csv", 2)]
    [InlineData("duplicate_header_column.csv", 1)]
    [InlineData("delimiter_mismatch.csv", 1)]
    [InlineData("truncated.csv.gz", 157)]
    public void A_broken_records_file_is_refused_with_its_file_and_line(string file, int line)
    {
        var path = Data(Path.Combine("broken", file));

        AssertRefused(path, line, "--records", path, "--stations", Data("stations.csv"));
    }

    [Theory]
    [InlineData("stations_latitude_out_of_range.csv", 3)]
    [InlineData("stations_missing_latitude.csv", 1)]
    [InlineData("stations_duplicate_id.csv", 3)]
    [InlineData("stations_projected_crs.csv", 3)]
    [InlineData("stations_empty.csv", 1)]
    [InlineData("stations_non_numeric_longitude.csv", 2)]
    public void A_broken_station_list_is_refused_with_its_file_and_line(string file, int line)
    {
        var path = Data(Path.Combine("broken", file));

        AssertRefused(path, line, "--records", Data("records.csv"), "--stations", path);
    }

    [Fact]
    public void A_ten_megabyte_line_is_refused_with_its_line()
    {
        var path = Path.Combine(scratch, "long.csv");
        File.WriteAllText(path, "station,date,depth\nA,2001-01-01,5\nA,2001-01-02," + new string('7', 10_000_000) + "\n");

        AssertRefused(path, 3, "--records", path, "--stations", Data("stations.csv"));
    }

    [Fact]
    public void A_missing_records_file_is_refused_naming_it()
    {
        var path = Path.Combine(scratch, "absent.csv");

        var (code, _, err) = Run("import", "--records", path, "--stations", Data("stations.csv"), "--out", Path.Combine(scratch, "o"));

        Assert.Equal(1, code);
        Assert.Contains(path, err, StringComparison.Ordinal);
        Assert.Contains("not found", err, StringComparison.Ordinal);
    }

    private void AssertRefused(string file, int line, params string[] inputs)
    {
        var outDir = Path.Combine(scratch, "out");

        var (code, stdout, err) = Run(["import", .. inputs, "--out", outDir]);

        Assert.Equal(1, code);
        Assert.Equal(string.Empty, stdout);
        Assert.StartsWith($"spatial: error: {file}:{line}:", err, StringComparison.Ordinal);
        Assert.Single(err.TrimEnd('\n').Split('\n')); // one line, no stack trace
        Assert.False(Directory.Exists(outDir) && Directory.EnumerateFileSystemEntries(outDir).Any(), "nothing may be written for a refused input");
    }

    [Theory]
    [InlineData("--season-start", "02-29")]
    [InlineData("--season-start", "13-01")]
    [InlineData("--min-days", "400")]
    [InlineData("--unit", "furlong")]
    [InlineData("--flat-days", "1")]
    [InlineData("--spike-mm", "0")]
    public void A_bad_option_value_is_a_usage_error(string option, string value)
    {
        var (code, _, err) = Run("import", "--records", Data("records.csv"), "--stations", Data("stations.csv"), "--out", Path.Combine(scratch, "o"), option, value);

        Assert.Equal(2, code);
        Assert.Contains(option, err, StringComparison.Ordinal);
    }

    [Fact]
    public void Missing_required_options_are_a_usage_error()
    {
        var (code, _, _) = Run("import", "--records", Data("records.csv"));

        Assert.Equal(2, code);
    }

    [Fact]
    public void Help_lists_the_options()
    {
        var (code, stdout, _) = Run("import", "--help");

        Assert.Equal(0, code);
        foreach (var option in new[] { "--records", "--stations", "--out", "--season-start", "--min-days", "--unit", "--bad-flags", "--max-depth-mm", "--spike-mm", "--flat-days", "--json" })
        {
            Assert.Contains(option, stdout, StringComparison.Ordinal);
        }
    }

    [Fact]
    public void Random_bytes_as_records_end_in_exit_0_or_1_and_never_in_a_stack_trace()
    {
        var rng = new Random(31);
        for (var i = 0; i < 40; i++)
        {
            var path = Path.Combine(scratch, $"g{i}.csv");
            var bytes = new byte[rng.Next(0, 400)];
            rng.NextBytes(bytes);
            File.WriteAllBytes(path, i % 2 == 0 ? bytes : [.. "station,date,depth\nA,"u8.ToArray(), .. bytes]);

            var (code, _, err) = Run("import", "--records", path, "--stations", Data("stations.csv"), "--out", Path.Combine(scratch, $"o{i}"));

            Assert.True(code is 0 or 1, $"exit {code}: {err}");
            Assert.DoesNotContain("   at ", err, StringComparison.Ordinal);
            Assert.DoesNotContain("internal fault", err, StringComparison.Ordinal);
        }
    }
}

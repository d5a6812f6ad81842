using System.IO.Compression;
using System.Text;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Records.Tests;

public sealed class RecordsImportTests : IDisposable
{
    private const string TwoStations = "station,name,longitude,latitude,elevation_m\nA,Alder,10,60,100\nB,Birk,11,61,\n";
    private readonly string folder = TestData.NewScratchFolder("import");

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private string WriteFile(string name, string text, bool bom = false)
    {
        var path = Path.Combine(folder, name);
        File.WriteAllBytes(path, [.. (bom ? new byte[] { 0xEF, 0xBB, 0xBF } : []), .. Encoding.UTF8.GetBytes(text)]);
        return path;
    }

    private ImportResult Import(string records, Func<ImportOptions, ImportOptions>? change = null, string stations = TwoStations, string name = "r.csv")
    {
        var options = new ImportOptions(WriteFile(name, records), WriteFile("s.csv", stations));
        return RecordsImport.Run(change is null ? options : change(options));
    }

    private static float Depth(ImportResult r, string station, DateOnly date)
    {
        var m = r.Matrix;
        Assert.True(m.Calendar.TryLocate(date, out var season, out var day));
        for (var i = 0; i < m.Rows; i++)
        {
            if (m.Keys[i].Station.Value == station && m.Keys[i].Season == season)
            {
                return m.Row(i)[day];
            }
        }

        return float.NaN;
    }

    private static string Days(string station, DateOnly first, params string[] depths) =>
        string.Concat(depths.Select((d, i) => $"{station},{first.AddDays(i):yyyy-MM-dd},{d}\n"));

    private static void AssertAccounted(QualityReport q) =>
        Assert.Equal(q.RowsRead, q.RowsKept + q.DuplicatesMerged + q.EmptyDepth + q.OtherElement + q.RemovedTotal);

    // ---- units ----

    [Fact]
    public void Depths_in_cm_m_and_inches_are_stored_in_millimetres()
    {
        // 1 in = 25.4 mm exactly (NIST SP 811, appendix B.8); 1 cm = 10 mm; 1 m = 1000 mm.
        var r = Import("station,date,depth,unit\nA,2001-01-01,12,cm\nA,2001-01-02,0.5,m\nA,2001-01-03,10,in\nA,2001-01-04,7,\nA,2001-01-05,3,INCH\n");

        Assert.Equal(120f, Depth(r, "A", new(2001, 1, 1)));
        Assert.Equal(500f, Depth(r, "A", new(2001, 1, 2)));
        Assert.Equal(254f, Depth(r, "A", new(2001, 1, 3)));
        Assert.Equal(7f, Depth(r, "A", new(2001, 1, 4))); // empty unit: the file unit (mm)
        Assert.Equal(76.2f, Depth(r, "A", new(2001, 1, 5)));
    }

    [Fact]
    public void The_file_wide_unit_applies_to_rows_without_a_unit()
    {
        var r = Import("station,date,depth\nA,2001-01-01,2.5\n", o => o with { Unit = DepthUnit.Inch });

        Assert.Equal(63.5f, Depth(r, "A", new(2001, 1, 1))); // 2.5 in × 25.4 mm/in (NIST SP 811)
    }

    // ---- dates and seasons ----

    [Fact]
    public void The_season_boundary_puts_31_August_at_day_364_of_the_previous_season_and_1_September_at_day_0()
    {
        var r = Import("station,date,depth\nA,2000-08-31,5\nA,2000-09-01,6\n");

        Assert.Equal(2, r.Matrix.Rows);
        Assert.Equal(1999, r.Matrix.Keys[0].Season);
        Assert.Equal(5f, r.Matrix.Row(0)[364]);
        Assert.Equal(2000, r.Matrix.Keys[1].Season);
        Assert.Equal(6f, r.Matrix.Row(1)[0]);
    }

    [Fact]
    public void Day_of_season_of_1_March_is_181_under_the_1_September_start()
    {
        // By hand: Sep 30 + Oct 31 + Nov 30 + Dec 31 + Jan 31 + Feb 28 = 181 days before 1 March.
        var r = Import("station,date,depth\nA,2001-03-01,42\n");

        Assert.Equal(2000, r.Matrix.Keys[0].Season);
        Assert.Equal(42f, r.Matrix.Row(0)[181]);
    }

    [Fact]
    public void A_southern_hemisphere_season_from_1_March_ends_on_28_February()
    {
        var r = Import("station,date,depth\nA,2001-02-28,9\nA,2001-03-01,8\n", o => o with { Calendar = new SeasonCalendar(3, 1) });

        Assert.Equal(2000, r.Matrix.Keys[0].Season);
        Assert.Equal(9f, r.Matrix.Row(0)[364]);
        Assert.Equal(2001, r.Matrix.Keys[1].Season);
        Assert.Equal(8f, r.Matrix.Row(1)[0]);
    }

    [Fact]
    public void The_29th_of_February_is_dropped_and_counted_and_1_March_follows_28_February()
    {
        var r = Import("station,date,depth\nA,2004-02-28,1\nA,2004-02-29,2\nA,2004-03-01,3\n");

        Assert.Equal(1, r.Quality.RemovedBy(QualityRule.LeapDay));
        Assert.Equal(1f, r.Matrix.Row(0)[180]);
        Assert.Equal(3f, r.Matrix.Row(0)[181]);
        Assert.Equal(2, r.Matrix.Keys[0].ObservedDays);
        AssertAccounted(r.Quality);
    }

    [Fact]
    public void A_date_with_a_time_of_day_and_the_basic_iso_form_are_read()
    {
        var r = Import("station,date,depth\nA,2001-01-01T07:00:00Z,1\nA,20010102,2\n");

        Assert.Equal(1f, Depth(r, "A", new(2001, 1, 1)));
        Assert.Equal(2f, Depth(r, "A", new(2001, 1, 2)));
    }

    // ---- quality rules, counts worked out by hand ----

    [Fact]
    public void Negative_depths_are_removed_and_counted()
    {
        var r = Import("station,date,depth\nA,2001-01-01,-1\nA,2001-01-02,0\nA,2001-01-03,-9999\nB,2001-01-01,-0.5\n");

        Assert.Equal(3, r.Quality.RemovedBy(QualityRule.NegativeDepth));
        Assert.Equal(1, r.Quality.RowsKept); // the 0 mm day
        AssertAccounted(r.Quality);
    }

    [Fact]
    public void Depths_over_ten_metres_are_implausible_and_removed_while_exactly_ten_metres_is_kept()
    {
        var r = Import("station,date,depth,unit\nA,2001-01-01,10000,mm\nA,2001-01-02,10001,mm\nA,2001-01-03,10.5,m\nA,2001-01-04,1000,cm\n");

        Assert.Equal(2, r.Quality.RemovedBy(QualityRule.ImplausibleDepth));
        Assert.Equal(10000f, Depth(r, "A", new(2001, 1, 1)));
        Assert.Equal(10000f, Depth(r, "A", new(2001, 1, 4)));
    }

    [Fact]
    public void The_implausible_threshold_is_an_option()
    {
        var r = Import("station,date,depth\nA,2001-01-01,3000\nA,2001-01-02,2000\n", o => o with { MaxDepthMm = 2500 });

        Assert.Equal(1, r.Quality.RemovedBy(QualityRule.ImplausibleDepth));
    }

    [Fact]
    public void Unparseable_depths_are_dropped_and_counted_while_within_the_allowed_share()
    {
        // 1 of 4 rows = 25 %, allowed with a 50 % limit.
        var r = Import("station,date,depth\nA,2001-01-01,abc\nA,2001-01-02,1\nA,2001-01-03,2\nA,2001-01-04,3\n", o => o with { MaxUnparseablePercent = 50 });

        Assert.Equal(1, r.Quality.RemovedBy(QualityRule.UnparseableDepth));
        Assert.Equal(3, r.Quality.RowsKept);
    }

    [Fact]
    public void Unparseable_depths_above_the_allowed_share_fail_at_the_first_such_line()
    {
        var path = WriteFile("r.csv", "station,date,depth\nA,2001-01-01,1\nA,2001-01-02,deep\nA,2001-01-03,2\n");
        var options = new ImportOptions(path, WriteFile("s.csv", TwoStations));

        var e = Assert.Throws<SpatialDataException>(() => RecordsImport.Run(options));

        Assert.Equal(3, e.Diagnostic.Line);
        Assert.Contains("'deep'", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Empty_and_NA_depths_are_missing_days_not_errors()
    {
        var r = Import("station,date,depth\nA,2001-01-01,\nA,2001-01-02,NA\nA,2001-01-03,4\n");

        Assert.Equal(2, r.Quality.EmptyDepth);
        Assert.Equal(0, r.Quality.RemovedTotal);
        Assert.True(float.IsNaN(Depth(r, "A", new(2001, 1, 1))));
        AssertAccounted(r.Quality);
    }

    [Fact]
    public void Equal_duplicate_days_are_merged_and_conflicting_ones_dropped_and_reported()
    {
        // Day 1: three equal rows → 1 kept, 2 merged. Day 2: 5 then 6 → conflict, both rows removed; a third row (5) is removed too.
        // Day 3: 10 mm and 1 cm are equal after conversion → merged.
        var r = Import("station,date,depth,unit\nA,2001-01-01,3,\nA,2001-01-01,3,\nA,2001-01-01,3,\nA,2001-01-02,5,\nA,2001-01-02,6,\nA,2001-01-02,5,\nA,2001-01-03,10,mm\nA,2001-01-03,1,cm\n");

        Assert.Equal(3, r.Quality.DuplicatesMerged);
        Assert.Equal(3, r.Quality.RemovedBy(QualityRule.DuplicateConflict));
        Assert.Equal(1, r.Quality.ConflictingDays);
        Assert.Equal(2, r.Quality.RowsKept);
        Assert.True(float.IsNaN(Depth(r, "A", new(2001, 1, 2))));
        var e = Assert.Single(r.Quality.Events, x => x.Rule == QualityRule.DuplicateConflict);
        Assert.Equal(new DateOnly(2001, 1, 2), e.Date);
        AssertAccounted(r.Quality);
    }

    [Fact]
    public void A_one_day_spike_up_and_back_is_removed_but_a_jump_of_exactly_the_threshold_is_not()
    {
        // 100, 700, 100: 600 mm above both neighbours (> 500) → spike. 100, 600, 100: exactly 500 → kept.
        // 100, 700, 700: not back down → kept.
        var first = new DateOnly(2001, 1, 1);
        var r = Import("station,date,depth\n" + Days("A", first, "100", "700", "100", "600", "100", "700", "700", "650"));

        Assert.Equal(1, r.Quality.RemovedBy(QualityRule.Spike));
        Assert.True(float.IsNaN(Depth(r, "A", first.AddDays(1))));
        Assert.Equal(600f, Depth(r, "A", first.AddDays(3)));
        Assert.Equal(700f, Depth(r, "A", first.AddDays(5)));
    }

    [Fact]
    public void A_spike_next_to_a_missing_day_is_not_judged()
    {
        var r = Import("station,date,depth\nA,2001-01-01,100\nA,2001-01-02,900\nA,2001-01-04,100\n");

        Assert.Equal(0, r.Quality.RemovedBy(QualityRule.Spike));
    }

    [Fact]
    public void A_spike_across_the_season_boundary_is_found()
    {
        var r = Import("station,date,depth\nA,2001-08-31,0\nA,2001-09-01,800\nA,2001-09-02,0\n");

        Assert.Equal(1, r.Quality.RemovedBy(QualityRule.Spike));
    }

    [Fact]
    public void Thirty_days_of_one_non_zero_depth_are_a_flat_line_and_removed_while_29_days_or_zeros_are_kept()
    {
        var first = new DateOnly(2001, 1, 1);
        var thirty = Enumerable.Repeat("250", 30).ToArray();
        var twentyNine = Enumerable.Repeat("300", 29).ToArray();
        var zeros = Enumerable.Repeat("0", 40).ToArray();
        var r = Import("station,date,depth\n" + Days("A", first, [.. thirty, "1", .. twentyNine, "2", .. zeros]));

        Assert.Equal(30, r.Quality.RemovedBy(QualityRule.Flatline));
        Assert.True(float.IsNaN(Depth(r, "A", first)));
        Assert.Equal(300f, Depth(r, "A", first.AddDays(31)));
        Assert.Equal(0f, Depth(r, "A", first.AddDays(70)));
        var e = Assert.Single(r.Quality.Events, x => x.Rule == QualityRule.Flatline);
        Assert.Equal(30, e.Days);
    }

    [Fact]
    public void The_flat_line_length_is_an_option()
    {
        var r = Import("station,date,depth\n" + Days("A", new(2001, 1, 1), "5", "5", "5", "6"), o => o with { FlatlineDays = 3 });

        Assert.Equal(3, r.Quality.RemovedBy(QualityRule.Flatline));
    }

    [Fact]
    public void Records_of_stations_missing_from_the_list_are_counted_and_named_in_a_warning()
    {
        var r = Import("station,date,depth\nA,2001-01-01,1\nC,2001-01-01,1\nC,2001-01-02,1\nD,2001-01-01,1\n");

        Assert.Equal(3, r.Quality.RemovedBy(QualityRule.UnknownStation));
        Assert.Equal([new("C", 2L), new KeyValuePair<string, long>("D", 1L)], r.Quality.UnknownStations);
        Assert.Contains(r.Quality.Warnings, w => w.Message.Contains("'C'", StringComparison.Ordinal) && w.Line == 3);
    }

    [Fact]
    public void When_no_record_matches_the_list_the_import_fails_with_a_located_message()
    {
        var path = WriteFile("r.csv", "station,date,depth\nX,2001-01-01,1\n");

        var e = Assert.Throws<SpatialDataException>(() => RecordsImport.Run(new ImportOptions(path, WriteFile("s.csv", TwoStations))));

        Assert.Equal(2, e.Diagnostic.Line);
    }

    [Fact]
    public void A_season_below_min_days_is_kept_and_marked()
    {
        // Season 2000 of A: 250 observed days (not below 250); of B: 249 (below).
        var first = new DateOnly(2000, 9, 1);
        var a = Days("A", first, [.. Enumerable.Range(0, 250).Select(i => (i % 7).ToString())]);
        var b = Days("B", first, [.. Enumerable.Range(0, 249).Select(i => (i % 7).ToString())]);
        var r = Import("station,date,depth\n" + a + b);

        Assert.Equal(2, r.Matrix.Rows);
        Assert.Equal(new SeasonKey(new StationId("A"), 2000, 250, false), r.Matrix.Keys[0]);
        Assert.Equal(new SeasonKey(new StationId("B"), 2000, 249, true), r.Matrix.Keys[1]);
        Assert.Equal(1, r.Quality.SeasonsBelowMinDays);
    }

    [Fact]
    public void Rows_with_a_bad_flag_are_dropped_and_counted_case_insensitively()
    {
        var r = Import("station,date,depth,flag\nA,2001-01-01,1,X\nA,2001-01-02,2,s\nA,2001-01-03,3,\nA,2001-01-04,4,G\n", o => o with { BadFlags = ["X", "S"] });

        Assert.Equal(2, r.Quality.RemovedBy(QualityRule.Flagged));
        Assert.Equal(2, r.Quality.RowsKept);
    }

    [Fact]
    public void Rows_of_another_element_are_skipped_and_the_snow_depth_element_is_kept()
    {
        var r = Import("station,date,depth,element\nA,2001-01-01,1,snow_depth\nA,2001-01-01,30,precipitation\nA,2001-01-02,2,Snow_Depth\n");

        Assert.Equal(1, r.Quality.OtherElement);
        Assert.Equal(2, r.Quality.RowsKept);
        Assert.Equal(0, r.Quality.DuplicatesMerged);
    }

    [Fact]
    public void The_element_value_meaning_snow_depth_is_an_option()
    {
        var r = Import("station,date,depth,element\nA,2001-01-01,1,HSNOW\nA,2001-01-01,30,RAIN\n", o => o with { Element = "hsnow" });

        Assert.Equal(1, r.Quality.RowsKept);
    }

    [Fact]
    public void Column_names_are_options()
    {
        var r = Import("id;day;hs_cm\nA;2001-01-01;12,5\n", o => o with { Columns = new RecordColumns("id", "day", "hs_cm"), Unit = DepthUnit.Centimetre });

        Assert.Equal(125f, Depth(r, "A", new(2001, 1, 1)));
    }

    // ---- awkward but valid inputs ----

    [Fact]
    public void A_byte_order_mark_CRLF_quoted_fields_holding_the_delimiter_and_blank_trailing_lines_are_read()
    {
        var stations = "station,name,longitude,latitude\n\"A,1\",\"Upper, cross\",10,60\n";
        var path = WriteFile("r.csv", "station,date,depth\r\n\"A,1\",2001-01-01,\"7\"\r\n\"A,1\",\"2001-01-02\",8\r\n\r\n\r\n", bom: true);
        var r = RecordsImport.Run(new ImportOptions(path, WriteFile("s.csv", stations)));

        Assert.Equal(2, r.Quality.RowsRead);
        Assert.Equal(7f, Depth(r, "A,1", new(2001, 1, 1)));
        Assert.Equal(8f, Depth(r, "A,1", new(2001, 1, 2)));
    }

    [Fact]
    public void A_semicolon_file_with_decimal_commas_is_read()
    {
        var r = Import("station;date;depth;unit\nA;2001-01-01;12,5;cm\nB;2001-01-01;0,25;m\n");

        Assert.Equal(125f, Depth(r, "A", new(2001, 1, 1)));
        Assert.Equal(250f, Depth(r, "B", new(2001, 1, 1)));
    }

    [Fact]
    public void A_tab_separated_file_with_spaces_around_values_is_read()
    {
        var r = Import("station\tdate\tdepth\nA\t 2001-01-01 \t 15 \n");

        Assert.Equal(15f, Depth(r, "A", new(2001, 1, 1)));
    }

    [Fact]
    public void A_gzip_file_reads_to_the_same_matrix_as_the_plain_file()
    {
        var text = "station,date,depth\n" + Days("A", new(2001, 1, 1), "1", "2", "3") + Days("B", new(2001, 1, 1), "4", "", "6");
        var plain = Import(text);
        var gzPath = Path.Combine(folder, "r.csv.gz");
        using (var gz = new GZipStream(File.Create(gzPath), CompressionLevel.Optimal))
        {
            gz.Write(Encoding.UTF8.GetBytes(text));
        }

        var zipped = RecordsImport.Run(new ImportOptions(gzPath, Path.Combine(folder, "s.csv")));

        Assert.Equal(plain.Matrix.Keys, zipped.Matrix.Keys);
        Assert.Equal(plain.Matrix.Depths.ToArray(), zipped.Matrix.Depths.ToArray());
    }

    [Fact]
    public void Rows_in_any_order_give_the_matrix_ordered_by_station_then_season()
    {
        var r = Import("station,date,depth\nB,2003-01-01,1\nA,2005-01-01,2\nB,2001-01-01,3\nA,2001-01-01,4\n");

        Assert.Equal([("A", 2000), ("A", 2004), ("B", 2000), ("B", 2002)], r.Matrix.Keys.Select(k => (k.Station.Value, k.Season)));
    }

    // ---- whole-run properties ----

    [Fact]
    public void Every_row_is_counted_once_across_all_rules()
    {
        var first = new DateOnly(2001, 1, 1);
        var r = Import(
            "station,date,depth,flag\n" + string.Concat(Days("A", first, "1", "x", "-3", "20000", "5", "5", "", "900", "5").Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => l + ",\n"))
            + "A,2001-01-05,6,\nC,2001-01-01,1,\nA,2001-01-01,1,Q\n",
            o => o with { MaxUnparseablePercent = 20, BadFlags = ["Q"] });

        var q = r.Quality;
        Assert.Equal(12, q.RowsRead);
        Assert.Equal(1, q.RemovedBy(QualityRule.UnparseableDepth));
        Assert.Equal(1, q.RemovedBy(QualityRule.NegativeDepth));
        Assert.Equal(1, q.RemovedBy(QualityRule.ImplausibleDepth));
        Assert.Equal(2, q.RemovedBy(QualityRule.DuplicateConflict)); // 2001-01-05: 5 and 6
        Assert.Equal(1, q.RemovedBy(QualityRule.UnknownStation));
        Assert.Equal(1, q.RemovedBy(QualityRule.Flagged));
        Assert.Equal(1, q.EmptyDepth);
        AssertAccounted(q);
    }

    [Fact]
    public void The_same_inputs_give_byte_identical_output_files()
    {
        var text = "station,date,depth\n" + Days("A", new(2001, 1, 1), "1", "2", "900", "3") + "C,2001-01-01,4\n";
        var r1 = Import(text);
        var r2 = Import(text);
        var out1 = Path.Combine(folder, "o1");
        var out2 = Path.Combine(folder, "o2");

        RecordsImport.WriteResults(out1, r1);
        RecordsImport.WriteResults(out2, r2);

        foreach (var name in new[] { "matrix.parquet", "station_list.csv", "quality.json", "quality.txt" })
        {
            Assert.Equal(File.ReadAllBytes(Path.Combine(out1, name)), File.ReadAllBytes(Path.Combine(out2, name)));
        }

        Assert.Equal(r1.Matrix.Keys, SeasonMatrixFile.Read(Path.Combine(out1, "matrix.parquet")).Keys);
    }

    [Fact]
    public void Options_out_of_range_are_refused_before_reading()
    {
        var options = new ImportOptions("r.csv", "s.csv") { MinDays = 400 };

        Assert.Throws<ArgumentOutOfRangeException>(() => RecordsImport.Run(options));
    }
}

using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Testing;
using Xunit;

namespace Spatial.Core.Tests;

public sealed class CoreVocabularyTests
{
    [Theory]
    [InlineData(1.0, DepthUnit.Inch, 25.4)]       // NIST SP 811 (2008), B.8: 1 in = 2.54 cm exactly
    [InlineData(12.0, DepthUnit.Inch, 304.8)]     // 1 ft = 0.3048 m exactly (same source)
    [InlineData(2.5, DepthUnit.Centimetre, 25.0)] // SI prefixes
    [InlineData(1.2, DepthUnit.Metre, 1200.0)]
    public void Depths_convert_to_millimetres_by_the_exact_definitions(double value, DepthUnit unit, double mm) =>
        Tolerance.Near(mm, DepthUnits.ToMillimetres(value, unit), 1e-12, $"{value} {unit}");

    [Theory]
    [InlineData("MM", DepthUnit.Millimetre)]
    [InlineData("centimetres", DepthUnit.Centimetre)]
    [InlineData("meters", DepthUnit.Metre)]
    [InlineData("inches", DepthUnit.Inch)]
    public void Unit_spellings_are_read_case_insensitively(string text, DepthUnit unit)
    {
        Assert.True(DepthUnits.TryParse(text, out var parsed));
        Assert.Equal(unit, parsed);
    }

    [Fact]
    public void An_unknown_unit_is_not_guessed() => Assert.False(DepthUnits.TryParse("feet", out _));

    [Theory]
    [InlineData("")]
    [InlineData(" A1")]
    [InlineData("A1 ")]
    [InlineData("A\u00011")]
    public void A_malformed_station_id_is_refused(string id) => Assert.False(StationId.IsValid(id, out _));

    [Fact]
    public void A_geotransform_maps_pixels_to_map_coordinates_and_back()
    {
        // GDAL's affine convention: X = x0 + col·dx, Y = y0 + row·dy with dy < 0 for north-up grids.
        var t = GeoTransform.NorthUp(500000, 5200000, 250, 250);
        var (x, y) = t.ToMap(0.5, 0.5);

        Assert.Equal((500125.0, 5199875.0), (x, y));
        var (c, r) = t.ToPixel(x, y);
        Tolerance.Near(0.5, c, 1e-12, "column");
        Tolerance.Near(0.5, r, 1e-12, "row");
    }

    [Fact]
    public void A_diagnostic_prints_as_one_located_line()
    {
        var d = Diagnostic.Error("records.csv", 12, "depth 'abc' is not a number", "write the depth as digits", column: 3);

        Assert.Equal("records.csv:12:3: depth 'abc' is not a number; write the depth as digits", d.ToString());
    }

    [Fact]
    public void A_failed_atomic_write_leaves_the_old_file_and_no_temporary_file()
    {
        var dir = TestData.NewScratchFolder("atomic");
        try
        {
            var path = Path.Combine(dir, "out.txt");
            File.WriteAllText(path, "old");

            Assert.Throws<InvalidOperationException>(() => AtomicFile.Write(path, s =>
            {
                s.WriteByte(1);
                throw new InvalidOperationException("disk full");
            }));

            Assert.Equal("old", File.ReadAllText(path));
            Assert.Single(Directory.GetFiles(dir));
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void A_season_matrix_refuses_an_observed_count_that_disagrees_with_its_data()
    {
        var depths = new float[SeasonCalendar.DaysPerSeason];
        Array.Fill(depths, float.NaN);
        depths[10] = 5;

        Assert.Throws<ArgumentException>(() => new SeasonMatrix(SeasonCalendar.Default, [new SeasonKey(new StationId("A"), 2000, 2, false)], depths));
        var ok = new SeasonMatrix(SeasonCalendar.Default, [new SeasonKey(new StationId("A"), 2000, 1, false)], depths);
        Assert.Equal(5f, ok.Row(0)[10]);
    }
}

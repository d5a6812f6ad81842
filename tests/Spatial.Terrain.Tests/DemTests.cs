using System.Globalization;
using Spatial.Core;
using Spatial.Terrain.Rasters;
using Spatial.Testing;
using Xunit;

namespace Spatial.Terrain.Tests;

public sealed class DemTests
{
    // gdalwarp prints bilinear values in %.15g; our sums run in double over float32 cells.
    private const double BilinearToleranceM = 1e-6;

    public static TheoryData<string> GeoTiffFixtures() =>
        ["dem_f32_strip.tif", "dem_f32_tiled.tif", "dem_i16_strip.tif", "dem_u16_tiled.tif", "dem_f32_point.tif", "dem_f32_geographic.tif"];

    [Theory]
    [MemberData(nameof(GeoTiffFixtures))]
    public void Bilinear_samples_agree_with_GDAL_at_recorded_points(string file)
    {
        // GDAL 3.6.2: gdalwarp -r bilinear one-cell grids read with gdallocationinfo -valonly (data/dem/SOURCES.md).
        var grid = DemFile.Read(TestData.Path("dem", file));
        var rows = ReferenceCsv.Read("dem", "gdal_samples.csv").Where(r => r["file"] == file).ToList();
        Assert.True(rows.Count >= 25);
        foreach (var r in rows)
        {
            var z = Bilinear.Sample(grid, r.D("x"), r.D("y"), out var status);
            if (r["bilinear"].Length == 0)
            {
                Assert.True(double.IsNaN(z), $"{file} at {r["x"]} {r["y"]}: GDAL has no value, we gave {z}");
                Assert.NotEqual(SampleStatus.Ok, status);
            }
            else
            {
                Tolerance.Near(r.D("bilinear"), z, BilinearToleranceM, $"{file} bilinear at {r["x"]} {r["y"]}");
            }
        }
    }

    [Theory]
    [MemberData(nameof(GeoTiffFixtures))]
    public void Cell_values_agree_with_gdallocationinfo_at_recorded_points(string file)
    {
        // GDAL 3.6.2 gdallocationinfo -valonly -geoloc (nearest cell), data/dem/SOURCES.md.
        var grid = DemFile.Read(TestData.Path("dem", file));
        foreach (var r in ReferenceCsv.Read("dem", "gdal_samples.csv").Where(r => r["file"] == file && r["nearest"].Length > 0))
        {
            var (c, w) = grid.Transform.ToPixel(r.D("x"), r.D("y"));
            var raw = grid.Values[((int)Math.Floor(w) * grid.Width) + (int)Math.Floor(c)];
            Tolerance.Near(r.D("nearest"), raw, 1e-4, $"{file} cell value at {r["x"]} {r["y"]}");
        }
    }

    [Fact]
    public void The_GeoTIFF_reader_finds_size_transform_CRS_and_no_data_as_gdalinfo_reports()
    {
        // gdalinfo (GDAL 3.6.2) of the fixtures: Size 60×50, Origin (500000, 6705000), Pixel Size (100, −100), EPSG:32633,
        // NoData −9999; the PixelIsPoint file reports the same origin (GDAL moves the tie point by half a cell).
        foreach (var file in new[] { "dem_f32_strip.tif", "dem_f32_tiled.tif", "dem_i16_strip.tif", "dem_f32_point.tif" })
        {
            var g = DemFile.Read(TestData.Path("dem", file));
            Assert.Equal(60, g.Width);
            Assert.Equal(50, g.Height);
            Assert.Equal(new GeoTransform(500000, 100, 0, 6705000, 0, -100), g.Transform);
            Assert.Equal(CrsDefinition.FromEpsg(32633), g.Crs);
            Assert.Equal(-9999f, g.NoData);
        }

        var geo = DemFile.Read(TestData.Path("dem", "dem_f32_geographic.tif"));
        Assert.Equal(CrsDefinition.Wgs84, geo.Crs);
        Assert.Equal(72, geo.Width);
        Tolerance.Near(60.48117037959419, geo.Transform.OriginY, 1e-12, "origin latitude (gdalinfo)");
    }

    [Fact]
    public void ASCII_grids_with_corner_or_centre_origin_read_like_the_GeoTIFF()
    {
        // Same invented values as dem_f32_strip.tif (see data/dem/make_fixtures.sh); the .prj holds gdalsrsinfo -o wkt1 EPSG:32633.
        var tif = DemFile.Read(TestData.Path("dem", "dem_f32_strip.tif"));
        var corner = DemFile.Read(TestData.Path("dem", "dem_area.asc"));
        var centre = DemFile.Read(TestData.Path("dem", "dem_center.asc"), CrsDefinition.FromEpsg(32633));
        Assert.Equal(CrsDefinition.FromEpsg(32633), corner.Crs);
        foreach (var g in new[] { corner, centre })
        {
            Assert.Equal(tif.Transform, g.Transform);
            Assert.Equal(tif.Values.ToArray(), g.Values.ToArray());
            Assert.Equal(-9999f, g.NoData);
        }
    }

    [Fact]
    public void An_ASCII_grid_without_prj_or_option_is_refused_naming_the_file()
    {
        var e = Assert.Throws<SpatialDataException>(() => DemFile.Read(TestData.Path("dem", "dem_center.asc")));
        Assert.EndsWith("dem_center.asc", e.Diagnostic.File, StringComparison.Ordinal);
        Assert.Contains(".prj", e.Diagnostic.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Broken_files_are_refused_with_the_file_and_what_is_wrong()
    {
        var dir = TestData.NewScratchFolder("dem-bad");
        try
        {
            var notTiff = Path.Combine(dir, "a.tif");
            File.WriteAllText(notTiff, "hello");
            var e1 = Assert.Throws<SpatialDataException>(() => DemFile.Read(notTiff));
            Assert.Equal(notTiff, e1.Diagnostic.File);

            var shortGrid = Path.Combine(dir, "b.asc");
            File.WriteAllText(shortGrid, "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 2 3\n4 5\n");
            var e2 = Assert.Throws<SpatialDataException>(() => DemFile.Read(shortGrid, CrsDefinition.FromEpsg(32633)));
            Assert.Contains("found 5", e2.Diagnostic.Message, StringComparison.Ordinal);

            var badNumber = Path.Combine(dir, "c.asc");
            File.WriteAllText(badNumber, "ncols 2\nnrows 1\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 x2\n");
            var e3 = Assert.Throws<SpatialDataException>(() => DemFile.Read(badNumber, CrsDefinition.FromEpsg(32633)));
            Assert.Equal(6, e3.Diagnostic.Line);

            var truncated = Path.Combine(dir, "d.tif");
            var bytes = File.ReadAllBytes(TestData.Path("dem", "dem_f32_tiled.tif"));
            File.WriteAllBytes(truncated, bytes.AsSpan(0, bytes.Length / 3).ToArray());
            var e4 = Assert.Throws<SpatialDataException>(() => DemFile.Read(truncated));
            Assert.Equal(truncated, e4.Diagnostic.File);
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void Bilinear_samples_agree_with_GDAL_run_live()
    {
        // A real client: GDAL's own bilinear resampling (gdalwarp -r bilinear onto a one-cell grid), read with gdallocationinfo.
        var warp = ExternalTool.Locate("gdalwarp", out var why1);
        var info = ExternalTool.Locate("gdallocationinfo", out var why2);
        if (warp is null || info is null)
        {
            Console.WriteLine(why1 + why2);
            return;
        }

        var dir = TestData.NewScratchFolder("dem-live");
        try
        {
            var file = TestData.Path("dem", "dem_f32_tiled.tif");
            var grid = DemFile.Read(file);
            var rng = new Random(7);
            for (var i = 0; i < 4; i++)
            {
                var x = 500000 + (rng.NextDouble() * 5800) + 100;
                var y = 6705000 - (rng.NextDouble() * 4800) - 100;
                var one = Path.Combine(dir, $"one{i}.tif");
                var r = ExternalTool.Run(warp, "-q", "-r", "bilinear", "-ot", "Float64", "-dstnodata", "-1e30",
                    "-te", F(x - 50), F(y - 50), F(x + 50), F(y + 50), "-tr", "100", "100", file, one);
                Assert.True(r.ExitCode == 0, r.StdErr);
                var v = ExternalTool.Run(info, "-valonly", one, "0", "0");
                var gdal = double.Parse(v.StdOut.Trim(), CultureInfo.InvariantCulture);
                if (gdal == -1e30)
                {
                    Assert.True(double.IsNaN(Bilinear.Sample(grid, x, y, out _)));
                    continue;
                }

                Tolerance.Near(gdal, Bilinear.Sample(grid, x, y, out _), BilinearToleranceM, $"live bilinear at {x} {y}");
                var nearest = ExternalTool.Run(info, "-valonly", "-geoloc", file, F(x), F(y));
                var (c, w) = grid.Transform.ToPixel(x, y);
                Tolerance.Near(double.Parse(nearest.StdOut.Trim(), CultureInfo.InvariantCulture), grid.Values[((int)w * grid.Width) + (int)c], 1e-4, "live cell value");
            }
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    private static string F(double v) => v.ToString("R", CultureInfo.InvariantCulture);
}

using System.Globalization;
using System.Text.Json;
using BitMiracle.LibTiff.Classic;
using Spatial.Core;
using Spatial.Terrain.Rasters;
using Spatial.Testing;
using Xunit;

namespace Spatial.Terrain.Tests;

public sealed class GeoTiffWriterTests : IDisposable
{
    // Coordinates are written as IEEE doubles and printed back by GDAL with 17 significant digits: 1 µm covers that.
    private const double CoordinateToleranceM = 1e-6;
    private const double CoordinateToleranceDeg = 1e-12;

    private readonly string folder = TestData.NewScratchFolder("geotiff-writer");

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private static RasterGrid UtmGrid(out float[] values)
    {
        // 7 columns × 5 rows of 250 m cells in UTM zone 25N; value = 100·row + col, with two sea cells as no data.
        const int w = 7;
        const int h = 5;
        values = new float[w * h];
        for (var r = 0; r < h; r++)
        {
            for (var c = 0; c < w; c++)
            {
                values[(r * w) + c] = (100 * r) + c + 0.25f;
            }
        }

        values[0] = -9999f;
        values[(4 * w) + 6] = -9999f;
        return new RasterGrid(w, h, GeoTransform.NorthUp(480_000, 5_210_000, 250, 250), CrsDefinition.FromEpsg(32625), values, -9999f);
    }

    private static JsonElement GdalInfo(string gdalinfo, string file)
    {
        var (code, stdout, stderr) = ExternalTool.Run(gdalinfo, "-json", file);
        Assert.True(code == 0, $"gdalinfo failed ({code}): {stderr}");
        return JsonDocument.Parse(stdout).RootElement.Clone();
    }

    private static int? EpsgOfWkt(string wkt)
    {
        // The outermost CRS's identifier is the last ID["EPSG",N] of a WKT2 string (GDAL 3 prints WKT2_2019).
        var at = wkt.LastIndexOf("ID[\"EPSG\",", StringComparison.Ordinal);
        if (at < 0)
        {
            return null;
        }

        var start = at + "ID[\"EPSG\",".Length;
        var end = wkt.IndexOf(']', start);
        return int.Parse(wkt.AsSpan(start, end - start), CultureInfo.InvariantCulture);
    }

    [Fact]
    public void A_projected_grid_is_read_by_gdalinfo_with_its_crs_geotransform_and_nodata()
    {
        var gdalinfo = ExternalTool.Locate("gdalinfo", out var why);
        if (gdalinfo is null)
        {
            Console.WriteLine(why);
            return;
        }

        var file = Path.Combine(folder, "utm.tif");
        GeoTiffWriter.Write(file, UtmGrid(out _));
        var info = GdalInfo(gdalinfo, file);

        // GDAL (gdalinfo 3.x, as a real client): size, CRS, corner-based geotransform, band type and no data.
        Assert.Equal(7, info.GetProperty("size")[0].GetInt32());
        Assert.Equal(5, info.GetProperty("size")[1].GetInt32());
        var wkt = info.GetProperty("coordinateSystem").GetProperty("wkt").GetString()!;
        Assert.Equal(32625, EpsgOfWkt(wkt));
        Assert.Contains("UTM zone 25N", wkt, StringComparison.Ordinal);
        var gt = info.GetProperty("geoTransform").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        double[] expected = [480_000, 250, 0, 5_210_000, 0, -250];
        for (var i = 0; i < 6; i++)
        {
            Tolerance.Near(expected[i], gt[i], CoordinateToleranceM, $"geotransform[{i}]");
        }

        var band = info.GetProperty("bands")[0];
        Assert.Equal("Float32", band.GetProperty("type").GetString());
        Assert.Equal(-9999.0, band.GetProperty("noDataValue").GetDouble());
        Assert.Equal("Area", info.GetProperty("metadata").GetProperty("").GetProperty("AREA_OR_POINT").GetString());
    }

    [Fact]
    public void Cell_values_read_by_gdallocationinfo_are_the_values_written()
    {
        var tool = ExternalTool.Locate("gdallocationinfo", out var why);
        if (tool is null)
        {
            Console.WriteLine(why);
            return;
        }

        var file = Path.Combine(folder, "values.tif");
        GeoTiffWriter.Write(file, UtmGrid(out var values));
        foreach (var (col, row) in new[] { (1, 0), (6, 0), (3, 2), (0, 4), (5, 4) })
        {
            // gdallocationinfo -valonly prints the pixel value at (col, row) in its shortest exact form.
            var (code, stdout, stderr) = ExternalTool.Run(tool, "-valonly", file, col.ToString(CultureInfo.InvariantCulture), row.ToString(CultureInfo.InvariantCulture));
            Assert.True(code == 0, stderr);
            Assert.Equal(values[(row * 7) + col], float.Parse(stdout.Trim(), CultureInfo.InvariantCulture));
        }

        // A map point in UTM metres (-geoloc) lands in the cell whose corner-based extent holds it: (480 875, 5 209 375) → col 3, row 2.
        var (c2, s2, e2) = ExternalTool.Run(tool, "-valonly", "-geoloc", file, "480875", "5209375");
        Assert.True(c2 == 0, e2);
        Assert.Equal(203.25f, float.Parse(s2.Trim(), CultureInfo.InvariantCulture));
    }

    [Fact]
    public void A_geographic_grid_is_read_by_gdalinfo_as_wgs84_with_nan_nodata()
    {
        var gdalinfo = ExternalTool.Locate("gdalinfo", out var why);
        if (gdalinfo is null)
        {
            Console.WriteLine(why);
            return;
        }

        var values = Enumerable.Range(0, 12).Select(i => (float)i).ToArray();
        values[5] = float.NaN;
        var grid = new RasterGrid(4, 3, GeoTransform.NorthUp(-33.5, 47.25, 0.125, 0.0625), CrsDefinition.Wgs84, values, float.NaN);
        var file = Path.Combine(folder, "geo.tif");
        GeoTiffWriter.Write(file, grid);
        var info = GdalInfo(gdalinfo, file);

        var wkt = info.GetProperty("coordinateSystem").GetProperty("wkt").GetString()!;
        Assert.Equal(4326, EpsgOfWkt(wkt));
        var gt = info.GetProperty("geoTransform").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        double[] expected = [-33.5, 0.125, 0, 47.25, 0, -0.0625];
        for (var i = 0; i < 6; i++)
        {
            Tolerance.Near(expected[i], gt[i], CoordinateToleranceDeg, $"geotransform[{i}]");
        }

        // gdalinfo -json writes a NaN no-data value as the string "NaN".
        var nd = info.GetProperty("bands")[0].GetProperty("noDataValue");
        Assert.True(nd.ValueKind == JsonValueKind.String ? nd.GetString() == "NaN" : double.IsNaN(nd.GetDouble()), $"noDataValue was {nd}");
    }

    [Fact]
    public void A_rotated_grid_is_written_with_a_model_transformation_that_gdalinfo_reports()
    {
        var gdalinfo = ExternalTool.Locate("gdalinfo", out var why);
        if (gdalinfo is null)
        {
            Console.WriteLine(why);
            return;
        }

        var transform = new GeoTransform(500_000, 200, 50, 5_200_000, 30, -200);
        var grid = new RasterGrid(3, 2, transform, CrsDefinition.FromEpsg(32625), new float[6], null);
        var file = Path.Combine(folder, "rotated.tif");
        GeoTiffWriter.Write(file, grid);
        var gt = GdalInfo(gdalinfo, file).GetProperty("geoTransform").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        double[] expected = [500_000, 200, 50, 5_200_000, 30, -200];
        for (var i = 0; i < 6; i++)
        {
            Tolerance.Near(expected[i], gt[i], CoordinateToleranceM, $"geotransform[{i}]");
        }
    }

    [Fact]
    public void The_tags_follow_the_geotiff_standard_layout()
    {
        var file = Path.Combine(folder, "tags.tif");
        GeoTiffWriter.Write(file, UtmGrid(out var values));
        using var tiff = Tiff.Open(file, "r");
        Assert.NotNull(tiff);

        // TIFF 6.0 baseline fields for a float32 single-band image (SampleFormat 3 = IEEE floating point).
        Assert.Equal(32, tiff.GetField(TiffTag.BITSPERSAMPLE)[0].ToInt());
        Assert.Equal(3, tiff.GetField(TiffTag.SAMPLEFORMAT)[0].ToInt());

        // OGC GeoTIFF 1.1 (19-008r4): key directory header 1,1,0,N; GTModelType 1024 = 1 (projected),
        // GTRasterType 1025 = 1 (PixelIsArea), ProjectedCSType 3072 = EPSG code, ProjLinearUnits 3076 = 9001 (metre).
        var keyField = tiff.GetField(TiffTag.GEOTIFF_GEOKEYDIRECTORYTAG);
        var keys = keyField[1].ToShortArray().Select(s => (ushort)s).ToArray();
        Assert.Equal(new ushort[] { 1, 1, 0, 4, 1024, 0, 1, 1, 1025, 0, 1, 1, 3072, 0, 1, 32625, 3076, 0, 1, 9001 }, keys);
        var scale = tiff.GetField(TiffTag.GEOTIFF_MODELPIXELSCALETAG)[1].ToDoubleArray();
        Assert.Equal(new double[] { 250, 250, 0 }, scale);
        var tie = tiff.GetField(TiffTag.GEOTIFF_MODELTIEPOINTTAG)[1].ToDoubleArray();
        Assert.Equal(new double[] { 0, 0, 0, 480_000, 5_210_000, 0 }, tie);

        // Strip data decode back to the values written.
        var back = new float[values.Length];
        var rowBytes = new byte[7 * sizeof(float)];
        for (var r = 0; r < 5; r++)
        {
            Assert.True(tiff.ReadScanline(rowBytes, r));
            for (var c = 0; c < 7; c++)
            {
                back[(r * 7) + c] = BitConverter.ToSingle(rowBytes, c * sizeof(float));
            }
        }

        Assert.Equal(values, back);
    }

    [Fact]
    public void The_same_grid_gives_the_same_bytes_and_no_temporary_file_is_left()
    {
        var a = Path.Combine(folder, "a.tif");
        var b = Path.Combine(folder, "b.tif");
        GeoTiffWriter.Write(a, UtmGrid(out _));
        GeoTiffWriter.Write(b, UtmGrid(out _));
        Assert.Equal(File.ReadAllBytes(a), File.ReadAllBytes(b));
        Assert.Equal(new[] { "a.tif", "b.tif" }, Directory.GetFiles(folder).Select(Path.GetFileName).Order(StringComparer.Ordinal).ToArray());
    }

    [Fact]
    public void A_crs_given_only_as_wkt_is_refused_before_anything_is_written()
    {
        var grid = new RasterGrid(1, 1, GeoTransform.NorthUp(0, 0, 1, 1), new CrsDefinition(null, "LOCAL_CS[\"x\"]"), new float[1], null);
        var file = Path.Combine(folder, "wkt.tif");
        var e = Assert.Throws<ArgumentException>(() => GeoTiffWriter.Write(file, grid));
        Assert.Contains("EPSG", e.Message, StringComparison.Ordinal);
        Assert.False(File.Exists(file));
    }
}

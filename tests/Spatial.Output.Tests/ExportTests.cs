using System.Text.Json;
using System.Text.RegularExpressions;
using Microsoft.Data.Sqlite;
using Spatial.Core;
using Spatial.Output.Layers;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class ExportTests
{
    /// <summary>Degrees: 1e-7° ≈ 1 cm, well inside PROJ's printed 9 decimals and ProjNET's UTM accuracy.</summary>
    private const double DegreeTolerance = 1e-7;

    private static (ExportResult Result, string Dir) Export(LayerFormats formats = LayerFormats.All, int precision = 6, bool rasters = true)
    {
        var dir = TestData.NewScratchFolder("export");
        var result = LayerExport.Write(
            Fixtures.Results(),
            new ExportOptions(dir, formats, precision, Dem: rasters ? Fixtures.ConeDem() : null, Surfaces: rasters ? new Dictionary<string, RasterGrid> { ["median_c1"] = Fixtures.Surface() } : null));
        return (result, dir);
    }

    [Fact]
    public void Every_layer_of_the_results_folder_is_written_with_one_feature_per_row()
    {
        var (result, dir) = Export();
        Assert.Equal(6, result.FeatureCounts["stations"]);
        Assert.Equal(30, result.FeatureCounts["seasons"]);
        Assert.Equal(1, result.FeatureCounts["coastline"]);
        Assert.Equal(1, result.FeatureCounts["surface_footprint"]);
        foreach (var f in new[] { "stations.geojson", "seasons.geojson", "coastline.geojson", "surface_footprint.geojson", "spatial.gpkg", "stations.csv", "hillshade.png", "hillshade.json", "predicted_median_c1.png", "predicted_median_c1.json" })
        {
            Assert.True(File.Exists(Path.Combine(dir, f)), f);
        }

        Directory.Delete(dir, true);
    }

    [Fact]
    public void Stations_layer_joins_every_table_and_carries_unknown_columns_with_numbers_as_numbers()
    {
        var (_, dir) = Export(LayerFormats.GeoJson, rasters: false);
        using var doc = JsonDocument.Parse(File.ReadAllText(Path.Combine(dir, "stations.geojson")));
        var first = doc.RootElement.GetProperty("features")[0];
        var p = first.GetProperty("properties");

        // Values as written in the invented results/ files (see data/SOURCES.md).
        Assert.Equal("MF01", p.GetProperty("station").GetString());
        Assert.Equal("Harrow Gap", p.GetProperty("name").GetString());
        Assert.Equal(5, p.GetProperty("seasons").GetInt64());
        Assert.Equal(399.585, p.GetProperty("median_c1").GetDouble());
        Assert.Equal(420.27, p.GetProperty("elevation_dem_m").GetDouble());
        Assert.Equal(222.185, p.GetProperty("median_c1_fitted").GetDouble());
        Assert.Equal(32.769, p.GetProperty("median_c1_residual").GetDouble());
        Assert.Equal(0.8956, p.GetProperty("median_c1_local_r2").GetDouble());
        Assert.Equal("checked", p.GetProperty("operator_note").GetString());
        Assert.Equal(JsonValueKind.Null, p.GetProperty("elevation_flag").ValueKind);
        var mf05 = doc.RootElement.GetProperty("features").EnumerateArray().Single(f => f.GetProperty("properties").GetProperty("station").GetString() == "MF05");
        Assert.Equal(JsonValueKind.Null, mf05.GetProperty("properties").GetProperty("operator_note").ValueKind);
        Assert.Equal(-8.21, first.GetProperty("geometry").GetProperty("coordinates")[0].GetDouble());
        Directory.Delete(dir, true);
    }

    [Fact]
    public void GeoJson_layers_follow_RFC_7946_structure_winding_and_precision()
    {
        var (_, dir) = Export(LayerFormats.GeoJson, precision: 4);
        foreach (var f in Directory.GetFiles(dir, "*.geojson"))
        {
            var problems = Rfc7946Checker.Check(f, 4);
            Assert.True(problems.Count == 0, $"{Path.GetFileName(f)}: {string.Join("; ", problems)}");
        }

        Directory.Delete(dir, true);
    }

    [Fact]
    public void Footprint_corners_match_PROJ_for_the_UTM_grid()
    {
        var (_, dir) = Export(LayerFormats.GeoJson, precision: 9);
        using var doc = JsonDocument.Parse(File.ReadAllText(Path.Combine(dir, "surface_footprint.geojson")));
        var ring = doc.RootElement.GetProperty("features")[0].GetProperty("geometry").GetProperty("coordinates")[0].EnumerateArray()
            .Select(p => (Lon: p[0].GetDouble(), Lat: p[1].GetDouble())).ToArray();

        // PROJ 9.1.1 cs2cs EPSG:32629 → EPSG:4326 (data/SOURCES.md): corner (530000, 6510000) and (560000, 6480000).
        Assert.Contains(ring, p => Math.Abs(p.Lon - -8.481888796) < DegreeTolerance && Math.Abs(p.Lat - 58.729066575) < DegreeTolerance);
        Assert.Contains(ring, p => Math.Abs(p.Lon - -7.971785205) < DegreeTolerance && Math.Abs(p.Lat - 58.456550362) < DegreeTolerance);
        var side = JsonDocument.Parse(File.ReadAllText(Path.Combine(dir, "hillshade.json"))).RootElement;

        // Bounds of the outline: west is the south-west corner's longitude, north the north-west corner's latitude (PROJ, as above).
        Tolerance.Near(-8.485856861, side.GetProperty("west").GetDouble(), DegreeTolerance, "hillshade west");
        Tolerance.Near(58.729066575, side.GetProperty("north").GetDouble(), DegreeTolerance, "hillshade north");
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Same_inputs_give_byte_identical_files()
    {
        var (_, a) = Export();
        var (_, b) = Export();
        foreach (var f in Directory.GetFiles(a).Select(Path.GetFileName))
        {
            Assert.Equal(File.ReadAllBytes(Path.Combine(a, f!)), File.ReadAllBytes(Path.Combine(b, f!)));
        }

        Directory.Delete(a, true);
        Directory.Delete(b, true);
    }

    [Fact]
    public void A_missing_optional_file_leaves_its_layer_out_with_a_note()
    {
        var src = Fixtures.ResultsWithout("seasons.csv", "regression/local.csv", "coastline.geojson");
        var dir = TestData.NewScratchFolder("export-missing");
        var result = LayerExport.Write(ResultsFolder.Open(src), new ExportOptions(dir, LayerFormats.GeoJson));
        Assert.False(result.FeatureCounts.ContainsKey("seasons"));
        Assert.False(result.FeatureCounts.ContainsKey("coastline"));
        Assert.Equal(6, result.FeatureCounts["stations"]);
        Assert.Contains(result.Notes, n => n.Contains("seasons.csv", StringComparison.Ordinal));
        Assert.Contains(result.Notes, n => n.Contains("local.csv", StringComparison.Ordinal));
        Assert.False(File.Exists(Path.Combine(dir, "seasons.geojson")));
        Directory.Delete(src, true);
        Directory.Delete(dir, true);
    }

    [Fact]
    public void A_station_outside_longitude_latitude_ranges_is_a_located_data_error()
    {
        var src = Fixtures.ResultsWithout();
        var list = Path.Combine(src, "station_list.csv");
        File.WriteAllText(list, File.ReadAllText(list).Replace("-8.21,58.62", "546493,6495790", StringComparison.Ordinal));
        var e = Assert.Throws<SpatialDataException>(() => LayerExport.Write(ResultsFolder.Open(src), new ExportOptions(Path.Combine(src, "out"))));
        Assert.Equal("station_list.csv", e.Diagnostic.File);
        Assert.Equal(2, e.Diagnostic.Line);
        Assert.False(Directory.Exists(Path.Combine(src, "out")) && Directory.GetFiles(Path.Combine(src, "out")).Length > 0);
        Directory.Delete(src, true);
    }

    [Fact]
    public void GeoPackage_has_the_required_identity_tables_and_spatial_index()
    {
        var (_, dir) = Export(LayerFormats.GeoPackage);
        using var db = new SqliteConnection($"Data Source={Path.Combine(dir, "spatial.gpkg")};Mode=ReadOnly;Pooling=False");
        db.Open();
        long Scalar(string sql)
        {
            using var c = db.CreateCommand();
            c.CommandText = sql;
            return Convert.ToInt64(c.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture);
        }

        // OGC GeoPackage 1.3: application_id 'GPKG' = 0x47504B47 (req. 2), user_version 10300 (req. 2), SRS rows −1, 0, 4326 (reqs. 11–13).
        Assert.Equal(0x47504B47, Scalar("PRAGMA application_id"));
        Assert.Equal(10300, Scalar("PRAGMA user_version"));
        Assert.Equal(3, Scalar("SELECT count(*) FROM gpkg_spatial_ref_sys WHERE srs_id IN (-1, 0, 4326)"));
        Assert.Equal(4, Scalar("SELECT count(*) FROM gpkg_contents WHERE data_type = 'features' AND srs_id = 4326"));
        Assert.Equal(4, Scalar("SELECT count(*) FROM gpkg_extensions WHERE extension_name = 'gpkg_rtree_index'"));
        Assert.Equal(6, Scalar("SELECT count(*) FROM rtree_stations_geom"));
        Assert.Equal(6, Scalar("SELECT count(*) FROM sqlite_master WHERE type = 'trigger' AND tbl_name = 'stations'"));
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Ogrinfo_reads_every_GeoJSON_and_GeoPackage_layer_with_counts_fields_and_EPSG_4326()
    {
        var ogrinfo = ExternalTool.Locate("ogrinfo", out var why);
        if (ogrinfo is null)
        {
            Console.WriteLine(why);
            return;
        }

        var (result, dir) = Export(LayerFormats.GeoJson | LayerFormats.GeoPackage);
        var layers = ExportLayers();
        foreach (var layer in layers)
        {
            var (code, stdout, stderr) = ExternalTool.Run(ogrinfo, "-ro", "-al", "-so", Path.Combine(dir, layer.Name + ".geojson"));
            Assert.True(code == 0, stderr);
            CheckLayer(layer, Blocks(stdout)[layer.Name], result.FeatureCounts[layer.Name]);
        }

        var (gcode, gout, gerr) = ExternalTool.Run(ogrinfo, "-ro", "-al", "-so", Path.Combine(dir, "spatial.gpkg"));
        Assert.True(gcode == 0, gerr);
        Assert.DoesNotContain("ERROR", gerr, StringComparison.Ordinal);
        var blocks = Blocks(gout);
        Assert.Equal(layers.Select(l => l.Name).Order(), blocks.Keys.Order());
        foreach (var layer in layers)
        {
            CheckLayer(layer, blocks[layer.Name], result.FeatureCounts[layer.Name]);
        }

        Directory.Delete(dir, true);
    }

    [Fact]
    public void Ogrinfo_finds_the_GeoPackage_spatial_index_and_reads_features_through_it()
    {
        var ogrinfo = ExternalTool.Locate("ogrinfo", out var why);
        if (ogrinfo is null)
        {
            Console.WriteLine(why);
            return;
        }

        var (_, dir) = Export(LayerFormats.GeoPackage, rasters: false);
        var gpkg = Path.Combine(dir, "spatial.gpkg");

        // GDAL's SQLite dialect: HasSpatialIndex is 1 when the gpkg_rtree_index extension is registered and its table exists.
        var (code, stdout, stderr) = ExternalTool.Run(ogrinfo, "-ro", gpkg, "-sql", "SELECT HasSpatialIndex('stations', 'geom')");
        Assert.True(code == 0, stderr);
        Assert.Contains("HasSpatialIndex (Integer) = 1", stdout, StringComparison.Ordinal);

        // A spatial filter around MF03 (−8.33, 58.55) must find exactly that station.
        var (code2, out2, err2) = ExternalTool.Run(ogrinfo, "-ro", "-spat", "-8.34", "58.54", "-8.32", "58.56", gpkg, "stations");
        Assert.True(code2 == 0, err2);
        Assert.Contains("Feature Count: 1", out2, StringComparison.Ordinal);
        Assert.Contains("station (String) = MF03", out2, StringComparison.Ordinal);
        Assert.DoesNotContain("station (String) = MF01", out2, StringComparison.Ordinal);
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Hillshade_image_lights_the_north_west_flank_of_a_cone_and_leaves_the_sea_transparent()
    {
        var dir = TestData.NewScratchFolder("hillshade");
        var bounds = LayerExport.WriteHillshade(Fixtures.ConeDem(), dir);
        using var bitmap = SkiaSharp.SKBitmap.Decode(Path.Combine(dir, "hillshade.png"));
        var utm = Spatial.Output.Internal.CrsTransform.For(CrsDefinition.FromEpsg(32629), "test");
        SkiaSharp.SKColor At(double e, double n)
        {
            // Equirectangular: columns linear in longitude, rows linear in latitude (hillshade.json bounds).
            var (lon, lat) = utm.ToLonLat(e, n);
            var x = (int)((lon - bounds.West) / (bounds.East - bounds.West) * bitmap.Width);
            var y = (int)((bounds.North - lat) / (bounds.North - bounds.South) * bitmap.Height);
            return bitmap.GetPixel(x, y);
        }

        // Cone centre (545 000, 6 495 000); flanks 5 km to the north-west and south-east; sea 14.5 km east.
        var northWest = At(541_464, 6_498_536);
        var southEast = At(548_536, 6_491_464);
        // The cone falls 900 m in 15 km (gradient 0.06): a flank facing the light (NW) or away from it (SE) gets, by the
        // standard formula cos Z cos S ± sin Z sin S with Z = 45°, S = atan 0.06 (common practice), 0.7482 and 0.6635 → grey 190.8 and 169.2.
        var s = Math.Atan(0.06);
        var lit = Math.Cos(Math.PI / 4) * (Math.Cos(s) + Math.Sin(s)) * 255;
        var away = Math.Cos(Math.PI / 4) * (Math.Cos(s) - Math.Sin(s)) * 255;
        Tolerance.Near(lit, northWest.Red, 1.5, "grey of the lit flank (levels)");
        Tolerance.Near(away, southEast.Red, 1.5, "grey of the shaded flank (levels)");
        Assert.Equal(0, At(559_500, 6_495_000).Alpha);
        Directory.Delete(dir, true);
    }

    private static List<Layer> ExportLayers()
    {
        var notes = new List<string>();
        return LayerExport.BuildLayers(Fixtures.Results(), new ExportOptions("unused", Surfaces: new Dictionary<string, RasterGrid> { ["median_c1"] = Fixtures.Surface() }), notes);
    }

    private static Dictionary<string, string> Blocks(string ogrinfoOutput)
    {
        var blocks = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var part in ogrinfoOutput.Split("Layer name: ").Skip(1))
        {
            var name = part[..part.IndexOf('\n', StringComparison.Ordinal)].Trim();
            blocks[name] = part;
        }

        return blocks;
    }

    private static void CheckLayer(Layer layer, string block, int expectedCount)
    {
        Assert.Contains($"Feature Count: {expectedCount}", block, StringComparison.Ordinal);
        Assert.Matches("ID\\[\"EPSG\",4326\\]", block);
        var fields = Regex.Matches(block, "^([A-Za-z0-9_]+): (String|Real|Integer64|Integer|Date|DateTime) \\(", RegexOptions.Multiline)
            .ToDictionary(m => m.Groups[1].Value, m => m.Groups[2].Value, StringComparer.Ordinal);
        foreach (var f in layer.Fields)
        {
            Assert.True(fields.TryGetValue(f.Name, out var type), $"{layer.Name}: field {f.Name} missing in ogrinfo output");
            var expected = f.Type switch { FieldType.Integer => "Integer", FieldType.Real => "Real", _ => "String" };
            Assert.True(type.StartsWith(expected, StringComparison.Ordinal), $"{layer.Name}.{f.Name}: expected {expected}, ogrinfo says {type}");
        }

        Assert.Equal(layer.Fields.Count, fields.Count);
    }
}

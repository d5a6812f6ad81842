using System.Globalization;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using NetTopologySuite.IO;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Output.Internal;
using Spatial.Output.Layers;
using Spatial.Output.Raster;

namespace Spatial.Output;

/// <summary>Formats of exported layers.</summary>
[Flags]
public enum LayerFormats
{
    /// <summary>None.</summary>
    None = 0,

    /// <summary>RFC 7946 GeoJSON, one file per layer.</summary>
    GeoJson = 1,

    /// <summary>OGC GeoPackage 1.3, all layers in <c>spatial.gpkg</c>.</summary>
    GeoPackage = 2,

    /// <summary>CSV copies (points with longitude/latitude columns, other geometry as WKT).</summary>
    Csv = 4,

    /// <summary>All formats.</summary>
    All = GeoJson | GeoPackage | Csv,
}

/// <summary>Options of <see cref="LayerExport.Write"/>.</summary>
/// <param name="OutDir">Folder to write the layers into (created when needed).</param>
/// <param name="Formats">Which formats to write.</param>
/// <param name="Precision">Decimals of GeoJSON coordinates (0…15; 6 ≈ 0.1 m).</param>
/// <param name="CoastPath">A coastline GeoJSON (WGS 84) to use instead of one found in the results folder.</param>
/// <param name="Dem">A DEM grid for <c>hillshade.png</c>; null leaves the hillshade out.</param>
/// <param name="Surfaces">Predicted surfaces by response name (float grids, no data at sea); null or empty leaves them out.</param>
public sealed record ExportOptions(
    string OutDir,
    LayerFormats Formats = LayerFormats.All,
    int Precision = 6,
    string? CoastPath = null,
    RasterGrid? Dem = null,
    IReadOnlyDictionary<string, RasterGrid>? Surfaces = null);

/// <summary>What <see cref="LayerExport.Write"/> wrote.</summary>
/// <param name="Files">Files written, relative to the output folder, ordinal order.</param>
/// <param name="FeatureCounts">Features per layer name.</param>
/// <param name="Notes">What was left out and why.</param>
public sealed record ExportResult(IReadOnlyList<string> Files, IReadOnlyDictionary<string, int> FeatureCounts, IReadOnlyList<string> Notes);

/// <summary>
/// Exports a results folder as GIS layers: <c>stations</c> (every per-station column joined on the station id),
/// <c>seasons</c> (station-season rows at the station points), <c>coastline</c> and <c>surface_footprint</c>, in
/// GeoJSON (RFC 7946), one GeoPackage and CSV; plus <c>hillshade.png/.json</c> from a DEM and
/// <c>predicted_RESPONSE.png/.json</c> per surface for the map page. Missing inputs leave their layer out with a note.
/// Same inputs and options give byte-identical files.
/// </summary>
public static class LayerExport
{
    /// <summary>Writes the layers. Throws <see cref="SpatialDataException"/> on unusable input data.</summary>
    public static ExportResult Write(ResultsFolder folder, ExportOptions options)
    {
        ArgumentNullException.ThrowIfNull(folder);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfNegative(options.Precision);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(options.Precision, 15);
        var notes = new List<string>();
        var layers = BuildLayers(folder, options, notes);
        var files = new List<string>();
        var dir = options.OutDir;
        Directory.CreateDirectory(dir);
        foreach (var layer in layers)
        {
            if (options.Formats.HasFlag(LayerFormats.GeoJson))
            {
                GeoJsonLayerWriter.Write(layer, Path.Combine(dir, layer.Name + ".geojson"), options.Precision);
                files.Add(layer.Name + ".geojson");
            }

            if (options.Formats.HasFlag(LayerFormats.Csv))
            {
                WriteCsv(layer, Path.Combine(dir, layer.Name + ".csv"));
                files.Add(layer.Name + ".csv");
            }
        }

        if (options.Formats.HasFlag(LayerFormats.GeoPackage) && layers.Count > 0)
        {
            GeoPackageLayerWriter.Write(layers, Path.Combine(dir, "spatial.gpkg"), LastChange(folder));
            files.Add("spatial.gpkg");
        }

        if (options.Dem is { } dem)
        {
            WriteHillshade(dem, dir);
            files.Add("hillshade.png");
            files.Add("hillshade.json");
        }
        else
        {
            notes.Add("no DEM was given: hillshade.png is left out");
        }

        foreach (var (response, grid) in (options.Surfaces ?? new Dictionary<string, RasterGrid>()).OrderBy(kv => kv.Key, StringComparer.Ordinal))
        {
            WriteSurface(response, grid, dir);
            files.Add($"predicted_{response}.png");
            files.Add($"predicted_{response}.json");
        }

        return new ExportResult(
            files.Order(StringComparer.Ordinal).ToArray(),
            layers.ToDictionary(l => l.Name, l => l.Features.Count, StringComparer.Ordinal),
            notes);
    }

    internal static List<Layer> BuildLayers(ResultsFolder folder, ExportOptions options, List<string> notes)
    {
        var points = LayerBuilder.StationPoints(folder, notes);
        var layers = new List<Layer>();
        void Add(Layer? l)
        {
            if (l is not null)
            {
                layers.Add(l);
            }
        }

        Add(LayerBuilder.Stations(folder, points, notes));
        Add(LayerBuilder.Seasons(folder, points, notes));
        Add(LayerBuilder.Coastline(options.CoastPath ?? folder.CoastlinePath, notes));
        Add(LayerBuilder.Footprints(options.Surfaces, notes));
        return layers;
    }

    /// <summary>Writes <c>hillshade.png</c> (equirectangular, rows equally spaced in latitude) and <c>hillshade.json</c> (bounds in degrees).</summary>
    public static GeoBounds WriteHillshade(RasterGrid dem, string dir)
    {
        ArgumentNullException.ThrowIfNull(dem);
        var shade = Hillshade.Compute(dem);
        var bounds = RasterImage.Bounds(dem, "DEM");
        var image = RasterImage.Equirectangular(dem, shade, bounds, RasterImage.Grey, "DEM");
        AtomicFile.WriteAllBytes(Path.Combine(dir, "hillshade.png"), image.ToPng());
        WriteSideFile(Path.Combine(dir, "hillshade.json"), w =>
        {
            Bounds(w, bounds);
            w.WriteNumber("width", image.Width);
            w.WriteNumber("height", image.Height);
            w.WriteString("method", "Horn 1981 gradients, light from azimuth 315°, altitude 45°");
        });
        return bounds;
    }

    /// <summary>Writes <c>predicted_RESPONSE.png</c> (equirectangular, coloured on the variable's scale) and its <c>.json</c> side file.</summary>
    public static void WriteSurface(string response, RasterGrid grid, string dir)
    {
        ArgumentException.ThrowIfNullOrEmpty(response);
        ArgumentNullException.ThrowIfNull(grid);
        var values = grid.Values.ToArray();
        double min = double.PositiveInfinity, max = double.NegativeInfinity;
        foreach (var v in values)
        {
            if (!grid.IsNoData(v))
            {
                min = Math.Min(min, v);
                max = Math.Max(max, v);
            }
        }

        if (double.IsInfinity(min))
        {
            min = max = double.NaN;
        }

        var scale = Variables.Scale(response, min, max);
        var bounds = RasterImage.Bounds(grid, $"predicted_{response}");
        var image = RasterImage.Equirectangular(grid, values, bounds, v =>
        {
            var c = scale.At(scale.Position(v, min, max));
            return (c.R, c.G, c.B, 255);
        }, $"predicted_{response}");
        AtomicFile.WriteAllBytes(Path.Combine(dir, $"predicted_{response}.png"), image.ToPng());
        WriteSideFile(Path.Combine(dir, $"predicted_{response}.json"), w =>
        {
            Bounds(w, bounds);
            w.WriteNumber("width", image.Width);
            w.WriteNumber("height", image.Height);
            w.WriteString("response", response);
            Number(w, "min", min);
            Number(w, "max", max);
            w.WriteString("unit", Variables.Unit(response));
            w.WriteString("scale", scale.Name);
            w.WriteBoolean("diverging", scale.Diverging);
            w.WriteStartArray("legend");
            for (var i = 0; i <= 10; i++)
            {
                w.WriteStringValue(scale.At(i / 10.0).Hex);
            }

            w.WriteEndArray();
        });
    }

    private static void Bounds(Utf8JsonWriter w, GeoBounds b)
    {
        w.WriteNumber("west", GeoJsonLayerWriter.Round(b.West, 7));
        w.WriteNumber("south", GeoJsonLayerWriter.Round(b.South, 7));
        w.WriteNumber("east", GeoJsonLayerWriter.Round(b.East, 7));
        w.WriteNumber("north", GeoJsonLayerWriter.Round(b.North, 7));
    }

    private static void Number(Utf8JsonWriter w, string name, double v)
    {
        if (double.IsFinite(v))
        {
            w.WriteNumber(name, v);
        }
        else
        {
            w.WriteNull(name);
        }
    }

    private static void WriteSideFile(string path, Action<Utf8JsonWriter> body) =>
        AtomicFile.Write(path, s =>
        {
            using (var w = new Utf8JsonWriter(s, new JsonWriterOptions { Indented = true, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping }))
            {
                w.WriteStartObject();
                body(w);
                w.WriteEndObject();
            }

            s.WriteByte((byte)'\n');
        });

    private static void WriteCsv(Layer layer, string path)
    {
        var point = layer.GeometryType == "POINT";
        var hasLonLat = layer.Fields.Any(f => f.Name == "longitude") && layer.Fields.Any(f => f.Name == "latitude");
        var wkt = new WKTWriter();
        AtomicFile.WriteText(path, w =>
        {
            var header = layer.Fields.Select(f => Internal.Csv.Field(f.Name)).ToList();
            header.InsertRange(header.Count > 0 && layer.Fields[0].Name == "station" ? 1 : 0, point ? (hasLonLat ? [] : ["longitude", "latitude"]) : ["wkt"]);
            w.WriteLine(string.Join(',', header));
            foreach (var f in layer.Features)
            {
                var fields = f.Values.Select(v => v switch
                {
                    null => string.Empty,
                    double d => Internal.Csv.Number(d),
                    long l => l.ToString(CultureInfo.InvariantCulture),
                    _ => Internal.Csv.Field(Convert.ToString(v, CultureInfo.InvariantCulture) ?? string.Empty),
                }).ToList();
                var geo = point && hasLonLat ? []
                    : point
                    ? new[] { Internal.Csv.Number(f.Geometry.Coordinate.X), Internal.Csv.Number(f.Geometry.Coordinate.Y) }
                    : [Internal.Csv.Field(wkt.Write(f.Geometry))];
                fields.InsertRange(layer.Fields.Count > 0 && layer.Fields[0].Name == "station" ? 1 : 0, geo);
                w.WriteLine(string.Join(',', fields));
            }
        });
    }

    /// <summary>The gpkg_contents time stamp: the latest run time in manifest.json (an input), so output stays deterministic.</summary>
    private static string LastChange(ResultsFolder folder)
    {
        var latest = DateTime.UnixEpoch;
        if (folder.Manifest?["runs"] is System.Text.Json.Nodes.JsonObject runs)
        {
            foreach (var (verb, run) in runs)
            {
                if (verb is "export" or "report")
                {
                    continue; // the outputs' own runs; counting them would change the file at every export
                }

                if (Json.Text(run?["time_utc"]) is { } t
                    && DateTime.TryParse(t, CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal | DateTimeStyles.AssumeUniversal, out var d)
                    && d > latest)
                {
                    latest = d;
                }
            }
        }

        return latest.ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", CultureInfo.InvariantCulture);
    }

    internal static string Describe(ExportResult r)
    {
        var sb = new StringBuilder();
        foreach (var (k, v) in r.FeatureCounts)
        {
            sb.Append(CultureInfo.InvariantCulture, $"{k}: {v} features; ");
        }

        return sb.ToString();
    }
}

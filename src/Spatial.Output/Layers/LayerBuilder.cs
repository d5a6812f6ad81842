using System.Globalization;
using System.Text.Json;
using NetTopologySuite.Algorithm;
using NetTopologySuite.Features;
using NetTopologySuite.Geometries;
using NetTopologySuite.IO.Converters;
using Spatial.Core;
using Spatial.Output.Internal;

namespace Spatial.Output.Layers;

/// <summary>Builds the export layers from a results folder by joining its tables on the station id.</summary>
internal static class LayerBuilder
{
    private static readonly GeometryFactory Factory = new(new PrecisionModel(), 4326);

    /// <summary>Station id → (longitude, latitude) from station_list.csv, else covariates.csv. Empty when neither exists.</summary>
    public static SortedDictionary<string, (double Lon, double Lat)> StationPoints(ResultsFolder folder, List<string> notes)
    {
        var points = new SortedDictionary<string, (double, double)>(StringComparer.Ordinal);
        var source = folder.StationList is { } sl && sl.Has("longitude") ? sl : folder.Covariates;
        if (source is null || !source.Has("longitude") || !source.Has("latitude"))
        {
            notes.Add("no station points: station_list.csv (or covariates.csv with longitude, latitude) is missing; the station and season layers are left out");
            return points;
        }

        var id = source.Require("station");
        var lon = source.Require("longitude");
        var lat = source.Require("latitude");
        for (var r = 0; r < source.Rows.Count; r++)
        {
            var row = source.Rows[r];
            var x = DataTable.ToDouble(row[lon]);
            var y = DataTable.ToDouble(row[lat]);
            if (!double.IsFinite(x) || !double.IsFinite(y) || x is < -180 or > 180 || y is < -90 or > 90)
            {
                throw new SpatialDataException(source.Name, r + 2, $"station '{row[id]}' has longitude '{row[lon]}', latitude '{row[lat]}'; expected WGS 84 degrees (−180…180, −90…90)", "fix the station list and import it again");
            }

            points.TryAdd(row[id], (x, y));
        }

        return points;
    }

    /// <summary>The stations layer: one point per station with every per-station column of every table.</summary>
    public static Layer? Stations(ResultsFolder folder, SortedDictionary<string, (double Lon, double Lat)> points, List<string> notes)
    {
        if (points.Count == 0)
        {
            return null;
        }

        var wide = new WideTable(points.Keys);
        if (folder.StationList is { } sl)
        {
            wide.AddColumns(sl, except: ["station"]);
        }

        if (folder.Stations is { } st)
        {
            wide.AddColumns(st, except: ["station"]);
        }
        else
        {
            notes.Add("stations.csv is missing: per-station summaries and trends are left out of the stations layer");
        }

        if (folder.Covariates is { } cv)
        {
            wide.AddColumns(cv, except: ["station"]);
        }
        else
        {
            notes.Add("covariates.csv is missing: terrain covariates are left out of the stations layer");
        }

        if (folder.Fitted is { } fit)
        {
            wide.AddPivot(fit, "response", except: ["station", "response"]);
        }
        else
        {
            notes.Add("regression/fitted.csv is missing: fitted values and residuals are left out of the stations layer");
        }

        if (folder.Local is { } loc)
        {
            wide.AddPivot(loc, "response", except: ["station", "response"]);
        }
        else
        {
            notes.Add("regression/local.csv is missing: local-regression coefficients are left out of the stations layer");
        }

        var fields = new List<LayerField> { new("station", FieldType.Text) };
        fields.AddRange(wide.Columns.Select(c => new LayerField(c, Infer(wide.Column(c)))));
        var features = new List<LayerFeature>();
        foreach (var (id, (lon, lat)) in points)
        {
            var values = new object?[fields.Count];
            values[0] = id;
            for (var i = 1; i < fields.Count; i++)
            {
                values[i] = Convert(wide.Get(id, fields[i].Name), fields[i].Type);
            }

            features.Add(new LayerFeature(Factory.CreatePoint(new Coordinate(lon, lat)), values));
        }

        return new Layer("stations", "POINT", fields, features, "Stations with per-station summaries, trends, covariates, fitted values, residuals and local coefficients");
    }

    /// <summary>The seasons layer: one point per station-season row of seasons.csv, at the station.</summary>
    public static Layer? Seasons(ResultsFolder folder, SortedDictionary<string, (double Lon, double Lat)> points, List<string> notes)
    {
        if (folder.Seasons is not { } seasons)
        {
            notes.Add("seasons.csv is missing: the seasons layer is left out");
            return null;
        }

        if (points.Count == 0)
        {
            return null;
        }

        var idIndex = seasons.Require("station");
        var seasonIndex = seasons.IndexOf("season");
        var order = Enumerable.Range(0, seasons.Rows.Count)
            .OrderBy(r => seasons.Rows[r][idIndex], StringComparer.Ordinal)
            .ThenBy(r => seasonIndex < 0 ? 0 : DataTable.ToDouble(seasons.Rows[r][seasonIndex]))
            .ToArray();
        var fields = new List<LayerField>();
        for (var c = 0; c < seasons.Columns.Count; c++)
        {
            var type = c == idIndex ? FieldType.Text : Infer(seasons.Rows.Select(r => r[c]));
            fields.Add(new LayerField(seasons.Columns[c], type));
        }

        var features = new List<LayerFeature>();
        var unplaced = 0;
        foreach (var r in order)
        {
            var row = seasons.Rows[r];
            if (!points.TryGetValue(row[idIndex], out var p))
            {
                unplaced++;
                continue;
            }

            var values = new object?[fields.Count];
            for (var c = 0; c < fields.Count; c++)
            {
                values[c] = Convert(row[c], fields[c].Type);
            }

            features.Add(new LayerFeature(Factory.CreatePoint(new Coordinate(p.Lon, p.Lat)), values));
        }

        if (unplaced > 0)
        {
            notes.Add($"seasons.csv: {unplaced} rows name stations without coordinates and are left out of the seasons layer");
        }

        return new Layer("seasons", "POINT", fields, features, "Station-season coefficients, residuals and metrics at the station points");
    }

    /// <summary>The coastline layer from a GeoJSON file of lines or polygons in WGS 84 lon/lat.</summary>
    public static Layer? Coastline(string? path, List<string> notes)
    {
        if (path is null)
        {
            notes.Add("no coastline GeoJSON in the results folder and none given (--coast): the coastline layer is left out");
            return null;
        }

        var geometries = ReadGeometries(path);
        var parts = new List<Geometry>();
        foreach (var g in geometries)
        {
            for (var i = 0; i < g.NumGeometries; i++)
            {
                parts.Add(g.GetGeometryN(i));
            }
        }

        foreach (var part in parts)
        {
            foreach (var c in part.Coordinates)
            {
                if (c.X is < -180 or > 180 || c.Y is < -90 or > 90)
                {
                    throw new SpatialDataException(path, 0, $"coordinate ({c.X.ToString("R", CultureInfo.InvariantCulture)}, {c.Y.ToString("R", CultureInfo.InvariantCulture)}) is not WGS 84 longitude/latitude", "give the coastline in WGS 84 degrees (RFC 7946)");
                }
            }
        }

        var polygons = parts.OfType<Polygon>().Select(RightHand).ToArray();
        var lines = parts.OfType<LineString>().ToArray();
        var features = new List<LayerFeature>();
        string type;
        if (polygons.Length > 0 && lines.Length == 0)
        {
            type = "MULTIPOLYGON";
            features.Add(new LayerFeature(Factory.CreateMultiPolygon(polygons), ["land", polygons.Length]));
        }
        else if (lines.Length > 0)
        {
            // Polygons beside lines: their rings join the lines (the coastline as lines).
            type = "MULTILINESTRING";
            var all = lines.Select(l => Factory.CreateLineString(l.CoordinateSequence)).ToList();
            foreach (var p in polygons)
            {
                all.Add(Factory.CreateLineString(p.ExteriorRing.CoordinateSequence));
                all.AddRange(p.InteriorRings.Select(h => Factory.CreateLineString(h.CoordinateSequence)));
            }

            features.Add(new LayerFeature(Factory.CreateMultiLineString([.. all]), ["coast", all.Count]));
        }
        else
        {
            notes.Add($"{Path.GetFileName(path)} holds no lines or polygons: the coastline layer is left out");
            return null;
        }

        return new Layer("coastline", type, [new("kind", FieldType.Text), new("parts", FieldType.Integer)], features, "Coastline (WGS 84)");
    }

    /// <summary>The footprint layer: the outline of each predicted surface's grid, densified and in lon/lat.</summary>
    public static Layer? Footprints(IReadOnlyDictionary<string, RasterGrid>? surfaces, List<string> notes)
    {
        if (surfaces is null || surfaces.Count == 0)
        {
            notes.Add("no predicted surfaces were given: the surface footprint layer is left out");
            return null;
        }

        var features = new List<LayerFeature>();
        foreach (var (response, grid) in surfaces.OrderBy(kv => kv.Key, StringComparer.Ordinal))
        {
            var ring = GridOutline(grid, 16, response);
            var polygon = RightHand(Factory.CreatePolygon(ring));
            features.Add(new LayerFeature(polygon, [response, (long)grid.Width, (long)grid.Height, grid.Crs.ToString(), Math.Abs(grid.Transform.PixelWidth)]));
        }

        return new Layer(
            "surface_footprint",
            "POLYGON",
            [new("response", FieldType.Text), new("columns", FieldType.Integer), new("rows", FieldType.Integer), new("grid_crs", FieldType.Text), new("cell_size", FieldType.Real)],
            features,
            "Outline of each predicted surface grid");
    }

    /// <summary>The grid's outer boundary as a closed lon/lat ring, with <paramref name="perSide"/> points per side.</summary>
    internal static Coordinate[] GridOutline(RasterGrid grid, int perSide, string what)
    {
        var t = CrsTransform.For(grid.Crs, what);
        var pts = new List<Coordinate>();
        void Edge(double c0, double r0, double c1, double r1)
        {
            for (var i = 0; i < perSide; i++)
            {
                var f = (double)i / perSide;
                var (x, y) = grid.Transform.ToMap(c0 + ((c1 - c0) * f), r0 + ((r1 - r0) * f));
                var (lon, lat) = t.ToLonLat(x, y);
                pts.Add(new Coordinate(lon, lat));
            }
        }

        double w = grid.Width, h = grid.Height;
        Edge(0, 0, 0, h);
        Edge(0, h, w, h);
        Edge(w, h, w, 0);
        Edge(w, 0, 0, 0);
        pts.Add(pts[0].Copy());
        return [.. pts];
    }

    /// <summary>Orients a polygon by RFC 7946 §3.1.6: exterior ring counterclockwise, holes clockwise.</summary>
    internal static Polygon RightHand(Polygon p)
    {
        LinearRing Orient(LinearRing ring, bool ccw)
        {
            var isCcw = Orientation.IsCCW(ring.CoordinateSequence);
            return isCcw == ccw ? Factory.CreateLinearRing(ring.CoordinateSequence) : Factory.CreateLinearRing(ring.CoordinateSequence.Reversed());
        }

        return Factory.CreatePolygon(Orient((LinearRing)p.ExteriorRing, true), p.InteriorRings.Select(h => Orient((LinearRing)h, false)).ToArray());
    }

    /// <summary>Reads every geometry of a GeoJSON file (FeatureCollection, Feature, or bare geometry).</summary>
    internal static List<Geometry> ReadGeometries(string path)
    {
        var text = File.ReadAllText(path);
        var options = new JsonSerializerOptions();
        options.Converters.Add(new GeoJsonConverterFactory());
        try
        {
            using var doc = JsonDocument.Parse(text);
            var kind = doc.RootElement.TryGetProperty("type", out var t) ? t.GetString() : null;
            return kind switch
            {
                "FeatureCollection" => (JsonSerializer.Deserialize<FeatureCollection>(text, options) ?? []).Select(f => f.Geometry).OfType<Geometry>().ToList(),
                "Feature" => JsonSerializer.Deserialize<Feature>(text, options)?.Geometry is { } g ? [g] : [],
                _ => JsonSerializer.Deserialize<Geometry>(text, options) is { } g2 ? [g2] : [],
            };
        }
        catch (JsonException e)
        {
            throw new SpatialDataException(path, (e.LineNumber ?? 0) + 1, $"not a GeoJSON file: {e.Message.Split('.')[0]}", "give a GeoJSON FeatureCollection of coastline lines or land polygons");
        }
    }

    /// <summary>
    /// The storage type of a column of text fields: INTEGER when every known value is a whole number written without
    /// a decimal point or exponent, REAL when every known value is a number, TEXT otherwise; an all-unknown column is REAL.
    /// </summary>
    internal static FieldType Infer(IEnumerable<string> values)
    {
        var integer = true;
        foreach (var v in values)
        {
            if (v.Length == 0)
            {
                continue;
            }

            if (integer && long.TryParse(v, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out _) && !(v.Length > 1 && v.TrimStart('-')[0] == '0'))
            {
                continue;
            }

            integer = false;
            if (!double.TryParse(v, NumberStyles.Float, CultureInfo.InvariantCulture, out _))
            {
                return FieldType.Text;
            }
        }

        return integer ? FieldType.Integer : FieldType.Real;
    }

    /// <summary>Converts a text field to the column's type; empty, NaN and infinite values are unknown (null).</summary>
    internal static object? Convert(string? v, FieldType type)
    {
        if (string.IsNullOrEmpty(v))
        {
            return null;
        }

        switch (type)
        {
            case FieldType.Integer:
                return long.Parse(v, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture);
            case FieldType.Real:
                var d = DataTable.ToDouble(v);
                return double.IsFinite(d) ? d : null;
            default:
                return v;
        }
    }

    /// <summary>Columns gathered per station from several tables, in the order added; first value wins on a repeated name.</summary>
    private sealed class WideTable(IEnumerable<string> ids)
    {
        private readonly HashSet<string> known = new(ids, StringComparer.Ordinal);
        private readonly List<string> columns = [];
        private readonly HashSet<string> columnSet = new(StringComparer.Ordinal) { "station" };
        private readonly Dictionary<(string Id, string Column), string> cells = [];

        public IReadOnlyList<string> Columns => columns;

        public string? Get(string id, string column) => cells.TryGetValue((id, column), out var v) ? v : null;

        public IEnumerable<string> Column(string column) => known.Select(id => Get(id, column) ?? string.Empty);

        public void AddColumns(DataTable table, string[] except)
        {
            var id = table.Require("station");
            for (var c = 0; c < table.Columns.Count; c++)
            {
                var name = table.Columns[c];
                if (except.Contains(name) || !columnSet.Add(name))
                {
                    continue;
                }

                columns.Add(name);
                foreach (var row in table.Rows)
                {
                    if (known.Contains(row[id]))
                    {
                        cells.TryAdd((row[id], name), row[c]);
                    }
                }
            }
        }

        /// <summary>Long table (station, key, values…) → columns KEY_VALUE, keys in ordinal order.</summary>
        public void AddPivot(DataTable table, string keyColumn, string[] except)
        {
            var id = table.Require("station");
            var key = table.Require(keyColumn);
            var keys = table.Rows.Select(r => r[key]).Distinct().Order(StringComparer.Ordinal).ToArray();
            foreach (var k in keys)
            {
                for (var c = 0; c < table.Columns.Count; c++)
                {
                    var source = table.Columns[c];
                    if (except.Contains(source))
                    {
                        continue;
                    }

                    var name = $"{k}_{source}";
                    if (!columnSet.Add(name))
                    {
                        continue;
                    }

                    columns.Add(name);
                    foreach (var row in table.Rows)
                    {
                        if (row[key] == k && known.Contains(row[id]))
                        {
                            cells.TryAdd((row[id], name), row[c]);
                        }
                    }
                }
            }
        }
    }
}

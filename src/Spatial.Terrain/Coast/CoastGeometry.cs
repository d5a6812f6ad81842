using System.Text.Json;
using NetTopologySuite.Algorithm.Locate;
using NetTopologySuite.Features;
using NetTopologySuite.Geometries;
using NetTopologySuite.Index.Strtree;
using NetTopologySuite.IO.Converters;
using Spatial.Core;

namespace Spatial.Terrain.Coast;

/// <summary>
/// A coastline in WGS 84 longitude/latitude degrees, indexed for nearest-point queries: the segments of every
/// LineString and polygon ring, and every Point, in an STR-tree (NetTopologySuite). When the geometry holds
/// polygons, they are the land: a polygon's boundary is the coast, and a point inside a polygon (or on its
/// boundary) is on land. Segments are straight lines in longitude/latitude, as RFC 7946 defines GeoJSON lines.
/// </summary>
public sealed class CoastGeometry
{
    private static readonly Lazy<CoastGeometry> WorldCoast = new(() => WorldCoastline.Load(), LazyThreadSafetyMode.ExecutionAndPublication);

    internal CoastGeometry(Geometry geometry, string source, bool dropArtificialEdges = false)
    {
        ArgumentNullException.ThrowIfNull(geometry);
        Source = source;
        var lon1 = new List<double>();
        var lat1 = new List<double>();
        var lon2 = new List<double>();
        var lat2 = new List<double>();
        var polygons = new List<Polygon>();
        void AddLine(Coordinate[] cs)
        {
            for (var i = 0; i + 1 < cs.Length; i++)
            {
                if (cs[i].X == cs[i + 1].X && cs[i].Y == cs[i + 1].Y)
                {
                    continue;
                }

                // Polygon edges that are not coast: cuts along the antimeridian, and Antarctica's closure through the pole.
                if (dropArtificialEdges && ((Math.Abs(cs[i].X) == 180 && Math.Abs(cs[i + 1].X) == 180) || (Math.Abs(cs[i].Y) == 90 && Math.Abs(cs[i + 1].Y) == 90)))
                {
                    continue;
                }

                lon1.Add(cs[i].X);
                lat1.Add(cs[i].Y);
                lon2.Add(cs[i + 1].X);
                lat2.Add(cs[i + 1].Y);
            }

            if (cs.Length == 1)
            {
                lon1.Add(cs[0].X);
                lat1.Add(cs[0].Y);
                lon2.Add(cs[0].X);
                lat2.Add(cs[0].Y);
            }
        }

        void Walk(Geometry g)
        {
            switch (g)
            {
                case Point p when !p.IsEmpty:
                    AddLine([p.Coordinate]);
                    break;
                case LineString l:
                    AddLine(l.Coordinates);
                    break;
                case Polygon poly:
                    polygons.Add(poly);
                    AddLine(poly.ExteriorRing.Coordinates);
                    foreach (var hole in poly.InteriorRings)
                    {
                        AddLine(hole.Coordinates);
                    }

                    break;
                case GeometryCollection gc:
                    foreach (var part in gc.Geometries)
                    {
                        Walk(part);
                    }

                    break;
            }
        }

        Walk(geometry);
        foreach (var c in geometry.Coordinates)
        {
            if (!(c.Y >= -90 && c.Y <= 90 && c.X >= -540 && c.X <= 540))
            {
                throw new SpatialDataException(source, 0, $"the coast has a point at longitude {c.X}, latitude {c.Y}, outside WGS 84 degrees", "the coast must be in longitude/latitude degrees (EPSG:4326, RFC 7946)");
            }
        }

        if (lon1.Count == 0)
        {
            throw new SpatialDataException(source, 0, "the coast geometry is empty", "give at least one point, line or polygon");
        }

        Segments = new SegmentSet(lon1.ToArray(), lat1.ToArray(), lon2.ToArray(), lat2.ToArray());
        var tree = new CoastTree();
        for (var i = 0; i < Segments.Count; i++)
        {
            tree.Insert(new Envelope(lon1[i], lon2[i], lat1[i], lat2[i]), i);
        }

        tree.Build();
        Index = tree;
        Flat = FlatTree.From(tree.RootNode);
        if (polygons.Count > 0)
        {
            var land = geometry.Factory.CreateMultiPolygon(polygons.ToArray());
            Land = land;
            LandLocator = new IndexedPointInAreaLocator(land);
            _ = LandLocator.Locate(new Coordinate(0, 0)); // builds its index now, before any parallel use
        }
    }

    /// <summary>Where the coast came from (a file path, or <c>world</c>).</summary>
    public string Source { get; }

    /// <summary>True when the coast includes land polygons, so that distances are signed (positive on land, negative at sea).</summary>
    public bool HasLand => LandLocator is not null;

    /// <summary>Number of segments (a Point counts as one of zero length).</summary>
    public int SegmentCount => Segments.Count;

    internal SegmentSet Segments { get; }

    internal STRtree<int> Index { get; }

    internal FlatTree Flat { get; }

    internal MultiPolygon? Land { get; }

    internal IndexedPointInAreaLocator? LandLocator { get; }

    /// <summary>
    /// The built-in world coast: Natural Earth 1:10m land polygons (public domain, via the npm package world-atlas 2.0.2),
    /// repaired to valid geometry; their boundary is the coast. See src/Spatial.Terrain/Data/SOURCES.md.
    /// </summary>
    public static CoastGeometry World => WorldCoast.Value;

    /// <summary>A coast from an NTS geometry in longitude/latitude degrees.</summary>
    public static CoastGeometry FromGeometry(Geometry geometry, string source = "geometry") => new(geometry, source);

    /// <summary>
    /// Reads a GeoJSON file (FeatureCollection, Feature or bare geometry) in WGS 84 longitude/latitude. Throws
    /// <see cref="SpatialDataException"/> naming the file when it cannot be used.
    /// </summary>
    public static CoastGeometry FromGeoJson(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "the coast file does not exist", "check the path, or use --coast world");
        }

        var json = File.ReadAllText(path);
        var options = new JsonSerializerOptions();
        options.Converters.Add(new GeoJsonConverterFactory());
        Geometry? geometry;
        try
        {
            using var doc = JsonDocument.Parse(json);
            var type = doc.RootElement.TryGetProperty("type", out var t) ? t.GetString() : null;
            geometry = type switch
            {
                "FeatureCollection" => Collect(JsonSerializer.Deserialize<FeatureCollection>(json, options)?.Select(f => f.Geometry)),
                "Feature" => JsonSerializer.Deserialize<IFeature>(json, options)?.Geometry,
                null => throw new SpatialDataException(path, 0, "the GeoJSON has no 'type'", "give a FeatureCollection, Feature or geometry"),
                _ => JsonSerializer.Deserialize<Geometry>(json, options),
            };
        }
        catch (JsonException e)
        {
            var line = e.LineNumber is { } l ? l + 1 : 0;
            throw new SpatialDataException(path, line, $"the coast is not valid GeoJSON: {e.Message}", "check the file with ogrinfo");
        }
        catch (Exception e) when (e is ArgumentException or InvalidOperationException or NotSupportedException or FormatException)
        {
            throw new SpatialDataException(path, 0, $"the coast GeoJSON cannot be read: {e.Message}", "check the file with ogrinfo");
        }

        if (geometry is null || geometry.IsEmpty)
        {
            throw new SpatialDataException(path, 0, "the coast GeoJSON holds no geometry", "give at least one point, line or polygon");
        }

        return new CoastGeometry(geometry, path);
    }

    private static GeometryCollection? Collect(IEnumerable<Geometry?>? parts)
    {
        if (parts is null)
        {
            return null;
        }

        var list = parts.Where(p => p is not null && !p.IsEmpty).Cast<Geometry>().ToArray();
        return list.Length == 0 ? null : new GeometryFactory().CreateGeometryCollection(list);
    }
}

/// <summary>NetTopologySuite's STR-tree, with its root node in reach for our own best-first search.</summary>
internal sealed class CoastTree : STRtree<int>
{
    public AbstractNode<Envelope, int> RootNode => Root;
}

/// <summary>
/// The STR-tree's nodes copied into flat arrays (envelopes in degrees; for each node its children: nodes, or segment
/// indices at the leaf level), so the search walks arrays instead of objects.
/// </summary>
internal sealed class FlatTree
{
    private FlatTree(double[] env, int[] first, int[] count, bool[] leaf, int[] children)
    {
        Env = env;
        First = first;
        Count = count;
        Leaf = leaf;
        Children = children;
    }

    /// <summary>minX, maxX, minY, maxY of node k at 4k…4k+3.</summary>
    public double[] Env { get; }

    public int[] First { get; }

    public int[] Count { get; }

    /// <summary>True when node k's children are segment indices.</summary>
    public bool[] Leaf { get; }

    public int[] Children { get; }

    public static FlatTree From(AbstractNode<Envelope, int> root)
    {
        var env = new List<double>();
        var first = new List<int>();
        var count = new List<int>();
        var leaf = new List<bool>();
        var children = new List<int>();
        var queue = new Queue<(AbstractNode<Envelope, int> Node, int Id)>();
        var nextId = 1;
        void Describe(AbstractNode<Envelope, int> n)
        {
            var e = n.Bounds ?? new Envelope();
            env.AddRange([e.MinX, e.MaxX, e.MinY, e.MaxY]);
            first.Add(0);
            count.Add(0);
            leaf.Add(false);
        }

        Describe(root);
        queue.Enqueue((root, 0));
        while (queue.Count > 0)
        {
            var (node, id) = queue.Dequeue();
            first[id] = children.Count;
            var kids = node.ChildBoundables;
            count[id] = kids.Count;
            leaf[id] = kids.Count > 0 && kids[0] is ItemBoundable<Envelope, int>;
            foreach (var k in kids)
            {
                if (k is ItemBoundable<Envelope, int> item)
                {
                    children.Add(item.Item);
                }
                else if (k is AbstractNode<Envelope, int> child)
                {
                    Describe(child);
                    children.Add(nextId);
                    queue.Enqueue((child, nextId));
                    nextId++;
                }
            }
        }

        return new FlatTree(env.ToArray(), first.ToArray(), count.ToArray(), leaf.ToArray(), children.ToArray());
    }
}

/// <summary>Coast segments as parallel arrays (degrees), with each end's position on the ellipsoid (ECEF metres).</summary>
internal sealed class SegmentSet
{
    public SegmentSet(double[] lon1, double[] lat1, double[] lon2, double[] lat2)
    {
        Lon1 = lon1;
        Lat1 = lat1;
        Lon2 = lon2;
        Lat2 = lat2;
        var n = lon1.Length;
        Ecef1 = new double[3 * n];
        Ecef2 = new double[3 * n];
        LengthBoundM = new double[n];
        DeviationBoundM = new double[n];
        for (var i = 0; i < n; i++)
        {
            Ecef.ToEcef(lat1[i], lon1[i], Ecef1.AsSpan(3 * i, 3));
            Ecef.ToEcef(lat2[i], lon2[i], Ecef2.AsSpan(3 * i, 3));

            // An upper bound of the length of the lon/lat-straight segment, hence of the geodesic from an end to any
            // point of it: at most 111 700 m per degree of latitude (the meridian degree is 111 694 m at the poles) plus
            // 111 320 m per degree of longitude times the largest cos(latitude) along it (L1 ≥ L2 length).
            var maxCos = Math.Cos(Math.PI / 180 * MinAbs(lat1[i], lat2[i]));
            LengthBoundM[i] = 1.0001 * ((111700 * Math.Abs(lat2[i] - lat1[i])) + (111321 * maxCos * Math.Abs(lon2[i] - lon1[i])));

            // How far the lon/lat-straight segment can stray from the straight 3-D chord between its ends: the sagitta of
            // an arc of length L on radius ≥ 6 335 km is L²/(8R); the parallel-following of a lon/lat line adds at most
            // about L²·tan|φ|/(8R). Taken twice over; near the poles (|φ| > 80°) no such bound is used (NaN).
            var maxAbsLat = Math.Max(Math.Abs(lat1[i]), Math.Abs(lat2[i]));
            var l = LengthBoundM[i];
            DeviationBoundM[i] = maxAbsLat > 80 ? double.NaN : 2 * l * l * (1 + Math.Tan(maxAbsLat * Math.PI / 180)) / (8 * 6335000.0);
        }
    }

    public int Count => Lon1.Length;

    public double[] Lon1 { get; }

    public double[] Lat1 { get; }

    public double[] Lon2 { get; }

    public double[] Lat2 { get; }

    public double[] Ecef1 { get; }

    public double[] Ecef2 { get; }

    public double[] LengthBoundM { get; }

    public double[] DeviationBoundM { get; }

    private static double MinAbs(double a, double b) => (a <= 0 && b >= 0) || (a >= 0 && b <= 0) ? 0 : Math.Min(Math.Abs(a), Math.Abs(b));
}

/// <summary>Earth-centred Cartesian coordinates on the WGS 84 ellipsoid surface (height 0).</summary>
internal static class Ecef
{
    public static void ToEcef(double latDeg, double lonDeg, Span<double> xyz)
    {
        const double e2 = Geodesy.Geodesic.F * (2 - Geodesy.Geodesic.F);
        var (sp, cp) = Math.SinCos(latDeg * Math.PI / 180);
        var (sl, cl) = Math.SinCos(lonDeg * Math.PI / 180);
        var n = Geodesy.Geodesic.A / Math.Sqrt(1 - (e2 * sp * sp));
        xyz[0] = n * cp * cl;
        xyz[1] = n * cp * sl;
        xyz[2] = n * (1 - e2) * sp;
    }
}

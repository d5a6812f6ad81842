#:package NetTopologySuite@2.6.0
#:package NetTopologySuite.IO.GeoJSON4STJ@4.0.0
#:property ManagePackageVersionsCentrally=false
#:property TreatWarningsAsErrors=false
#:property PublishAot=false
#:property JsonSerializerIsReflectionEnabledByDefault=true
// Step 2 of the world coastline conversion (see README.md): GeoJSON land polygons → repaired (NTS GeometryFixer,
// the MakeValid of NetTopologySuite) → our compact file: "SPWC1", then per polygon its rings as zig-zag varint deltas
// of longitude/latitude in micro-degrees, the whole Deflate-compressed.
using System.IO.Compression;
using System.Text.Json;
using NetTopologySuite.Features;
using NetTopologySuite.Geometries;
using NetTopologySuite.Geometries.Utilities;
using NetTopologySuite.IO.Converters;

var options = new JsonSerializerOptions();
options.Converters.Add(new GeoJsonConverterFactory());
var fc = JsonSerializer.Deserialize<FeatureCollection>(File.ReadAllText(args[0]), options)!;
var polygons = new List<Polygon>();
var invalidBefore = 0;
var gf = new GeometryFactory();
var cut = 0;
foreach (var f in fc)
{
    var g = f.Geometry;
    for (var i = 0; i < g.NumGeometries; i++)
    {
        var part = g.GetGeometryN(i);
        var env = part.EnvelopeInternal;
        if (Math.Abs(env.MinX) < 0.1 && Math.Abs(env.MaxX) < 0.1 && Math.Abs(env.MinY) < 0.1 && Math.Abs(env.MaxY) < 0.1)
        {
            Console.WriteLine($"left out the fictitious 'Null Island' at 0°N 0°E: {env}");
            continue;
        }

        if (part is Polygon crossing && CrossesAntimeridian(crossing))
        {
            // TopoJSON rings are spherical: a ring may jump from +180 to −180 (Chukotka, Fiji, Antarctica).
            // Unwrap its longitudes, close a ring around a pole through the pole, then cut it at ±180.
            cut++;
            var unwrapped = gf.CreatePolygon(gf.CreateLinearRing(Unwrap(crossing.ExteriorRing.Coordinates)), crossing.InteriorRings.Select(h => gf.CreateLinearRing(Unwrap(h.Coordinates))).ToArray());
            var valid = GeometryFixer.Fix(unwrapped);
            foreach (var shift in new[] { -360.0, 0.0, 360.0 })
            {
                var box = gf.ToGeometry(new Envelope(-180 - shift, 180 - shift, -90, 90));
                var piece = valid.Intersection(box);
                var moved = (Geometry)piece.Copy();
                moved.Apply(new Shift(shift));
                moved.GeometryChanged();
                for (var k = 0; k < moved.NumGeometries; k++)
                {
                    if (moved.GetGeometryN(k) is Polygon mp && !mp.IsEmpty) polygons.Add(mp);
                }
            }

            continue;
        }

        if (!part.IsValid) invalidBefore++;
        var fixedPart = part.IsValid ? part : GeometryFixer.Fix(part);
        for (var k = 0; k < fixedPart.NumGeometries; k++)
        {
            if (fixedPart.GetGeometryN(k) is Polygon p && !p.IsEmpty) polygons.Add(p);
        }
    }
}

Console.WriteLine($"polygons cut at the antimeridian: {cut}");
var land0 = new GeometryFactory().CreateMultiPolygon(polygons.ToArray());
Console.WriteLine($"parts valid one by one; as one multipolygon valid: {land0.IsValid}");
var whole = land0.IsValid ? land0 : GeometryFixer.Fix(land0); // unions parts that overlap or share edges
polygons = Enumerable.Range(0, whole.NumGeometries).Select(i => whole.GetGeometryN(i)).OfType<Polygon>().ToList();
var land = new GeometryFactory().CreateMultiPolygon(polygons.ToArray());
Console.WriteLine($"polygons {polygons.Count}, invalid parts repaired {invalidBefore}, vertices {land.NumPoints}, valid after: {land.IsValid}");
using var file = File.Create(args[1]);
using var z = new DeflateStream(file, CompressionLevel.SmallestSize);
using var w = new BinaryWriter(z);
w.Write("SPWC1"u8);
w.Write(polygons.Count);
foreach (var p in polygons)
{
    var rings = new List<LineString> { p.ExteriorRing };
    rings.AddRange(p.InteriorRings);
    w.Write(rings.Count);
    foreach (var ring in rings)
    {
        var cs = ring.Coordinates;
        w.Write(cs.Length);
        long px = 0, py = 0;
        foreach (var c in cs)
        {
            var x = (long)Math.Round(c.X * 1e6);
            var y = (long)Math.Round(c.Y * 1e6);
            Varint(w, x - px);
            Varint(w, y - py);
            px = x;
            py = y;
        }
    }
}

static bool CrossesAntimeridian(Polygon p)
{
    foreach (var ring in new[] { p.ExteriorRing }.Concat(p.InteriorRings))
    {
        var cs = ring.Coordinates;
        for (var i = 1; i < cs.Length; i++)
        {
            if (Math.Abs(cs[i].X - cs[i - 1].X) > 180) return true;
        }
    }

    return false;
}

static Coordinate[] Unwrap(Coordinate[] cs)
{
    var list = new List<Coordinate> { new(cs[0].X, cs[0].Y) };
    var offset = 0.0;
    for (var i = 1; i < cs.Length; i++)
    {
        var d = cs[i].X - cs[i - 1].X;
        if (d > 180) offset -= 360;
        else if (d < -180) offset += 360;
        list.Add(new Coordinate(cs[i].X + offset, cs[i].Y));
    }

    if (offset != 0)
    {
        // A ring around a pole: it ends 360° from where it began; close it through the pole on its side.
        var pole = list.Average(c => c.Y) < 0 ? -90.0 : 90.0;
        list.Add(new Coordinate(list[^1].X, pole));
        list.Add(new Coordinate(list[0].X, pole));
        list.Add(new Coordinate(list[0].X, list[0].Y));
    }

    return list.ToArray();
}

static void Varint(BinaryWriter w, long v)
{
    var u = (ulong)((v << 1) ^ (v >> 63));
    while (u >= 0x80)
    {
        w.Write((byte)(u | 0x80));
        u >>= 7;
    }

    w.Write((byte)u);
}

sealed class Shift(double dx) : ICoordinateSequenceFilter
{
    public bool Done => false;
    public bool GeometryChanged => true;
    public void Filter(CoordinateSequence seq, int i) => seq.SetX(i, seq.GetX(i) + dx);
}

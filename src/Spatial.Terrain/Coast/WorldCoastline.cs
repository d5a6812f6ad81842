using System.IO.Compression;
using NetTopologySuite.Geometries;

namespace Spatial.Terrain.Coast;

/// <summary>
/// Loads the built-in world land polygons (embedded resource <c>Data/world-land-10m.bin</c>, written by
/// tools/world-coast): "SPWC1", polygon count, then per polygon its ring count and per ring its point count and
/// zig-zag varint deltas of longitude/latitude in micro-degrees; the whole Deflate-compressed.
/// </summary>
internal static class WorldCoastline
{
    private const string Resource = "Spatial.Terrain.Data.world-land-10m.bin";

    public static CoastGeometry Load()
    {
        using var raw = typeof(WorldCoastline).Assembly.GetManifestResourceStream(Resource)
            ?? throw new InvalidOperationException($"the embedded world coastline '{Resource}' is missing from the build");
        using var z = new DeflateStream(raw, CompressionMode.Decompress);
        using var r = new BinaryReader(new BufferedStream(z, 1 << 16));
        var magic = r.ReadBytes(5);
        if (!magic.AsSpan().SequenceEqual("SPWC1"u8))
        {
            throw new InvalidOperationException("the embedded world coastline has an unknown format");
        }

        var factory = new GeometryFactory(new PrecisionModel(), 4326);
        var polygons = new Polygon[r.ReadInt32()];
        for (var p = 0; p < polygons.Length; p++)
        {
            var rings = new LinearRing[r.ReadInt32()];
            for (var k = 0; k < rings.Length; k++)
            {
                var cs = new Coordinate[r.ReadInt32()];
                long x = 0, y = 0;
                for (var i = 0; i < cs.Length; i++)
                {
                    x += Varint(r);
                    y += Varint(r);
                    cs[i] = new Coordinate(x * 1e-6, y * 1e-6);
                }

                rings[k] = factory.CreateLinearRing(cs);
            }

            polygons[p] = factory.CreatePolygon(rings[0], rings[1..]);
        }

        return new CoastGeometry(factory.CreateMultiPolygon(polygons), "world", dropArtificialEdges: true);
    }

    private static long Varint(BinaryReader r)
    {
        ulong u = 0;
        var shift = 0;
        byte b;
        do
        {
            b = r.ReadByte();
            u |= (ulong)(b & 0x7F) << shift;
            shift += 7;
        }
        while ((b & 0x80) != 0);
        return (long)(u >> 1) ^ -(long)(u & 1);
    }
}

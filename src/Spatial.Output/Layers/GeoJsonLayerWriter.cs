using System.Text.Encodings.Web;
using System.Text.Json;
using NetTopologySuite.Geometries;
using Spatial.Core.IO;

namespace Spatial.Output.Layers;

/// <summary>
/// Writes a layer as an RFC 7946 GeoJSON FeatureCollection: WGS 84 longitude/latitude, no <c>crs</c> member,
/// polygons with counterclockwise exteriors (the layers arrive oriented), coordinates rounded to a number of
/// decimals, numbers as JSON numbers and unknown values as null. Bytes are deterministic.
/// </summary>
internal static class GeoJsonLayerWriter
{
    public static void Write(Layer layer, string path, int precision)
    {
        AtomicFile.Write(path, stream =>
        {
            using var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = false, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
            WriteTo(w, layer, precision);
            w.Flush();
            stream.WriteByte((byte)'\n');
        });
    }

    internal static void WriteTo(Utf8JsonWriter w, Layer layer, int precision)
    {
        w.WriteStartObject();
        w.WriteString("type", "FeatureCollection");
        w.WriteString("name", layer.Name);
        w.WriteStartArray("features");
        foreach (var f in layer.Features)
        {
            w.WriteStartObject();
            w.WriteString("type", "Feature");
            w.WritePropertyName("geometry");
            WriteGeometry(w, f.Geometry, precision);
            w.WriteStartObject("properties");
            for (var i = 0; i < layer.Fields.Count; i++)
            {
                w.WritePropertyName(layer.Fields[i].Name);
                switch (f.Values[i])
                {
                    case null:
                        w.WriteNullValue();
                        break;
                    case long l:
                        w.WriteNumberValue(l);
                        break;
                    case int n:
                        w.WriteNumberValue(n);
                        break;
                    case double d when double.IsFinite(d) && d == Math.Floor(d) && Math.Abs(d) < 1e15:
                        // A whole REAL is written with ".0" so that readers keep the field's type as real.
                        w.WriteRawValue(d.ToString("0.0", System.Globalization.CultureInfo.InvariantCulture));
                        break;
                    case double d when double.IsFinite(d):
                        w.WriteNumberValue(d);
                        break;
                    case double:
                        w.WriteNullValue();
                        break;
                    default:
                        w.WriteStringValue(f.Values[i]!.ToString());
                        break;
                }
            }

            w.WriteEndObject();
            w.WriteEndObject();
        }

        w.WriteEndArray();
        w.WriteEndObject();
    }

    private static void WriteGeometry(Utf8JsonWriter w, Geometry g, int precision)
    {
        w.WriteStartObject();
        switch (g)
        {
            case Point p:
                w.WriteString("type", "Point");
                w.WritePropertyName("coordinates");
                Position(w, p.Coordinate, precision);
                break;
            case LineString l:
                w.WriteString("type", "LineString");
                w.WritePropertyName("coordinates");
                Positions(w, l.Coordinates, precision);
                break;
            case Polygon poly:
                w.WriteString("type", "Polygon");
                w.WritePropertyName("coordinates");
                Rings(w, poly, precision);
                break;
            case MultiLineString ml:
                w.WriteString("type", "MultiLineString");
                w.WriteStartArray("coordinates");
                for (var i = 0; i < ml.NumGeometries; i++)
                {
                    Positions(w, ml.GetGeometryN(i).Coordinates, precision);
                }

                w.WriteEndArray();
                break;
            case MultiPolygon mp:
                w.WriteString("type", "MultiPolygon");
                w.WriteStartArray("coordinates");
                for (var i = 0; i < mp.NumGeometries; i++)
                {
                    Rings(w, (Polygon)mp.GetGeometryN(i), precision);
                }

                w.WriteEndArray();
                break;
            default:
                throw new NotSupportedException($"geometry {g.GeometryType} is not written by this exporter");
        }

        w.WriteEndObject();
    }

    private static void Rings(Utf8JsonWriter w, Polygon poly, int precision)
    {
        w.WriteStartArray();
        Positions(w, poly.ExteriorRing.Coordinates, precision);
        foreach (var hole in poly.InteriorRings)
        {
            Positions(w, hole.Coordinates, precision);
        }

        w.WriteEndArray();
    }

    private static void Positions(Utf8JsonWriter w, Coordinate[] cs, int precision)
    {
        w.WriteStartArray();
        foreach (var c in cs)
        {
            Position(w, c, precision);
        }

        w.WriteEndArray();
    }

    private static void Position(Utf8JsonWriter w, Coordinate c, int precision)
    {
        w.WriteStartArray();
        w.WriteNumberValue(Round(c.X, precision));
        w.WriteNumberValue(Round(c.Y, precision));
        w.WriteEndArray();
    }

    /// <summary>Rounds half away from zero to <paramref name="decimals"/> (0…15); −0 is written as 0.</summary>
    internal static double Round(double v, int decimals)
    {
        var r = Math.Round(v, decimals, MidpointRounding.AwayFromZero);
        return r == 0 ? 0.0 : r;
    }
}

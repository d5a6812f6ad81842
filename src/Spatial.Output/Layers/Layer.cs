using NetTopologySuite.Geometries;

namespace Spatial.Output.Layers;

/// <summary>Storage type of an attribute field (GeoPackage: INTEGER, REAL, TEXT; GeoJSON: integer, number, string).</summary>
internal enum FieldType
{
    Integer,
    Real,
    Text,
}

/// <summary>An attribute field of a layer.</summary>
internal sealed record LayerField(string Name, FieldType Type);

/// <summary>One feature: a WGS 84 lon/lat geometry and one value per field (long, double, string or null for unknown).</summary>
internal sealed record LayerFeature(Geometry Geometry, object?[] Values);

/// <summary>
/// A vector layer in WGS 84 longitude/latitude (EPSG:4326). <see cref="GeometryType"/> is the GeoPackage name
/// (POINT, MULTILINESTRING, MULTIPOLYGON, POLYGON).
/// </summary>
internal sealed record Layer(string Name, string GeometryType, IReadOnlyList<LayerField> Fields, IReadOnlyList<LayerFeature> Features, string Description)
{
    /// <summary>Envelope of all features (lon/lat degrees).</summary>
    public Envelope Extent
    {
        get
        {
            var e = new Envelope();
            foreach (var f in Features)
            {
                e.ExpandToInclude(f.Geometry.EnvelopeInternal);
            }

            return e;
        }
    }
}

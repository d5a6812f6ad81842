using ProjNet.CoordinateSystems;
using ProjNet.CoordinateSystems.Transformations;
using Spatial.Core;

namespace Spatial.Output.Internal;

/// <summary>
/// Point transforms between WGS 84 longitude/latitude and a grid's or map's CRS, through ProjNET (the only place
/// Output uses it). Supported: EPSG:4326, WGS 84 / UTM (EPSG:326zz north, 327zz south), and OGC WKT that ProjNET reads.
/// </summary>
internal sealed class CrsTransform
{
    private readonly MathTransform? toGeo;
    private readonly MathTransform? fromGeo;

    private CrsTransform(CoordinateSystem? cs)
    {
        if (cs is null)
        {
            return;
        }

        var factory = new CoordinateTransformationFactory();
        toGeo = factory.CreateFromCoordinateSystems(cs, GeographicCoordinateSystem.WGS84).MathTransform;
        fromGeo = factory.CreateFromCoordinateSystems(GeographicCoordinateSystem.WGS84, cs).MathTransform;
    }

    /// <summary>True when the CRS is WGS 84 longitude/latitude itself (the transform is the identity).</summary>
    public bool IsGeographic => toGeo is null;

    /// <summary>The transform for <paramref name="crs"/>; throws <see cref="SpatialDataException"/> for a CRS we cannot use.</summary>
    public static CrsTransform For(CrsDefinition crs, string what)
    {
        ArgumentNullException.ThrowIfNull(crs);
        if (crs.EpsgCode is 4326)
        {
            return new CrsTransform(null);
        }

        if (crs.EpsgCode is { } code and >= 32601 and <= 32660)
        {
            return new CrsTransform(ProjectedCoordinateSystem.WGS84_UTM(code - 32600, true));
        }

        if (crs.EpsgCode is { } south and >= 32701 and <= 32760)
        {
            return new CrsTransform(ProjectedCoordinateSystem.WGS84_UTM(south - 32700, false));
        }

        if (crs.Wkt is { Length: > 0 } wkt)
        {
            try
            {
                return new CrsTransform(new CoordinateSystemFactory().CreateFromWkt(wkt));
            }
            catch (ArgumentException e)
            {
                throw new SpatialDataException(what, 0, $"the coordinate system WKT could not be read ({e.Message})", "give the raster in WGS 84 (EPSG:4326) or WGS 84 / UTM");
            }
        }

        throw new SpatialDataException(what, 0, $"the coordinate system {crs} is not supported here", "give the raster in WGS 84 (EPSG:4326) or WGS 84 / UTM (EPSG:326zz, 327zz)");
    }

    /// <summary>WGS 84 / UTM of the zone holding (<paramref name="lonDeg"/>, <paramref name="latDeg"/>) (6° zones, no Norway/Svalbard exceptions).</summary>
    public static CrsTransform UtmAt(double lonDeg, double latDeg, out int zone, out bool north)
    {
        zone = Math.Clamp((int)Math.Floor((lonDeg + 180.0) / 6.0) + 1, 1, 60);
        north = latDeg >= 0;
        return new CrsTransform(ProjectedCoordinateSystem.WGS84_UTM(zone, north));
    }

    /// <summary>CRS coordinates → (longitude, latitude) degrees.</summary>
    public (double Lon, double Lat) ToLonLat(double x, double y)
    {
        if (toGeo is null)
        {
            return (x, y);
        }

        var (lon, lat) = toGeo.Transform(x, y);
        return (lon, lat);
    }

    /// <summary>(longitude, latitude) degrees → CRS coordinates.</summary>
    public (double X, double Y) FromLonLat(double lon, double lat)
    {
        if (fromGeo is null)
        {
            return (lon, lat);
        }

        var (x, y) = fromGeo.Transform(lon, lat);
        return (x, y);
    }
}

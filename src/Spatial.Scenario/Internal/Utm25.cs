using ProjNet.CoordinateSystems;
using ProjNet.CoordinateSystems.Transformations;

namespace Spatial.Scenario.Internal;

/// <summary>
/// WGS 84 longitude/latitude ↔ UTM zone 25N (EPSG:32625) through ProjNet's transverse Mercator (Snyder 1987;
/// checked against PROJ's cs2cs in the tests). Degrees and metres.
/// </summary>
internal static class Utm25
{
    /// <summary>EPSG code of WGS 84 / UTM zone 25N.</summary>
    public const int Epsg = 32625;

    private static readonly object Gate = new();
    private static readonly MathTransform Forward = Create().MathTransform;
    private static readonly MathTransform Backward = Create().MathTransform.Inverse();

    /// <summary>Easting and northing (m) of a WGS 84 longitude/latitude (degrees).</summary>
    public static (double X, double Y) ToUtm(double lon, double lat)
    {
        lock (Gate)
        {
            return Forward.Transform(lon, lat);
        }
    }

    /// <summary>WGS 84 longitude/latitude (degrees) of an easting/northing in metres.</summary>
    public static (double Lon, double Lat) ToGeographic(double x, double y)
    {
        lock (Gate)
        {
            return Backward.Transform(x, y);
        }
    }

    private static ICoordinateTransformation Create() =>
        new CoordinateTransformationFactory().CreateFromCoordinateSystems(
            GeographicCoordinateSystem.WGS84, ProjectedCoordinateSystem.WGS84_UTM(25, true));
}

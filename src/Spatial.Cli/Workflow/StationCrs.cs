using System.Collections.Concurrent;
using Spatial.Core;
using Spatial.Terrain.Crs;

namespace Spatial.Cli.Workflow;

/// <summary>
/// Converts station coordinates named by an EPSG code to WGS 84 with the terrain stage's coordinate systems
/// (WGS 84 and every UTM zone built in), for station lists whose <c>crs</c> column is not EPSG:4326.
/// </summary>
internal static class StationCrs
{
    private static readonly ConcurrentDictionary<int, CoordinateTransform> Transforms = new();

    /// <summary>(EPSG code, x, y) → (longitude, latitude); throws <see cref="ArgumentException"/> for a code Spatial does not know.</summary>
    public static (double Longitude, double Latitude) ToWgs84(int epsg, double x, double y)
    {
        var transform = Transforms.GetOrAdd(epsg, code => CoordinateTransform.Create(CrsDefinition.FromEpsg(code), CrsDefinition.Wgs84));
        return transform.Forward(x, y);
    }
}

namespace Spatial.Regression;

/// <summary>
/// Great-circle distances on a sphere of radius <see cref="EarthRadiusKm"/> (the IUGG mean Earth radius
/// R1 = 6371.0088 km), by the haversine formula (Sinnott 1984). On the WGS 84 ellipsoid true geodesic
/// distances differ by up to about 0.5 %; that is immaterial for neighbour weights, kernels and blocks,
/// and keeps this stage free of the terrain stage's geodesics.
/// </summary>
public static class GreatCircle
{
    /// <summary>Mean Earth radius R1 of the IUGG (Moritz 2000), km.</summary>
    public const double EarthRadiusKm = 6371.0088;

    /// <summary>Distance in km between two points given in degrees of longitude and latitude. NaN in, NaN out.</summary>
    public static double DistanceKm(double lon1Deg, double lat1Deg, double lon2Deg, double lat2Deg)
    {
        const double rad = Math.PI / 180;
        var phi1 = lat1Deg * rad;
        var phi2 = lat2Deg * rad;
        var dphi = phi2 - phi1;
        var dlambda = (lon2Deg - lon1Deg) * rad;
        var s1 = Math.Sin(dphi / 2);
        var s2 = Math.Sin(dlambda / 2);
        var h = (s1 * s1) + (Math.Cos(phi1) * Math.Cos(phi2) * s2 * s2);
        return 2 * EarthRadiusKm * Math.Asin(Math.Min(1, Math.Sqrt(h)));
    }
}

/// <summary>
/// Points on the unit sphere for fast repeated great-circle distances: d = 2R asin(chord/2), which equals the
/// haversine distance of <see cref="GreatCircle"/> up to rounding.
/// </summary>
internal sealed class SpherePoints
{
    private readonly double[] x;
    private readonly double[] y;
    private readonly double[] z;

    public SpherePoints(IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg)
    {
        Count = lonDeg.Count;
        x = new double[Count];
        y = new double[Count];
        z = new double[Count];
        const double rad = Math.PI / 180;
        for (var i = 0; i < Count; i++)
        {
            var phi = latDeg[i] * rad;
            var lambda = lonDeg[i] * rad;
            x[i] = Math.Cos(phi) * Math.Cos(lambda);
            y[i] = Math.Cos(phi) * Math.Sin(lambda);
            z[i] = Math.Sin(phi);
        }
    }

    public int Count { get; }

    public double DistanceKm(int i, int j)
    {
        var dx = x[i] - x[j];
        var dy = y[i] - y[j];
        var dz = z[i] - z[j];
        var chord = Math.Sqrt((dx * dx) + (dy * dy) + (dz * dz));
        return 2 * GreatCircle.EarthRadiusKm * Math.Asin(Math.Min(1, chord / 2));
    }

    /// <summary>Distances from point i to every point, into <paramref name="into"/>.</summary>
    public void DistancesFrom(int i, Span<double> into)
    {
        var xi = x[i];
        var yi = y[i];
        var zi = z[i];
        for (var j = 0; j < Count; j++)
        {
            var dx = xi - x[j];
            var dy = yi - y[j];
            var dz = zi - z[j];
            var chord = Math.Sqrt((dx * dx) + (dy * dy) + (dz * dz));
            into[j] = 2 * GreatCircle.EarthRadiusKm * Math.Asin(Math.Min(1, chord / 2));
        }
    }
}

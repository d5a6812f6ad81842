namespace Spatial.Regression.Tests;

/// <summary>Seeded synthetic station networks (invented data, for behaviour tests only).</summary>
internal static class SpatialFixtures
{
    /// <summary>
    /// n stations scattered over about 2° × 1.5° near 61°N 7°E, elevation (m) and coast distance (km) covariates,
    /// y = 20 + 0.01·elev − 0.05·coast (+ a slope on elev that grows eastwards when <paramref name="varying"/>) + noise (sd 1).
    /// </summary>
    public static (double[] Lon, double[] Lat, double[] Elev, double[] Coast, double[] Y, double[] TrueElevSlope) Network(int n, int seed, bool varying)
    {
        var rng = new Random(seed);
        var lon = new double[n];
        var lat = new double[n];
        var elev = new double[n];
        var coast = new double[n];
        var y = new double[n];
        var slope = new double[n];
        for (var i = 0; i < n; i++)
        {
            lon[i] = 6 + (2 * rng.NextDouble());
            lat[i] = 60.5 + (1.5 * rng.NextDouble());
            elev[i] = 1500 * rng.NextDouble();
            coast[i] = 100 * rng.NextDouble();
            slope[i] = varying ? 0.005 + (0.01 * (lon[i] - 6)) : 0.01;
            var noise = Math.Sqrt(-2 * Math.Log(1 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());
            y[i] = 20 + (slope[i] * elev[i]) - (0.05 * coast[i]) + noise;
        }

        return (lon, lat, elev, coast, y, slope);
    }
}

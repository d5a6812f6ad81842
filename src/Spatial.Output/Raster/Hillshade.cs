using Spatial.Core;

namespace Spatial.Output.Raster;

/// <summary>
/// Analytical hillshading of a DEM. Gradients by Horn's third-order finite difference over the 3 × 3
/// neighbourhood (B. K. P. Horn, "Hill shading and the reflectance map", Proc. IEEE 69(1), 1981); the shade is the
/// cosine of the angle between the surface normal and the direction of the light (Lambertian), clipped at 0.
/// Standard illumination: azimuth 315° (from the north-west, clockwise from north), altitude 45° (common practice).
/// </summary>
public static class Hillshade
{
    /// <summary>Metres per degree of latitude used for geographic grids (mean, WGS 84; 111 320 m is common practice).</summary>
    private const double MetresPerDegree = 111_320.0;

    /// <summary>
    /// Shade 0…1 per cell (row-major from the top row), NaN where the cell or any neighbour has no data.
    /// Cell sizes come from the grid's transform, in metres for projected grids; geographic grids (EPSG:4326) are
    /// scaled by 111 320 m per degree and cos(latitude) east–west. <paramref name="zFactor"/> multiplies heights.
    /// </summary>
    public static float[] Compute(RasterGrid dem, double azimuthDeg = 315, double altitudeDeg = 45, double zFactor = 1)
    {
        ArgumentNullException.ThrowIfNull(dem);
        var w = dem.Width;
        var h = dem.Height;
        var az = azimuthDeg * Math.PI / 180;
        var alt = altitudeDeg * Math.PI / 180;

        // Light direction: x east, y north, z up.
        var lx = Math.Sin(az) * Math.Cos(alt);
        var ly = Math.Cos(az) * Math.Cos(alt);
        var lz = Math.Sin(alt);
        var geographic = dem.Crs.EpsgCode == 4326;
        var result = new float[w * h];
        var values = dem.Values.ToArray();
        for (var row = 0; row < h; row++)
        {
            var dx = Math.Abs(dem.Transform.PixelWidth);
            var dy = Math.Abs(dem.Transform.PixelHeight);
            if (geographic)
            {
                var lat = dem.Transform.ToMap(0, row + 0.5).Y;
                dx *= MetresPerDegree * Math.Cos(lat * Math.PI / 180);
                dy *= MetresPerDegree;
            }

            var northUp = dem.Transform.PixelHeight < 0 ? 1.0 : -1.0;
            for (var col = 0; col < w; col++)
            {
                if (row == 0 || col == 0 || row == h - 1 || col == w - 1)
                {
                    result[(row * w) + col] = float.NaN;
                    continue;
                }

                double Z(int c, int r)
                {
                    var v = values[(r * w) + c];
                    return dem.IsNoData(v) ? double.NaN : v * zFactor;
                }

                double a = Z(col - 1, row - 1), b = Z(col, row - 1), c = Z(col + 1, row - 1);
                double d = Z(col - 1, row), f = Z(col + 1, row);
                double g = Z(col - 1, row + 1), hh = Z(col, row + 1), i = Z(col + 1, row + 1);
                var centre = Z(col, row);

                // Horn (1981): weights 1-2-1 across the neighbourhood, divided by 8 cell widths.
                var dzdx = ((c + (2 * f) + i) - (a + (2 * d) + g)) / (8 * dx);
                var dzdyDown = ((g + (2 * hh) + i) - (a + (2 * b) + c)) / (8 * dy);
                var dzdy = -dzdyDown * northUp;
                if (double.IsNaN(dzdx) || double.IsNaN(dzdy) || double.IsNaN(centre))
                {
                    result[(row * w) + col] = float.NaN;
                    continue;
                }

                var norm = Math.Sqrt((dzdx * dzdx) + (dzdy * dzdy) + 1);
                var shade = ((-dzdx * lx) + (-dzdy * ly) + lz) / norm;
                result[(row * w) + col] = (float)Math.Max(0, shade);
            }
        }

        return result;
    }
}

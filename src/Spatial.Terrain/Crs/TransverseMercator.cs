namespace Spatial.Terrain.Crs;

/// <summary>
/// Transverse Mercator on the WGS 84 ellipsoid by Krüger's series in the third flattening n, to order n⁴
/// (Krüger 1912; coefficients as given by Karney, C. F. F. (2011) "Transverse Mercator with an accuracy of a few
/// nanometers", J. Geodesy 85, 475–485, eqs. 35–36). Truncation error is below 0.1 mm within 3 900 km of the
/// central meridian. Used for the built-in UTM zones, where ProjNET's series is off by about a millimetre 6° from
/// the central meridian. Coordinates: longitude/latitude in degrees, easting/northing in metres; NaN in, NaN out.
/// </summary>
internal sealed class TransverseMercator
{
    private const double Deg = Math.PI / 180.0;
    private readonly double lon0;
    private readonly double k0;
    private readonly double falseEasting;
    private readonly double falseNorthing;
    private readonly double bigA;
    private readonly double e;
    private readonly double[] alpha;
    private readonly double[] beta;
    private readonly double[] delta;

    public TransverseMercator(double a, double f, double lon0Deg, double k0, double falseEasting, double falseNorthing)
    {
        lon0 = lon0Deg;
        this.k0 = k0;
        this.falseEasting = falseEasting;
        this.falseNorthing = falseNorthing;
        var n = f / (2 - f);
        var n2 = n * n;
        var n3 = n2 * n;
        var n4 = n3 * n;
        e = Math.Sqrt(f * (2 - f));
        bigA = a / (1 + n) * (1 + (n2 / 4) + (n4 / 64));
        alpha =
        [
            (n / 2) - (2 * n2 / 3) + (5 * n3 / 16) + (41 * n4 / 180),
            (13 * n2 / 48) - (3 * n3 / 5) + (557 * n4 / 1440),
            (61 * n3 / 240) - (103 * n4 / 140),
            49561 * n4 / 161280,
        ];
        beta =
        [
            (n / 2) - (2 * n2 / 3) + (37 * n3 / 96) - (n4 / 360),
            (n2 / 48) + (n3 / 15) - (437 * n4 / 1440),
            (17 * n3 / 480) - (37 * n4 / 840),
            4397 * n4 / 161280,
        ];
        delta =
        [
            (2 * n) - (2 * n2 / 3) - (2 * n3) + (116 * n4 / 45),
            (7 * n2 / 3) - (8 * n3 / 5) - (227 * n4 / 45),
            (56 * n3 / 15) - (136 * n4 / 35),
            4279 * n4 / 630,
        ];
    }

    /// <summary>The WGS 84 UTM zone (1–60), north or south hemisphere.</summary>
    public static TransverseMercator Utm(int zone, bool north) =>
        new(6378137.0, 1 / 298.257223563, (6 * zone) - 183, 0.9996, 500000, north ? 0 : 10000000);

    public (double E, double N) Forward(double lonDeg, double latDeg)
    {
        var phi = latDeg * Deg;
        var dl = Math.IEEERemainder(lonDeg - lon0, 360) * Deg;
        var sinPhi = Math.Sin(phi);
        var t = Math.Sinh(Math.Atanh(sinPhi) - (e * Math.Atanh(e * sinPhi)));
        var xi = Math.Atan2(t, Math.Cos(dl));
        var eta = Math.Atanh(Math.Sin(dl) / Math.Sqrt(1 + (t * t)));
        double x = eta, y = xi;
        for (var j = 1; j <= alpha.Length; j++)
        {
            var (s2, c2) = Math.SinCos(2 * j * xi);
            x += alpha[j - 1] * c2 * Math.Sinh(2 * j * eta);
            y += alpha[j - 1] * s2 * Math.Cosh(2 * j * eta);
        }

        return (falseEasting + (k0 * bigA * x), falseNorthing + (k0 * bigA * y));
    }

    public (double Lon, double Lat) Inverse(double easting, double northing)
    {
        var xi = (northing - falseNorthing) / (k0 * bigA);
        var eta = (easting - falseEasting) / (k0 * bigA);
        double xp = xi, ep = eta;
        for (var j = 1; j <= beta.Length; j++)
        {
            var (s2, c2) = Math.SinCos(2 * j * xi);
            xp -= beta[j - 1] * s2 * Math.Cosh(2 * j * eta);
            ep -= beta[j - 1] * c2 * Math.Sinh(2 * j * eta);
        }

        var chi = Math.Asin(Math.Sin(xp) / Math.Cosh(ep));
        var phi = chi;
        for (var j = 1; j <= delta.Length; j++)
        {
            phi += delta[j - 1] * Math.Sin(2 * j * chi);
        }

        var lon = lon0 + (Math.Atan2(Math.Sinh(ep), Math.Cos(xp)) / Deg);
        return (lon, phi / Deg);
    }
}

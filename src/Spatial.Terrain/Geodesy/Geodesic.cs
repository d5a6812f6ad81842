namespace Spatial.Terrain.Geodesy;

/// <summary>The result of an inverse geodesic problem: distance in metres, azimuths in degrees clockwise from north.</summary>
/// <param name="DistanceM">Geodesic distance, metres.</param>
/// <param name="Azimuth1Deg">Forward azimuth at point 1, degrees in (−180, 180].</param>
/// <param name="Azimuth2Deg">Forward azimuth at point 2 (the direction of travel on arrival), degrees in (−180, 180].</param>
public readonly record struct GeodesicLine(double DistanceM, double Azimuth1Deg, double Azimuth2Deg);

/// <summary>
/// The inverse geodesic problem on the WGS 84 ellipsoid (a = 6 378 137 m, f = 1/298.257223563).
/// </summary>
/// <remarks>
/// Main path: Vincenty, T. (1975) "Direct and inverse solutions of geodesics on the ellipsoid with application
/// of nested equations", Survey Review 23(176), 88–93 — iteration on the auxiliary-sphere longitude.
/// Guard for nearly antipodal points (where Vincenty's iteration converges slowly or not at all): the
/// formulation of Karney, C. F. F. (2013) "Algorithms for geodesics", J. Geodesy 87, 43–55, section 4 —
/// find the azimuth α1 at which the longitude difference λ12(α1), monotonic in α1 after normalising the points,
/// equals the target; here solved by bisection, with the integrals for λ and s evaluated by Gauss–Legendre
/// quadrature (not by Karney's series), so the guard is slow (about 10 µs) but robust.
/// NaN inputs give NaN outputs.
/// </remarks>
internal static class Geodesic
{
    /// <summary>WGS 84 semi-major axis, metres (NIMA TR8350.2).</summary>
    public const double A = 6378137.0;

    /// <summary>WGS 84 flattening (NIMA TR8350.2).</summary>
    public const double F = 1.0 / 298.257223563;

    /// <summary>Semi-minor axis, metres.</summary>
    public const double B = A * (1 - F);

    private const double Deg = Math.PI / 180.0;
    private const double Ep2 = ((A * A) - (B * B)) / (B * B);

    private static readonly (double[] X, double[] W) Gauss = GaussLegendre(32);

    /// <summary>Distance (m) and azimuths (deg) from (lat1, lon1) to (lat2, lon2), degrees.</summary>
    public static GeodesicLine Inverse(double lat1, double lon1, double lat2, double lon2)
    {
        if (double.IsNaN(lat1) || double.IsNaN(lon1) || double.IsNaN(lat2) || double.IsNaN(lon2))
        {
            return new GeodesicLine(double.NaN, double.NaN, double.NaN);
        }

        var v = Vincenty(lat1, lon1, lat2, lon2);
        return v ?? Robust(lat1, lon1, lat2, lon2);
    }

    /// <summary>Distance only, metres.</summary>
    public static double Distance(double lat1, double lon1, double lat2, double lon2) => Inverse(lat1, lon1, lat2, lon2).DistanceM;

    /// <summary>Vincenty's iteration; null when it does not converge (nearly antipodal points).</summary>
    internal static GeodesicLine? Vincenty(double lat1, double lon1, double lat2, double lon2)
    {
        var l = AngDiffRad(lon1, lon2);
        var u1 = Math.Atan((1 - F) * Math.Tan(lat1 * Deg));
        var u2 = Math.Atan((1 - F) * Math.Tan(lat2 * Deg));
        var (sinU1, cosU1) = Math.SinCos(u1);
        var (sinU2, cosU2) = Math.SinCos(u2);
        if (Math.Abs(lat1) == 90)
        {
            cosU1 = 0;
        }

        if (Math.Abs(lat2) == 90)
        {
            cosU2 = 0;
        }

        var lambda = l;
        double sinSigma, cosSigma, sigma, cos2Alpha, cos2SigmaM, sinLambda, cosLambda;
        var iterations = 0;
        while (true)
        {
            (sinLambda, cosLambda) = Math.SinCos(lambda);
            var t1 = cosU2 * sinLambda;
            var t2 = (cosU1 * sinU2) - (sinU1 * cosU2 * cosLambda);
            sinSigma = Math.Sqrt((t1 * t1) + (t2 * t2));
            cosSigma = (sinU1 * sinU2) + (cosU1 * cosU2 * cosLambda);
            sigma = Math.Atan2(sinSigma, cosSigma);
            if (sinSigma == 0)
            {
                if (cosSigma > 0)
                {
                    return new GeodesicLine(0, 0, 0); // coincident points
                }

                return null; // exactly antipodal: leave it to the guard
            }

            var sinAlpha = cosU1 * cosU2 * sinLambda / sinSigma;
            cos2Alpha = 1 - (sinAlpha * sinAlpha);
            cos2SigmaM = cos2Alpha != 0 ? cosSigma - (2 * sinU1 * sinU2 / cos2Alpha) : 0; // equatorial line
            var c = F / 16 * cos2Alpha * (4 + (F * (4 - (3 * cos2Alpha))));
            var next = l + ((1 - c) * F * sinAlpha * (sigma + (c * sinSigma * (cos2SigmaM + (c * cosSigma * (-1 + (2 * cos2SigmaM * cos2SigmaM)))))));
            if (Math.Abs(next) > Math.PI)
            {
                return null; // beyond the antipodal meridian: diverging
            }

            var done = Math.Abs(next - lambda) < 1e-13;
            lambda = next;
            if (done)
            {
                break;
            }

            if (++iterations > 60)
            {
                return null;
            }
        }

        (sinLambda, cosLambda) = Math.SinCos(lambda);
        var uSq = cos2Alpha * Ep2;
        var bigA = 1 + (uSq / 16384 * (4096 + (uSq * (-768 + (uSq * (320 - (175 * uSq)))))));
        var bigB = uSq / 1024 * (256 + (uSq * (-128 + (uSq * (74 - (47 * uSq))))));
        var deltaSigma = bigB * sinSigma * (cos2SigmaM + (bigB / 4 * ((cosSigma * (-1 + (2 * cos2SigmaM * cos2SigmaM)))
            - (bigB / 6 * cos2SigmaM * (-3 + (4 * sinSigma * sinSigma)) * (-3 + (4 * cos2SigmaM * cos2SigmaM))))));
        var s = B * bigA * (sigma - deltaSigma);
        var az1 = Math.Atan2(cosU2 * sinLambda, (cosU1 * sinU2) - (sinU1 * cosU2 * cosLambda)) / Deg;
        var az2 = Math.Atan2(cosU1 * sinLambda, (-sinU1 * cosU2) + (cosU1 * sinU2 * cosLambda)) / Deg;
        return new GeodesicLine(s, az1, az2);
    }

    /// <summary>The guard: Karney's (2013) formulation with bisection on α1 and quadrature for the integrals.</summary>
    internal static GeodesicLine Robust(double lat1, double lon1, double lat2, double lon2)
    {
        // Normalise (Karney 2013, sec. 4): lon12 ≥ 0, |lat1| ≥ |lat2|, lat1 ≤ 0.
        var lon12 = AngDiffRad(lon1, lon2);
        var lonSign = lon12 < 0 ? -1.0 : 1.0;
        lon12 = Math.Abs(lon12);
        var swap = Math.Abs(lat1) < Math.Abs(lat2) ? -1.0 : 1.0;
        if (swap < 0)
        {
            lonSign = -lonSign;
            (lat1, lat2) = (lat2, lat1);
        }

        var latSign = lat1 > 0 ? -1.0 : 1.0;
        lat1 *= latSign;
        lat2 *= latSign;

        var beta1 = Math.Atan((1 - F) * Math.Tan(lat1 * Deg));
        var beta2 = Math.Atan((1 - F) * Math.Tan(lat2 * Deg));
        var (sb1, cb1) = Math.SinCos(beta1);
        var (sb2, cb2) = Math.SinCos(beta2);
        if (sb1 == 0)
        {
            sb1 = -1e-300; // on the equator: treat as just south of it, as Karney does
        }

        cb1 = Math.Max(cb1, 1e-300);
        cb2 = Math.Max(cb2, 1e-300);

        double lo = 0, hi = Math.PI;
        Path p = default;
        for (var i = 0; i < 80; i++)
        {
            var mid = 0.5 * (lo + hi);
            p = Trace(mid, sb1, cb1, sb2, cb2);
            if (p.Lambda12 < lon12)
            {
                lo = mid;
            }
            else
            {
                hi = mid;
            }

            if (hi - lo < 1e-15)
            {
                break;
            }
        }

        p = Trace(0.5 * (lo + hi), sb1, cb1, sb2, cb2);
        var (salp1, calp1) = Math.SinCos(0.5 * (lo + hi));
        var salp2 = p.SinAlpha2;
        var calp2 = p.CosAlpha2;
        if (swap < 0)
        {
            (salp1, salp2) = (salp2, salp1);
            (calp1, calp2) = (calp2, calp1);
        }

        salp1 *= swap * lonSign;
        calp1 *= swap * latSign;
        salp2 *= swap * lonSign;
        calp2 *= swap * latSign;
        return new GeodesicLine(p.DistanceM, Math.Atan2(salp1, calp1) / Deg, Math.Atan2(salp2, calp2) / Deg);
    }

    private readonly record struct Path(double Lambda12, double DistanceM, double SinAlpha2, double CosAlpha2);

    /// <summary>Follows the geodesic leaving β1 at azimuth α1 to its crossing of β2 (with cos α2 ≥ 0): λ12 and s12.</summary>
    private static Path Trace(double alpha1, double sb1, double cb1, double sb2, double cb2)
    {
        var (salp1, calp1) = Math.SinCos(alpha1);
        var salp0 = salp1 * cb1;
        var calp0 = Math.Sqrt(Math.Max(0, 1 - (salp0 * salp0)));

        // Point 1 on the auxiliary sphere.
        var ssig1 = sb1;
        var csig1 = calp1 * cb1;
        var somg1 = salp0 * sb1;
        var comg1 = csig1;

        // Point 2: cos α2 from Clairaut's relation, chosen ≥ 0.
        var salp2 = salp0 / cb2;
        var calp2sq = ((calp1 * cb1) * (calp1 * cb1)) + (cb1 == cb2 ? 0 : (cb2 - cb1) * (cb2 + cb1));
        var calp2 = Math.Sqrt(Math.Max(0, calp2sq)) / cb2;
        var ssig2 = sb2;
        var csig2 = calp2 * cb2;
        var somg2 = salp0 * sb2;
        var comg2 = csig2;

        var sig12 = Math.Atan2(Math.Max(0, (csig1 * ssig2) - (ssig1 * csig2)), (csig1 * csig2) + (ssig1 * ssig2));
        var omg12 = Math.Atan2(Math.Max(0, (comg1 * somg2) - (somg1 * comg2)), (comg1 * comg2) + (somg1 * somg2));
        var sig1 = Math.Atan2(ssig1, csig1);

        var k2 = Ep2 * calp0 * calp0;
        double iLambda = 0, iS = 0;
        var half = 0.5 * sig12;
        var centre = sig1 + half;
        for (var i = 0; i < Gauss.X.Length; i++)
        {
            var sg = centre + (half * Gauss.X[i]);
            var sn = Math.Sin(sg);
            var root = Math.Sqrt(1 + (k2 * sn * sn));
            iS += Gauss.W[i] * root;
            iLambda += Gauss.W[i] * (2 - F) / (1 + ((1 - F) * root));
        }

        iS *= half;
        iLambda *= half;
        var lam12 = omg12 - (F * salp0 * iLambda);
        return new Path(lam12, B * iS, salp2, calp2);
    }

    /// <summary>lon2 − lon1 reduced to (−π, π], radians.</summary>
    internal static double AngDiffRad(double lon1, double lon2)
    {
        var d = Math.IEEERemainder(lon2 - lon1, 360.0);
        if (d <= -180)
        {
            d += 360;
        }

        return d * Deg;
    }

    /// <summary>Gauss–Legendre nodes and weights on [−1, 1] (Newton on P_n; Abramowitz and Stegun 25.4.29).</summary>
    private static (double[] X, double[] W) GaussLegendre(int n)
    {
        var x = new double[n];
        var w = new double[n];
        for (var i = 0; i < n; i++)
        {
            var z = Math.Cos(Math.PI * (i + 0.75) / (n + 0.5));
            double dp = 0;
            for (var it = 0; it < 100; it++)
            {
                double p0 = 1, p1 = z;
                for (var k = 2; k <= n; k++)
                {
                    var pk = (((2 * k) - 1) * z * p1 - ((k - 1) * p0)) / k;
                    p0 = p1;
                    p1 = pk;
                }

                dp = n * ((z * p1) - p0) / ((z * z) - 1);
                var dz = p1 / dp;
                z -= dz;
                if (Math.Abs(dz) < 1e-16)
                {
                    break;
                }
            }

            x[i] = z;
            w[i] = 2 / ((1 - (z * z)) * dp * dp);
        }

        return (x, w);
    }
}

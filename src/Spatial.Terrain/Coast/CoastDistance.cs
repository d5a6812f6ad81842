using NetTopologySuite.Geometries;
using Spatial.Terrain.Geodesy;

namespace Spatial.Terrain.Coast;

/// <summary>The nearest coast point of a station.</summary>
/// <param name="DistanceM">Geodesic distance on WGS 84, metres; positive on land, negative at sea when the coast has land polygons, otherwise ≥ 0. NaN for a NaN station.</param>
/// <param name="AzimuthDeg">Azimuth from the station to the nearest coast point, degrees clockwise from north [0, 360); NaN on the coast itself.</param>
/// <param name="CoastLongitude">Longitude of the nearest coast point, degrees.</param>
/// <param name="CoastLatitude">Latitude of the nearest coast point, degrees.</param>
internal readonly record struct CoastHit(double DistanceM, double AzimuthDeg, double CoastLongitude, double CoastLatitude);

/// <summary>
/// Nearest point of a <see cref="CoastGeometry"/> to a station, exactly on the ellipsoid.
/// </summary>
/// <remarks>
/// 1. Candidates: a best-first walk of the NetTopologySuite STR-tree over segment envelopes, ordered by a rigorous
///    lower bound of the geodesic distance to each box (<see cref="BoxBound"/>; longitudes compared across the
///    antimeridian); the walk stops when the smallest bound left is at least the best distance found, so the true
///    nearest segment is never missed. 2. Each segment gets a rigorous lower
///    bound (<see cref="SegmentBound"/>); it is refined only when that bound is below the best so far; segments wait in the same queue as the boxes, so the one with the smallest bound is refined first.
///    3. Refinement: the segment is straight in longitude/latitude
///    (RFC 7946); the geodesic distance (Vincenty / Karney guard, <see cref="Geodesic"/>) from the station to the point at
///    fraction t is minimised over t ∈ [0, 1] by Brent's method (parabolic steps, golden-section fallback) to 0.05 mm
///    along the segment, and compared with both ends.
/// </remarks>
internal static class CoastDistance
{
    private const double Deg = Math.PI / 180;

    // M_eq = a(1 − e²), the meridian radius of curvature at the equator, the smallest radius of curvature of WGS 84.
    private const double MinRadiusM = Geodesic.A * (1 - (Geodesic.F * (2 - Geodesic.F)));

    // a²/b, the polar radius of curvature, the largest radius of curvature of WGS 84.
    private const double MaxRadiusM = Geodesic.A * Geodesic.A / Geodesic.B;

    public static CoastHit Nearest(CoastGeometry coast, double lat, double lon)
    {
        if (double.IsNaN(lat) || double.IsNaN(lon))
        {
            return new CoastHit(double.NaN, double.NaN, double.NaN, double.NaN);
        }

        lon = Math.IEEERemainder(lon, 360);
        var segs = coast.Segments;
        var tree = coast.Flat;
        Span<double> s = stackalloc double[3];
        Ecef.ToEcef(lat, lon, s);
        var latRad = lat * Deg;
        var (sinLat, cosLat) = Math.SinCos(latRad);
        var best = double.PositiveInfinity;
        var bestLat = double.NaN;
        var bestLon = double.NaN;
        var bestIndex = int.MaxValue;
        var queue = new PriorityQueue<int, double>();
        queue.Enqueue(0, 0);
        while (queue.TryDequeue(out var node, out var bound))
        {
            if (bound >= best)
            {
                break; // the queue is ordered by a rigorous lower bound: nothing left can be nearer
            }

            if (node < 0)
            {
                // A segment, queued with its own lower bound: refine it exactly.
                var i = -node - 1;
                var (dist, plat, plon) = Refine(lat, lon, segs.Lat1[i], segs.Lon1[i], segs.Lat2[i], segs.Lon2[i]);
                if (dist < best || (dist == best && i < bestIndex))
                {
                    best = dist;
                    bestLat = plat;
                    bestLon = plon;
                    bestIndex = i;
                }

                continue;
            }

            var first = tree.First[node];
            var count = tree.Count[node];
            for (var k = 0; k < count; k++)
            {
                var child = tree.Children[first + k];
                var b = tree.Leaf[node] ? SegmentBound(s, segs, child) : BoxBound(tree.Env, child, latRad, sinLat, cosLat, lon);
                if (b < best)
                {
                    queue.Enqueue(tree.Leaf[node] ? -child - 1 : child, b);
                }
            }
        }

        if (double.IsPositiveInfinity(best))
        {
            return new CoastHit(double.NaN, double.NaN, double.NaN, double.NaN);
        }

        var azimuth = double.NaN;
        if (best > 0)
        {
            azimuth = Geodesic.Inverse(lat, lon, bestLat, bestLon).Azimuth1Deg;
            if (azimuth < 0)
            {
                azimuth += 360;
            }
        }

        var signed = best;
        if (coast.LandLocator is { } locator && best > 0)
        {
            var where = locator.Locate(new Coordinate(lon, lat));
            if (where == Location.Exterior)
            {
                signed = -best;
            }
        }

        return new CoastHit(signed, azimuth, bestLon, bestLat);
    }

    /// <summary>
    /// A rigorous lower bound of the geodesic distance (m) from the station to any point of node <paramref name="k"/>'s
    /// longitude/latitude box: M_eq times the great-circle angle to the box on the unit sphere (same latitude and
    /// longitude). Every path on the ellipsoid is at least as long as the same path on a sphere of radius
    /// M_eq = a(1 − e²) = 6 335 439 m, the smallest radius of curvature, because M(φ) ≥ M_eq and N(φ) ≥ a > M_eq.
    /// The angle to the box: the latitude gap when the station's longitude is within the box's; otherwise the angle to
    /// the nearer meridian edge, at the foot of the perpendicular from the station clamped to the edge.
    /// </summary>
    private static double BoxBound(double[] env, int k, double latRad, double sinLat, double cosLat, double lon)
    {
        var lo = env[4 * k];
        var hi = env[(4 * k) + 1];
        var south = env[(4 * k) + 2] * Deg;
        var north = env[(4 * k) + 3] * Deg;
        var lonGap = LonGap(lon, lo, hi);
        double angle;
        if (lonGap == 0)
        {
            angle = Gap(latRad, south, north);
        }
        else
        {
            var dl = lonGap * Deg;
            var cdl = Math.Cos(dl);
            double foot;
            if (cdl > 0)
            {
                foot = Math.Atan(Math.Tan(latRad) / cdl);
            }
            else
            {
                foot = latRad >= 0 ? Math.PI / 2 : -Math.PI / 2;
            }

            var phi = Math.Clamp(foot, south, north);
            var (sp, cp) = Math.SinCos(phi);
            var c = (sinLat * sp) + (cosLat * cp * cdl);
            angle = Math.Acos(Math.Clamp(c, -1, 1));
        }

        return MinRadiusM * angle * (1 - 1e-9);
    }

    private static double Gap(double v, double lo, double hi) => v < lo ? lo - v : v > hi ? v - hi : 0;

    private static double LonGap(double lon, double lo, double hi)
    {
        if (hi - lo >= 360)
        {
            return 0;
        }

        var g = double.PositiveInfinity;
        for (var shift = -360.0; shift <= 360.0; shift += 360.0)
        {
            g = Math.Min(g, Gap(lon + shift, lo, hi));
        }

        return g;
    }

    /// <summary>WGS 84 metres per degree of longitude at latitude φ: (π/180)·N(φ)·cos φ.</summary>
    internal static double MetresPerDegreeLongitude(double latDeg) => Surface.TerrainMetrics.MetresPerDegree(latDeg).EastM;

    /// <summary>
    /// A lower bound of the geodesic distance from the station to segment i, metres: the larger of
    /// (a) chord to an end − the segment's length bound, and (b) 2·R·asin(c / 2R) with R = a²/b (the largest radius of
    /// curvature of WGS 84) and c = the 3-D distance to the straight chord between the ends less the deviation bound —
    /// a geodesic's curvature is at least 1/R, so by Schur's comparison theorem it is no shorter than the circular arc
    /// of radius R over the same chord.
    /// </summary>
    private static double SegmentBound(ReadOnlySpan<double> s, SegmentSet segs, int i)
    {
        var a = Math.Max(Chord(s, segs.Ecef1, i), Chord(s, segs.Ecef2, i)) - segs.LengthBoundM[i];
        var dev = segs.DeviationBoundM[i];
        if (double.IsNaN(dev))
        {
            return a;
        }

        var c = ChordToSegment(s, segs.Ecef1, segs.Ecef2, i) - dev;
        if (c <= 0)
        {
            return Math.Max(a, 0);
        }

        var b = 2 * MaxRadiusM * Math.Asin(Math.Min(1, c / (2 * MaxRadiusM)));
        return Math.Max(a, b * (1 - 1e-12));
    }

    private static double ChordToSegment(ReadOnlySpan<double> s, double[] e1, double[] e2, int i)
    {
        double ax = e1[3 * i], ay = e1[(3 * i) + 1], az = e1[(3 * i) + 2];
        double dx = e2[3 * i] - ax, dy = e2[(3 * i) + 1] - ay, dz = e2[(3 * i) + 2] - az;
        double px = s[0] - ax, py = s[1] - ay, pz = s[2] - az;
        var len2 = (dx * dx) + (dy * dy) + (dz * dz);
        var t = len2 > 0 ? Math.Clamp(((px * dx) + (py * dy) + (pz * dz)) / len2, 0, 1) : 0;
        var qx = px - (t * dx);
        var qy = py - (t * dy);
        var qz = pz - (t * dz);
        return Math.Sqrt((qx * qx) + (qy * qy) + (qz * qz));
    }

    private static double Chord(ReadOnlySpan<double> s, double[] ends, int i)
    {
        var dx = s[0] - ends[3 * i];
        var dy = s[1] - ends[(3 * i) + 1];
        var dz = s[2] - ends[(3 * i) + 2];
        return Math.Sqrt((dx * dx) + (dy * dy) + (dz * dz));
    }

    /// <summary>Minimum geodesic distance from the station to the lon/lat-straight segment, with the point reached.</summary>
    internal static (double DistanceM, double Lat, double Lon) Refine(double lat, double lon, double lat1, double lon1, double lat2, double lon2)
    {
        var d1 = Geodesic.Distance(lat, lon, lat1, lon1);
        if (lat1 == lat2 && lon1 == lon2)
        {
            return (d1, lat1, lon1);
        }

        double F(double t) => Geodesic.Distance(lat, lon, lat1 + (t * (lat2 - lat1)), lon1 + (t * (lon2 - lon1)));

        // Stop when the bracket is below 0.05 mm of the segment (its length bounded by 111.7 km per degree).
        var lengthM = 111700 * (Math.Abs(lat2 - lat1) + Math.Abs(lon2 - lon1));
        var tol = Math.Max(1e-12, 5e-5 / lengthM);

        // Brent's minimisation (Brent 1973, "Algorithms for Minimization without Derivatives", ch. 5): parabolic steps
        // with golden-section fallback on [0, 1], started at the middle.
        // Start from the foot of the perpendicular on the straight 3-D chord, in a narrow bracket when it is one
        // (the distance there is below both bracket ends), else over the whole segment.
        const double CGold = 0.3819660112501051;
        Span<double> ps = stackalloc double[9];
        Ecef.ToEcef(lat, lon, ps[..3]);
        Ecef.ToEcef(lat1, lon1, ps.Slice(3, 3));
        Ecef.ToEcef(lat2, lon2, ps.Slice(6, 3));
        double ex = ps[6] - ps[3], ey = ps[7] - ps[4], ez = ps[8] - ps[5];
        var len2 = (ex * ex) + (ey * ey) + (ez * ez);
        var t0 = len2 > 0 ? Math.Clamp((((ps[0] - ps[3]) * ex) + ((ps[1] - ps[4]) * ey) + ((ps[2] - ps[5]) * ez)) / len2, 0, 1) : 0.5;
        double a = 0, b = 1;
        var x = t0;
        var fx = F(x);
        var lo = Math.Max(0, t0 - 0.02);
        var hi = Math.Min(1, t0 + 0.02);
        if ((lo == 0 || F(lo) >= fx) && (hi == 1 || F(hi) >= fx))
        {
            a = lo;
            b = hi;
        }

        double w = x, v = x;
        double fw = fx, fv = fx;
        double d = 0, e = 0;
        for (var iter = 0; iter < 200; iter++)
        {
            var xm = 0.5 * (a + b);
            var tol2 = 2 * tol;
            if (Math.Abs(x - xm) <= tol2 - (0.5 * (b - a)))
            {
                break;
            }

            var golden = true;
            if (Math.Abs(e) > tol)
            {
                var r = (x - w) * (fx - fv);
                var q = (x - v) * (fx - fw);
                var p = ((x - v) * q) - ((x - w) * r);
                q = 2 * (q - r);
                if (q > 0)
                {
                    p = -p;
                }

                q = Math.Abs(q);
                var eOld = e;
                e = d;
                if (Math.Abs(p) < Math.Abs(0.5 * q * eOld) && p > q * (a - x) && p < q * (b - x))
                {
                    d = p / q;
                    var trial = x + d;
                    if (trial - a < tol2 || b - trial < tol2)
                    {
                        d = xm >= x ? tol : -tol;
                    }

                    golden = false;
                }
            }

            if (golden)
            {
                e = x >= xm ? a - x : b - x;
                d = CGold * e;
            }

            var u = Math.Abs(d) >= tol ? x + d : x + (d >= 0 ? tol : -tol);
            var fu = F(u);
            if (fu <= fx)
            {
                if (u >= x)
                {
                    a = x;
                }
                else
                {
                    b = x;
                }

                (v, fv) = (w, fw);
                (w, fw) = (x, fx);
                (x, fx) = (u, fu);
            }
            else
            {
                if (u < x)
                {
                    a = u;
                }
                else
                {
                    b = u;
                }

                if (fu <= fw || w == x)
                {
                    (v, fv) = (w, fw);
                    (w, fw) = (u, fu);
                }
                else if (fu <= fv || v == x || v == w)
                {
                    (v, fv) = (u, fu);
                }
            }
        }

        var tm = x;
        var fm = fx;
        var d2 = Geodesic.Distance(lat, lon, lat2, lon2);
        if (d1 <= fm && d1 <= d2)
        {
            return (d1, lat1, lon1);
        }

        if (d2 <= fm)
        {
            return (d2, lat2, lon2);
        }

        return (fm, lat1 + (tm * (lat2 - lat1)), lon1 + (tm * (lon2 - lon1)));
    }
}

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
/// 1. Candidates: an STR-tree window around the station, widened ×4 until it holds a segment; the geodesic distance
///    to the nearest end of those gives an upper bound D. 2. A conservative window: every point within geodesic
///    distance D lies within D / 110 574 m of latitude (the shortest metres per degree of latitude, at the equator)
///    and within D / min(N cos φ) of longitude over that latitude band (all longitudes when the band reaches a pole);
///    the tree returns every segment whose envelope meets it (both sides of the antimeridian). 3. Each candidate gets
///    a lower bound, chord(station, end) − (upper bound of the segment's length), which never exceeds the true
///    geodesic distance (a chord is never longer than the geodesic); candidates are refined in order of that bound
///    until the bound exceeds the best distance found. 4. Refinement: the segment is straight in longitude/latitude
///    (RFC 7946); the geodesic distance (Vincenty / Karney guard, <see cref="Geodesic"/>) from the station to the point at
///    fraction t is minimised over t ∈ [0, 1] by golden-section search to 1e-9 of the segment.
/// </remarks>
internal static class CoastDistance
{
    private const double MinMetresPerDegreeLatitude = 110574.0; // GeodSolve: 0.001° of meridian at the equator = 110.574276 m
    private static readonly double InvPhi = (Math.Sqrt(5) - 1) / 2;

    public static CoastHit Nearest(CoastGeometry coast, double lat, double lon)
    {
        if (double.IsNaN(lat) || double.IsNaN(lon))
        {
            return new CoastHit(double.NaN, double.NaN, double.NaN, double.NaN);
        }

        lon = Math.IEEERemainder(lon, 360);
        var segs = coast.Segments;
        Span<double> s = stackalloc double[3];
        Ecef.ToEcef(lat, lon, s);

        // 1. An upper bound from a small window.
        var best = double.PositiveInfinity;
        var r = 0.02;
        List<int> found = [];
        while (found.Count == 0)
        {
            Query(coast, lat, lon, r, r / Math.Max(0.05, Math.Cos(lat * Math.PI / 180)), found);
            if (found.Count == 0)
            {
                if (r > 200)
                {
                    return new CoastHit(double.NaN, double.NaN, double.NaN, double.NaN);
                }

                r *= 4;
            }
        }

        var nearestEnd = -1;
        var nearestChord = double.PositiveInfinity;
        foreach (var i in found)
        {
            var c = Math.Min(Chord(s, segs.Ecef1, i), Chord(s, segs.Ecef2, i));
            if (c < nearestChord)
            {
                nearestChord = c;
                nearestEnd = i;
            }
        }

        best = Math.Min(
            Geodesic.Distance(lat, lon, segs.Lat1[nearestEnd], segs.Lon1[nearestEnd]),
            Geodesic.Distance(lat, lon, segs.Lat2[nearestEnd], segs.Lon2[nearestEnd]));

        // 2. Every segment that can hold a point within `best`.
        var d = (best * 1.000001) + 1e-6;
        var dLat = d / MinMetresPerDegreeLatitude;
        var north = lat + dLat;
        var south = lat - dLat;
        double dLon;
        if (north >= 90 || south <= -90)
        {
            dLon = 400;
        }
        else
        {
            var maxAbs = Math.Max(Math.Abs(north), Math.Abs(south));
            var perDeg = MetresPerDegreeLongitude(maxAbs) * 0.999999;
            dLon = d / perDeg;
        }

        found.Clear();
        Query(coast, lat, lon, dLat, dLon, found);

        // 3. Lower bounds, then refinement in order.
        var bounds = new (double Bound, int Index)[found.Count];
        for (var k = 0; k < found.Count; k++)
        {
            var i = found[k];
            var lb = Math.Max(Chord(s, segs.Ecef1, i), Chord(s, segs.Ecef2, i)) - segs.LengthBoundM[i];
            bounds[k] = (Math.Max(0, lb), i);
        }

        Array.Sort(bounds, (a, b) => a.Bound != b.Bound ? a.Bound.CompareTo(b.Bound) : a.Index.CompareTo(b.Index));
        var bestLat = double.NaN;
        var bestLon = double.NaN;
        best = double.PositiveInfinity;
        foreach (var (bound, i) in bounds)
        {
            if (bound > best)
            {
                break;
            }

            var (dist, plat, plon) = Refine(lat, lon, segs.Lat1[i], segs.Lon1[i], segs.Lat2[i], segs.Lon2[i]);
            if (dist < best)
            {
                best = dist;
                bestLat = plat;
                bestLon = plon;
            }
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

    /// <summary>WGS 84 metres per degree of longitude at latitude φ: (π/180)·N(φ)·cos φ.</summary>
    internal static double MetresPerDegreeLongitude(double latDeg) => Surface.TerrainMetrics.MetresPerDegree(latDeg).EastM;

    private static void Query(CoastGeometry coast, double lat, double lon, double dLat, double dLon, List<int> into)
    {
        var south = Math.Max(-90, lat - dLat);
        var north = Math.Min(90, lat + dLat);
        if (dLon >= 180)
        {
            into.AddRange(coast.Index.Query(new Envelope(-540, 540, south, north)));
            return;
        }

        into.AddRange(coast.Index.Query(new Envelope(lon - dLon, lon + dLon, south, north)));
        if (lon - dLon < -180)
        {
            into.AddRange(coast.Index.Query(new Envelope(lon - dLon + 360, 540, south, north)));
        }

        if (lon + dLon > 180)
        {
            into.AddRange(coast.Index.Query(new Envelope(-540, lon + dLon - 360, south, north)));
        }

        if (into.Count > 1)
        {
            into.Sort();
            var w = 1;
            for (var k = 1; k < into.Count; k++)
            {
                if (into[k] != into[w - 1])
                {
                    into[w++] = into[k];
                }
            }

            into.RemoveRange(w, into.Count - w);
        }
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
        double a = 0, b = 1;
        var x1 = b - (InvPhi * (b - a));
        var x2 = a + (InvPhi * (b - a));
        var f1 = F(x1);
        var f2 = F(x2);
        while (b - a > 1e-9)
        {
            if (f1 <= f2)
            {
                b = x2;
                x2 = x1;
                f2 = f1;
                x1 = b - (InvPhi * (b - a));
                f1 = F(x1);
            }
            else
            {
                a = x1;
                x1 = x2;
                f1 = f2;
                x2 = a + (InvPhi * (b - a));
                f2 = F(x2);
            }
        }

        var tm = 0.5 * (a + b);
        var fm = F(tm);
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

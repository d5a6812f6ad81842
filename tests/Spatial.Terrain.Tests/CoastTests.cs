using NetTopologySuite.Geometries;
using Spatial.Core;
using Spatial.Terrain.Coast;
using Spatial.Testing;
using Xunit;

namespace Spatial.Terrain.Tests;

public sealed class CoastTests
{
    private const double DistanceToleranceM = 1e-3;
    // The distance is flat along the coast near its minimum, so the nearest point (and the azimuth) is fixed less tightly than the distance.
    private const double AzimuthToleranceDeg = 1e-4;

    [Fact]
    public void Distances_to_points_lines_and_polygon_rings_agree_with_GeographicLib()
    {
        // GeographicLib 2.1.2 GeodSolve minimised along each lon/lat-straight segment (data/coast/SOURCES.md).
        var coast = CoastGeometry.FromGeoJson(TestData.Path("coast", "coast.geojson"));
        Assert.True(coast.HasLand);
        var rows = ReferenceCsv.Read("coast", "coast_reference.csv");
        Assert.Equal(33, rows.Count);
        foreach (var r in rows)
        {
            var hit = CoastDistance.Nearest(coast, r.D("lat"), r.D("lon"));
            var sign = r["on_land"] == "1" ? 1 : -1;
            Tolerance.Near(sign * r.D("distance_m"), hit.DistanceM, DistanceToleranceM, $"signed distance at {r["lon"]} {r["lat"]}");
            var az = r.D("azimuth_deg");
            Tolerance.Near(0, Math.IEEERemainder(hit.AzimuthDeg - az, 360), AzimuthToleranceDeg, $"azimuth at {r["lon"]} {r["lat"]}");
        }
    }

    [Fact]
    public void The_candidate_search_never_misses_the_segment_a_brute_force_search_finds()
    {
        // Property test (seeded): a jagged coastline of 800 short segments at high latitude, 60 stations; the
        // STR-tree search must give the same distance as refining every segment.
        var rng = new Random(42);
        var coords = new List<Coordinate>();
        double lon = -20, lat = 64;
        for (var i = 0; i < 800; i++)
        {
            coords.Add(new Coordinate(lon, lat));
            lon += rng.NextDouble() * 0.05;
            lat += (rng.NextDouble() - 0.5) * 0.03;
        }

        var factory = new GeometryFactory();
        var coast = CoastGeometry.FromGeometry(factory.CreateLineString(coords.ToArray()));
        for (var s = 0; s < 60; s++)
        {
            var slat = 63 + (rng.NextDouble() * 2.5);
            var slon = -21 + (rng.NextDouble() * 45);
            var hit = CoastDistance.Nearest(coast, slat, slon);
            var brute = double.PositiveInfinity;
            for (var i = 0; i + 1 < coords.Count; i++)
            {
                brute = Math.Min(brute, CoastDistance.Refine(slat, slon, coords[i].Y, coords[i].X, coords[i + 1].Y, coords[i + 1].X).DistanceM);
            }

            Tolerance.Near(brute, hit.DistanceM, 1e-6, $"station {s}");
        }
    }

    [Fact]
    public void The_world_coast_puts_the_sea_negative_and_inland_positive()
    {
        // Plumbing with common knowledge: the Gulf of Guinea at 0°N 0°E is sea, about 500 km off the Ghana coast;
        // Kassel (51.3°N, 9.5°E) lies roughly 300 km from the North Sea.
        var world = CoastGeometry.World;
        Assert.True(world.HasLand);
        Assert.True(world.SegmentCount > 300_000);
        var sea = CoastDistance.Nearest(world, 0, 0);
        Assert.InRange(sea.DistanceM, -700_000, -400_000);
        var inland = CoastDistance.Nearest(world, 51.3, 9.5);
        Assert.InRange(inland.DistanceM, 200_000, 400_000);
        Assert.InRange(inland.AzimuthDeg, 270, 360);
    }

    [Fact]
    public void A_coast_file_that_is_not_GeoJSON_is_refused_naming_the_file()
    {
        var dir = TestData.NewScratchFolder("coast-bad");
        try
        {
            var path = Path.Combine(dir, "c.geojson");
            File.WriteAllText(path, "{\"type\": \"FeatureCollection\", \"features\": [ {\"type\": \"Feature\", ");
            var e = Assert.Throws<SpatialDataException>(() => CoastGeometry.FromGeoJson(path));
            Assert.Equal(path, e.Diagnostic.File);
            var projected = Path.Combine(dir, "p.geojson");
            File.WriteAllText(projected, "{\"type\": \"Point\", \"coordinates\": [500000, 6700000]}");
            var e2 = Assert.Throws<SpatialDataException>(() => CoastGeometry.FromGeoJson(projected));
            Assert.Contains("degrees", e2.Diagnostic.Hint, StringComparison.Ordinal);
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }
}

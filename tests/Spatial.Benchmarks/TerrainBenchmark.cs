using NetTopologySuite.Geometries;
using Spatial.Core;
using Spatial.Terrain;
using Spatial.Terrain.Coast;
using Spatial.Terrain.Crs;
using Spatial.Terrain.Rasters;

namespace Spatial.Benchmarks;

/// <summary>
/// Terrain speed: geodesic coast distance of 100 000 stations against a 500 000-vertex coastline (target ≤ 10 s),
/// and DEM sampling of 100 000 stations (target &lt; 1 s). Baselines measured in the same run: a brute-force
/// haversine search over every vertex (on a subset of stations, scaled), and a bare loop over the stations.
/// Arguments: [stations] [vertices] (defaults 100000 500000).
/// </summary>
public sealed class TerrainBenchmark : IBenchmark
{
    public string Name => "terrain";

    public string Description => "coast distance (STR-tree + exact geodesic) and DEM sampling vs brute-force haversine and a bare loop";

    public void Run(BenchReport report, string[] args)
    {
        var nStations = args.Length > 0 ? int.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 100_000;
        var nVertices = args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 500_000;
        var rng = new Random(20261201);

        // An invented jagged island coast around 10°E 62°N, about 12° across, as one polygon ring.
        var ring = new Coordinate[nVertices + 1];
        for (var i = 0; i < nVertices; i++)
        {
            var t = 2 * Math.PI * i / nVertices;
            var radius = 6 + (0.8 * Math.Sin(7 * t)) + (0.3 * Math.Sin(53 * t)) + (0.05 * Math.Sin(911 * t)) + (0.01 * (rng.NextDouble() - 0.5));
            ring[i] = new Coordinate(10 + (radius * Math.Cos(t) / Math.Cos(62 * Math.PI / 180) * 0.5), 62 + (radius * Math.Sin(t) * 0.5));
        }

        ring[nVertices] = ring[0];
        var factory = new GeometryFactory();
        var polygon = factory.CreatePolygon(ring);
        var stations = new List<Station>(nStations);
        for (var i = 0; i < nStations; i++)
        {
            stations.Add(new Station(new StationId($"S{i:000000}"), string.Empty, -5 + (rng.NextDouble() * 30), 56 + (rng.NextDouble() * 12), 500));
        }

        var buildS = BenchReport.BestSeconds(1, () => CoastGeometry.FromGeometry(polygon));
        var coast = CoastGeometry.FromGeometry(polygon);
        report.Figure("coast index build (s)", buildS, "s");

        // Baseline: haversine to every vertex, brute force, on a subset; scaled to all stations.
        var subset = Math.Min(40, nStations);
        var bruteS = BenchReport.BestSeconds(1, () =>
        {
            var sink = 0.0;
            for (var s = 0; s < subset; s++)
            {
                var best = double.MaxValue;
                var (la, lo) = (stations[s].Latitude * Math.PI / 180, stations[s].Longitude * Math.PI / 180);
                for (var v = 0; v < nVertices; v++)
                {
                    var dla = (ring[v].Y * Math.PI / 180) - la;
                    var dlo = (ring[v].X * Math.PI / 180) - lo;
                    var h = (Math.Sin(dla / 2) * Math.Sin(dla / 2)) + (Math.Cos(la) * Math.Cos(ring[v].Y * Math.PI / 180) * Math.Sin(dlo / 2) * Math.Sin(dlo / 2));
                    best = Math.Min(best, h);
                }

                sink += best;
            }

            GC.KeepAlive(sink);
        }) * nStations / subset;

        CovariateTable? table = null;
        var coastS = BenchReport.BestSeconds(1, () => table = Covariates.Compute(stations, new CovariateOptions { Coast = coast }));
        report.Figure($"coast distance, {nStations} stations × {nVertices} vertices (s)", coastS, "s");
        report.Figure("baseline: brute-force haversine over all vertices, scaled (s)", bruteS, "s");
        report.Figure("speed-up over brute force (×)", bruteS / coastS, "×");
        report.Figure("stations on land (positive distance)", table!.Rows.Count(r => r.CoastKm > 0), "");

        // DEM: 3000 × 3000 cells of 100 m in UTM 33N covering the stations' middle.
        const int W = 3000, H = 3000;
        var values = new float[W * H];
        for (var r = 0; r < H; r++)
        {
            for (var c = 0; c < W; c++)
            {
                values[(r * W) + c] = (float)(500 + (300 * Math.Sin(c / 37.0) * Math.Cos(r / 53.0)));
            }
        }

        var dem = new RasterGrid(W, H, GeoTransform.NorthUp(250000, 7000000, 100, 100), CrsDefinition.FromEpsg(32633), values, null);
        var toDem = CoordinateTransform.Create(CrsDefinition.Wgs84, dem.Crs);
        var bareS = BenchReport.BestSeconds(3, () =>
        {
            var sink = 0.0;
            foreach (var s in stations)
            {
                sink += s.Longitude + s.Latitude;
            }

            GC.KeepAlive(sink);
        });
        var sampleS = BenchReport.BestSeconds(3, () =>
        {
            var sink = 0.0;
            foreach (var s in stations)
            {
                var (x, y) = toDem.Forward(s.Longitude, s.Latitude);
                var z = Bilinear.Sample(dem, x, y, out _);
                if (!double.IsNaN(z))
                {
                    sink += z;
                }
            }

            GC.KeepAlive(sink);
        });
        report.Figure($"DEM sampling (WGS 84 → UTM + bilinear), {nStations} stations (s)", sampleS, "s");
        report.Figure("baseline: bare loop over the stations (s)", bareS, "s");
        report.Figure("sampling / bare loop (×)", sampleS / bareS, "×");
        var fullS = BenchReport.BestSeconds(1, () => Covariates.Compute(stations, new CovariateOptions { Dem = dem }));
        report.Figure($"all DEM covariates incl. slope and 1/5 km relief, {nStations} stations (s)", fullS, "s");
    }
}

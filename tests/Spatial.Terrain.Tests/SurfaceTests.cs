using Spatial.Core;
using Spatial.Terrain.Surface;
using Spatial.Testing;
using Xunit;

namespace Spatial.Terrain.Tests;

public sealed class SurfaceTests
{
    private const double AngleToleranceDeg = 1e-9;

    private static RasterGrid Grid(int w, int h, double cell, float[] v, CrsDefinition? crs = null, double west = 500000, double north = 6700000) =>
        new(w, h, GeoTransform.NorthUp(west, north, cell, cell), crs ?? CrsDefinition.FromEpsg(32633), v, -9999f);

    [Fact]
    public void Horn_slope_and_aspect_of_a_three_by_three_window_match_the_hand_calculation()
    {
        // Worked by hand (Horn 1981 weights), cell 5 m:
        //   50 45 50     dz/dx = ((50 + 2·30 + 10) − (50 + 2·30 + 8)) / (8·5) = (120 − 118) / 40 = 0.05
        //   30 30 30     dz/dnorth = ((50 + 2·45 + 50) − (8 + 2·10 + 10)) / 40 = (190 − 38) / 40 = 3.8
        //    8 10 10     slope = atan(√(0.05² + 3.8²)) = atan(3.800329) = 75.2577°;
        //   downslope = (−0.05, −3.8) (east, north): aspect = 180° + atan(0.05 / 3.8) = 180.75384°.
        var g = Grid(3, 3, 5, [50, 45, 50, 30, 30, 30, 8, 10, 10]);
        var (slope, aspect) = new TerrainMetrics(g).Horn(1, 1);
        Tolerance.Near(Math.Atan(Math.Sqrt((0.05 * 0.05) + (3.8 * 3.8))) * 180 / Math.PI, slope, AngleToleranceDeg, "slope");
        Tolerance.Near(75.2577, slope, 1e-4, "slope to the 4 decimals worked by hand");
        Tolerance.Near(180.75384, aspect, 1e-5, "aspect worked by hand");
    }

    [Fact]
    public void A_plane_rising_to_the_north_east_faces_south_west()
    {
        // z = x + y (metres): dz/dx = dz/dnorth = 1 → slope atan(√2) = 54.7356°, downslope towards the south-west, 225°.
        var v = new float[25];
        for (var r = 0; r < 5; r++)
        {
            for (var c = 0; c < 5; c++)
            {
                v[(r * 5) + c] = (c * 10) + ((4 - r) * 10);
            }
        }

        var (slope, aspect) = new TerrainMetrics(Grid(5, 5, 10, v)).Horn(2, 2);
        Tolerance.Near(54.735610317245346, slope, AngleToleranceDeg, "slope atan(√2)");
        Tolerance.Near(225, aspect, AngleToleranceDeg, "aspect");
    }

    [Fact]
    public void Flat_ground_has_no_aspect_and_edges_and_no_data_have_no_slope()
    {
        var flat = new TerrainMetrics(Grid(3, 3, 10, [5, 5, 5, 5, 5, 5, 5, 5, 5]));
        var (s, a) = flat.Horn(1, 1);
        Assert.Equal(0, s);
        Assert.True(double.IsNaN(a));
        Assert.True(double.IsNaN(flat.Horn(0, 1).SlopeDeg));
        var holed = new TerrainMetrics(Grid(3, 3, 10, [5, 5, 5, 5, 5, 5, 5, 5, -9999]));
        Assert.True(double.IsNaN(holed.Horn(1, 1).SlopeDeg));
    }

    [Fact]
    public void Cell_sizes_of_a_geographic_DEM_are_ellipsoidal_metres_at_the_row_latitude()
    {
        // GeodSolve -i: 0.001° along the 60° parallel = 55.800001572 m; 59.9995°→60.0005° along a meridian = 111.412287457 m;
        // 0.001° of equator = 111.319490793 m; −0.0005°→0.0005° of meridian = 110.574275822 m.
        var (e60, n60) = TerrainMetrics.MetresPerDegree(60);
        Tolerance.Relative(55800.001572, e60, 1e-7, "m per degree of longitude at 60°");
        Tolerance.Relative(111412.287457, n60, 1e-7, "m per degree of latitude at 60°");
        var (e0, n0) = TerrainMetrics.MetresPerDegree(0);
        Tolerance.Relative(111319.490793, e0, 1e-7, "m per degree of longitude at the equator");
        Tolerance.Relative(110574.275822, n0, 1e-7, "m per degree of latitude at the equator");
        var g = new RasterGrid(3, 3, GeoTransform.NorthUp(10, 60.0015, 0.001, 0.001), CrsDefinition.Wgs84, new float[9], null);
        var (w, h) = new TerrainMetrics(g).CellSize(1);
        Tolerance.Relative(55.800001572, w, 1e-6, "cell width of the middle row (centre at 60°)");
        Tolerance.Relative(111.412287457, h, 1e-6, "cell height");
    }

    [Fact]
    public void Relief_is_max_minus_min_within_the_radius_and_the_fast_grid_version_agrees()
    {
        // Seeded random 80×70 grid of 100 m cells with some holes; relief by direct search vs by sparse tables.
        var rng = new Random(3);
        var v = new float[80 * 70];
        for (var i = 0; i < v.Length; i++)
        {
            v[i] = rng.Next(10) == 0 ? -9999f : (float)(rng.NextDouble() * 1000);
        }

        var m = new TerrainMetrics(Grid(80, 70, 100, v));
        foreach (var radius in new[] { 1000.0, 2550.0 })
        {
            var all = m.ReliefAll(radius);
            for (var row = 0; row < 70; row += 3)
            {
                for (var col = 0; col < 80; col += 7)
                {
                    Tolerance.Near(m.Relief(col, row, radius), all[(row * 80) + col], 1e-3, $"relief at {col},{row} r={radius}");
                }
            }
        }

        // By hand: a 5×5 grid with 1000 m cells, values 0…24; within 1000 m of the centre cell (12) lie 7, 11, 12, 13, 17 → 17 − 7 = 10.
        var small = new TerrainMetrics(Grid(5, 5, 1000, Enumerable.Range(0, 25).Select(i => (float)i).ToArray()));
        Assert.Equal(10, small.Relief(2, 2, 1000));
    }
}

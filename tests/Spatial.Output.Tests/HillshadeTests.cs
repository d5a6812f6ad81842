using Spatial.Core;
using Spatial.Output.Raster;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class HillshadeTests
{
    private static RasterGrid Grid(int w, int h, double cell, Func<int, int, double> z, int epsg = 32629)
    {
        var v = new float[w * h];
        for (var r = 0; r < h; r++)
        {
            for (var c = 0; c < w; c++)
            {
                v[(r * w) + c] = (float)z(c, r);
            }
        }

        return new RasterGrid(w, h, GeoTransform.NorthUp(500_000, 6_000_050, cell, cell), CrsDefinition.FromEpsg(epsg), v, -9999f);
    }

    [Fact]
    public void Flat_ground_is_lit_by_the_sine_of_the_sun_altitude()
    {
        var shade = Hillshade.Compute(Grid(5, 5, 10, (_, _) => 100));

        // Lambert: flat ground under a 45° sun gets sin 45° = 0.70710678.
        Tolerance.Near(Math.Sin(Math.PI / 4), shade[12], 1e-6, "shade of flat ground");
    }

    [Fact]
    public void A_west_facing_45_degree_slope_follows_the_standard_hillshade_formula()
    {
        // z rises 10 m per 10 m cell eastward: slope 45°, aspect 270°. Standard formula (common practice):
        // cos Z cos S + sin Z sin S cos(A − aspect) = 0.5 + 0.5 cos 45° = 0.85355339.
        var shade = Hillshade.Compute(Grid(5, 5, 10, (c, _) => 10.0 * c));
        Tolerance.Near(0.5 + (0.5 * Math.Cos(Math.PI / 4)), shade[12], 1e-6, "shade of a west-facing slope");
    }

    [Fact]
    public void Interior_shading_matches_gdaldem_within_one_grey_level()
    {
        double[,] dem =
        {
            { 100, 104, 109, 115, 118, 120 },
            { 98, 101, 107, 113, 119, 124 },
            { 95, 99, 102, 110, 116, 125 },
            { 91, 94, 100, 104, 112, 121 },
            { 90, 92, 96, 101, 106, 115 },
        };

        // GDAL 3.6.2 gdaldem hillshade -az 315 -alt 45 (Horn), bytes = 1 + 254 × shade (data/SOURCES.md).
        int[,] gdal = { { 178, 181, 190, 213 }, { 165, 169, 169, 181 }, { 170, 171, 164, 161 } };
        var shade = Hillshade.Compute(Grid(6, 5, 10, (c, r) => dem[r, c]));
        for (var r = 1; r <= 3; r++)
        {
            for (var c = 1; c <= 4; c++)
            {
                Tolerance.Near(gdal[r - 1, c - 1], 1 + (254 * shade[(r * 6) + c]), 1.0, $"grey level at ({c}, {r})");
            }
        }
    }

    [Fact]
    public void No_data_cells_and_their_neighbours_have_no_shade()
    {
        var grid = Grid(5, 5, 10, (c, r) => c == 2 && r == 2 ? -9999 : 100);
        var shade = Hillshade.Compute(grid);
        Assert.True(float.IsNaN(shade[12]));
        Assert.True(float.IsNaN(shade[6]));
        Assert.True(float.IsNaN(shade[0]));
    }
}

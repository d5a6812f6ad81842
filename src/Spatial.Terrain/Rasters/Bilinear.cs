using Spatial.Core;

namespace Spatial.Terrain.Rasters;

/// <summary>Outcome of sampling a grid at a point.</summary>
internal enum SampleStatus
{
    /// <summary>A value was interpolated.</summary>
    Ok,

    /// <summary>The point lies outside the grid's extent.</summary>
    Outside,

    /// <summary>A cell needed for the interpolation holds no data.</summary>
    NoData,
}

/// <summary>
/// Bilinear interpolation in a grid's own CRS. Convention: a cell's value belongs to its centre, pixel position
/// (col + ½, row + ½); the value at a point is interpolated between the four surrounding cell centres (weights
/// (1 − fx)(1 − fy), fx(1 − fy), (1 − fx)fy, fx·fy). Within half a cell of the grid's outer edge, where there is no
/// centre beyond, the edge cells are extended outwards (the fraction is clamped to 0 or 1). A point outside the
/// extent, or one in a no-data cell, gives NaN. When some of the other three neighbours hold no data, they are left
/// out and the remaining weights renormalised, as GDAL's bilinear resampling (gdalwarp) does.
/// </summary>
internal static class Bilinear
{
    public static double Sample(RasterGrid grid, double x, double y, out SampleStatus status)
    {
        var (pc, pr) = grid.Transform.ToPixel(x, y);
        if (!(pc >= 0 && pr >= 0 && pc <= grid.Width && pr <= grid.Height))
        {
            status = SampleStatus.Outside;
            return double.NaN;
        }

        var u = pc - 0.5;
        var v = pr - 0.5;
        var c0 = Math.Clamp((int)Math.Floor(u), 0, grid.Width - 1);
        var r0 = Math.Clamp((int)Math.Floor(v), 0, grid.Height - 1);
        var c1 = Math.Min(c0 + 1, grid.Width - 1);
        var r1 = Math.Min(r0 + 1, grid.Height - 1);
        var fx = c1 == c0 ? 0 : Math.Clamp(u - c0, 0, 1);
        var fy = r1 == r0 ? 0 : Math.Clamp(v - r0, 0, 1);
        var values = grid.Values;
        var w = grid.Width;
        var own = values[(Math.Min((int)pr, grid.Height - 1) * w) + Math.Min((int)pc, w - 1)];
        if (grid.IsNoData(own))
        {
            status = SampleStatus.NoData;
            return double.NaN;
        }

        double sum = 0, weights = 0;
        Term(grid, values[(r0 * w) + c0], (1 - fx) * (1 - fy), ref sum, ref weights);
        Term(grid, values[(r0 * w) + c1], fx * (1 - fy), ref sum, ref weights);
        Term(grid, values[(r1 * w) + c0], (1 - fx) * fy, ref sum, ref weights);
        Term(grid, values[(r1 * w) + c1], fx * fy, ref sum, ref weights);
        status = SampleStatus.Ok;
        return weights == 1 ? sum : sum / weights;
    }

    private static void Term(RasterGrid grid, float value, double weight, ref double sum, ref double weights)
    {
        if (weight == 0 || grid.IsNoData(value))
        {
            return;
        }

        sum += weight * value;
        weights += weight;
    }
}

using Spatial.Core;
using Spatial.Terrain.Crs;
using Spatial.Terrain.Geodesy;

namespace Spatial.Terrain.Surface;

/// <summary>
/// Slope, aspect and local relief on a north-up grid. Cell sizes are in metres: a projected grid's units are
/// taken as metres; a geographic grid's cell is converted at the latitude of its row with the WGS 84 radii of
/// curvature (east–west (π/180)·N(φ)·cos φ, north–south (π/180)·M(φ) metres per degree).
/// </summary>
internal sealed class TerrainMetrics
{
    private const double Deg = Math.PI / 180;
    private const double E2 = Geodesic.F * (2 - Geodesic.F);
    private readonly RasterGrid grid;
    private readonly double[] cellWidthM;
    private readonly double[] cellHeightM;

    public TerrainMetrics(RasterGrid grid)
    {
        this.grid = grid;
        var t = grid.Transform;
        if (t.RowRotation != 0 || t.ColumnRotation != 0)
        {
            throw new SpatialDataException("DEM", 0, "the DEM is rotated (its geotransform has rotation terms)", "resample it to a north-up grid (gdalwarp)");
        }

        Geographic = CrsDefinitions.IsGeographic(grid.Crs);
        cellWidthM = new double[grid.Height];
        cellHeightM = new double[grid.Height];
        for (var r = 0; r < grid.Height; r++)
        {
            if (Geographic)
            {
                var lat = t.OriginY + ((r + 0.5) * t.PixelHeight);
                (cellWidthM[r], cellHeightM[r]) = MetresPerDegree(lat);
                cellWidthM[r] *= Math.Abs(t.PixelWidth);
                cellHeightM[r] *= Math.Abs(t.PixelHeight);
            }
            else
            {
                cellWidthM[r] = Math.Abs(t.PixelWidth);
                cellHeightM[r] = Math.Abs(t.PixelHeight);
            }
        }
    }

    public bool Geographic { get; }

    /// <summary>Metres per degree of longitude and of latitude at latitude <paramref name="latDeg"/> on WGS 84.</summary>
    public static (double EastM, double NorthM) MetresPerDegree(double latDeg)
    {
        var (s, c) = Math.SinCos(latDeg * Deg);
        var w = 1 - (E2 * s * s);
        var n = Geodesic.A / Math.Sqrt(w);
        var m = Geodesic.A * (1 - E2) / (w * Math.Sqrt(w));
        return (Deg * n * c, Deg * m);
    }

    /// <summary>Cell width and height in metres in row <paramref name="row"/>.</summary>
    public (double WidthM, double HeightM) CellSize(int row) => (cellWidthM[row], cellHeightM[row]);

    /// <summary>
    /// Horn (1981) slope and aspect of cell (col, row) from its 3×3 neighbourhood
    /// (Horn, B. K. P. (1981) "Hill shading and the reflectance map", Proc. IEEE 69(1), 14–47):
    /// ∂z/∂x = ((c + 2f + i) − (a + 2d + g)) / (8Δx), ∂z/∂y (northwards) = ((a + 2b + c) − (g + 2h + i)) / (8Δy) for
    /// the neighbours a b c / d e f / g h i (top row north). Slope in degrees from horizontal; aspect = direction of
    /// steepest descent in degrees clockwise from north [0, 360), NaN when flat. NaN for edge cells and when a
    /// neighbour holds no data.
    /// </summary>
    public (double SlopeDeg, double AspectDeg) Horn(int col, int row)
    {
        if (col <= 0 || row <= 0 || col >= grid.Width - 1 || row >= grid.Height - 1)
        {
            return (double.NaN, double.NaN);
        }

        var v = grid.Values;
        var w = grid.Width;
        var up = (row - 1) * w;
        var mid = row * w;
        var down = (row + 1) * w;
        float a = v[up + col - 1], b = v[up + col], c = v[up + col + 1];
        float d = v[mid + col - 1], e = v[mid + col], f = v[mid + col + 1];
        float g = v[down + col - 1], h = v[down + col], i = v[down + col + 1];
        if (grid.IsNoData(a) || grid.IsNoData(b) || grid.IsNoData(c) || grid.IsNoData(d) || grid.IsNoData(e)
            || grid.IsNoData(f) || grid.IsNoData(g) || grid.IsNoData(h) || grid.IsNoData(i))
        {
            return (double.NaN, double.NaN);
        }

        var dzdx = ((c + (2.0 * f) + i) - (a + (2.0 * d) + g)) / (8 * cellWidthM[row]);
        var dzdn = ((a + (2.0 * b) + c) - (g + (2.0 * h) + i)) / (8 * cellHeightM[row]);
        return SlopeAspect(dzdx, dzdn);
    }

    /// <summary>Slope (deg) and downslope aspect (deg clockwise from north, NaN when flat) of a gradient (∂z/∂east, ∂z/∂north).</summary>
    public static (double SlopeDeg, double AspectDeg) SlopeAspect(double dzdx, double dzdn)
    {
        var slope = Math.Atan(Math.Sqrt((dzdx * dzdx) + (dzdn * dzdn))) / Deg;
        if (dzdx == 0 && dzdn == 0)
        {
            return (slope, double.NaN);
        }

        var aspect = Math.Atan2(-dzdx, -dzdn) / Deg;
        if (aspect < 0)
        {
            aspect += 360;
        }

        return (slope, aspect >= 360 ? 0 : aspect);
    }

    /// <summary>
    /// Local relief: maximum minus minimum of the cells whose centres lie within <paramref name="radiusM"/> metres of
    /// the centre of cell (col, row); no-data cells are left out; NaN when none has data. Cells beyond the grid
    /// are unknown, so near the edge the relief covers only the part of the disc inside the grid.
    /// </summary>
    public double Relief(int col, int row, double radiusM)
    {
        var v = grid.Values;
        var w = grid.Width;
        var hM = cellHeightM[row];
        var dr = (int)Math.Floor(radiusM / hM);
        var min = double.PositiveInfinity;
        var max = double.NegativeInfinity;
        for (var r = Math.Max(0, row - dr); r <= Math.Min(grid.Height - 1, row + dr); r++)
        {
            var dy = (r - row) * hM;
            var half = Math.Sqrt(Math.Max(0, (radiusM * radiusM) - (dy * dy)));
            var dc = (int)Math.Floor(half / cellWidthM[r]);
            var baseIndex = r * w;
            for (var cc = Math.Max(0, col - dc); cc <= Math.Min(w - 1, col + dc); cc++)
            {
                var z = v[baseIndex + cc];
                if (grid.IsNoData(z))
                {
                    continue;
                }

                if (z < min)
                {
                    min = z;
                }

                if (z > max)
                {
                    max = z;
                }
            }
        }

        return min <= max ? max - min : double.NaN;
    }

    /// <summary>
    /// Local relief of every cell, row-major (NaN where unknown): the same disc as <see cref="Relief"/>, computed with
    /// one sparse table (range maximum/minimum in O(1)) per row, so each cell costs O(radius / cell height).
    /// </summary>
    public float[] ReliefAll(double radiusM)
    {
        var w = grid.Width;
        var h = grid.Height;
        var levels = 1;
        while ((1 << levels) <= w)
        {
            levels++;
        }

        var maxT = new float[h][][];
        var minT = new float[h][][];
        System.Threading.Tasks.Parallel.For(0, h, r =>
        {
            maxT[r] = new float[levels][];
            minT[r] = new float[levels][];
            var mx = new float[w];
            var mn = new float[w];
            for (var c = 0; c < w; c++)
            {
                var z = grid.Values[(r * w) + c];
                var nd = grid.IsNoData(z);
                mx[c] = nd ? float.NegativeInfinity : z;
                mn[c] = nd ? float.PositiveInfinity : z;
            }

            maxT[r][0] = mx;
            minT[r][0] = mn;
            for (var k = 1; k < levels; k++)
            {
                var span = 1 << (k - 1);
                var prevMax = maxT[r][k - 1];
                var prevMin = minT[r][k - 1];
                var len = w - (1 << k) + 1;
                if (len <= 0)
                {
                    maxT[r][k] = [];
                    minT[r][k] = [];
                    continue;
                }

                var nx = new float[len];
                var nn = new float[len];
                for (var c = 0; c < len; c++)
                {
                    nx[c] = Math.Max(prevMax[c], prevMax[c + span]);
                    nn[c] = Math.Min(prevMin[c], prevMin[c + span]);
                }

                maxT[r][k] = nx;
                minT[r][k] = nn;
            }
        });

        var result = new float[w * h];
        System.Threading.Tasks.Parallel.For(0, h, row =>
        {
            var hM = cellHeightM[row];
            var dr = (int)Math.Floor(radiusM / hM);
            var r0 = Math.Max(0, row - dr);
            var r1 = Math.Min(h - 1, row + dr);
            var dcs = new int[r1 - r0 + 1];
            for (var r = r0; r <= r1; r++)
            {
                var dy = (r - row) * hM;
                dcs[r - r0] = (int)Math.Floor(Math.Sqrt(Math.Max(0, (radiusM * radiusM) - (dy * dy))) / cellWidthM[r]);
            }

            for (var col = 0; col < w; col++)
            {
                var mx = float.NegativeInfinity;
                var mn = float.PositiveInfinity;
                for (var r = r0; r <= r1; r++)
                {
                    var dc = dcs[r - r0];
                    var a = Math.Max(0, col - dc);
                    var b = Math.Min(w - 1, col + dc);
                    var k = 31 - System.Numerics.BitOperations.LeadingZeroCount((uint)(b - a + 1));
                    var tx = maxT[r][k];
                    var tn = minT[r][k];
                    var b2 = b - (1 << k) + 1;
                    mx = Math.Max(mx, Math.Max(tx[a], tx[b2]));
                    mn = Math.Min(mn, Math.Min(tn[a], tn[b2]));
                }

                result[(row * w) + col] = mn <= mx ? mx - mn : float.NaN;
            }
        });

        return result;
    }
}

using System.Globalization;
using Spatial.Core;
using Spatial.Terrain.Crs;

namespace Spatial.Terrain.Rasters;

/// <summary>
/// Reads a plain-text grid in the widespread ESRI layout: a header of <c>ncols</c>, <c>nrows</c>,
/// <c>xllcorner</c>|<c>xllcenter</c>, <c>yllcorner</c>|<c>yllcenter</c>, <c>cellsize</c> (or <c>dx</c> and <c>dy</c>),
/// optional <c>nodata_value</c> (keys in any case), then <c>nrows</c> rows of <c>ncols</c> numbers from the top row,
/// separated by white space. The CRS comes from the option when given, else from a <c>.prj</c> file beside the grid.
/// </summary>
internal static class AsciiGridReader
{
    public static RasterGrid Read(string path, CrsDefinition? crsOverride)
    {
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "the grid file does not exist", "check the path");
        }

        using var reader = new StreamReader(path);
        var header = new Dictionary<string, double>(StringComparer.OrdinalIgnoreCase);
        long lineNo = 0;
        string? line;
        string? firstDataLine = null;
        while ((line = reader.ReadLine()) is not null)
        {
            lineNo++;
            var t = line.Trim();
            if (t.Length == 0)
            {
                continue;
            }

            if (!char.IsLetter(t[0]))
            {
                firstDataLine = t;
                break;
            }

            var parts = t.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
            if (parts.Length != 2 || !double.TryParse(parts[1], NumberStyles.Float, CultureInfo.InvariantCulture, out var v))
            {
                throw new SpatialDataException(path, lineNo, $"expected a header line 'KEY NUMBER', found '{Clip(t)}'", "the header holds ncols, nrows, xllcorner/xllcenter, yllcorner/yllcenter, cellsize, nodata_value");
            }

            header[parts[0]] = v;
        }

        var ncols = Need(path, header, "ncols");
        var nrows = Need(path, header, "nrows");
        if (ncols < 1 || nrows < 1 || ncols != Math.Floor(ncols) || nrows != Math.Floor(nrows) || ncols * nrows > int.MaxValue)
        {
            throw new SpatialDataException(path, 0, $"ncols {ncols} and nrows {nrows} must be positive whole numbers", "fix the header");
        }

        double dx, dy;
        if (header.TryGetValue("cellsize", out var cell))
        {
            dx = dy = cell;
        }
        else if (header.TryGetValue("dx", out dx) && header.TryGetValue("dy", out dy))
        {
        }
        else
        {
            throw new SpatialDataException(path, 0, "the header has no cellsize (nor dx and dy)", "add 'cellsize SIZE' to the header");
        }

        if (!(dx > 0) || !(dy > 0))
        {
            throw new SpatialDataException(path, 0, $"the cell size must be positive; found {dx}×{dy}", "fix the header");
        }

        double west, south;
        if (header.TryGetValue("xllcorner", out var xc))
        {
            west = xc;
        }
        else if (header.TryGetValue("xllcenter", out var xm))
        {
            west = xm - (dx / 2);
        }
        else
        {
            throw new SpatialDataException(path, 0, "the header has neither xllcorner nor xllcenter", "add the lower-left x");
        }

        if (header.TryGetValue("yllcorner", out var yc))
        {
            south = yc;
        }
        else if (header.TryGetValue("yllcenter", out var ym))
        {
            south = ym - (dy / 2);
        }
        else
        {
            throw new SpatialDataException(path, 0, "the header has neither yllcorner nor yllcenter", "add the lower-left y");
        }

        float? noData = header.TryGetValue("nodata_value", out var nd) ? (float)nd : null;
        var w = (int)ncols;
        var h = (int)nrows;
        var values = new float[w * h];
        var k = 0;
        var current = firstDataLine;
        while (current is not null)
        {
            foreach (var token in current.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries))
            {
                if (k >= values.Length)
                {
                    throw new SpatialDataException(path, lineNo, $"more than ncols × nrows = {values.Length} values", "check ncols and nrows in the header");
                }

                if (!float.TryParse(token, NumberStyles.Float, CultureInfo.InvariantCulture, out var v))
                {
                    throw new SpatialDataException(path, lineNo, $"expected a number, found '{Clip(token)}'", "the grid must hold only numbers after the header (decimal point '.')");
                }

                values[k++] = v;
            }

            current = reader.ReadLine();
            lineNo++;
        }

        if (k != values.Length)
        {
            throw new SpatialDataException(path, lineNo - 1, $"expected ncols × nrows = {values.Length} values, found {k}", "the file may be truncated, or ncols/nrows are wrong");
        }

        var crs = crsOverride ?? PrjBeside(path);
        return new RasterGrid(w, h, GeoTransform.NorthUp(west, south + (h * dy), dx, dy), crs, values, noData);
    }

    private static CrsDefinition PrjBeside(string path)
    {
        var prj = Path.ChangeExtension(path, ".prj");
        if (!File.Exists(prj))
        {
            throw new SpatialDataException(path, 0, "the grid's coordinate system is unknown: there is no .prj file beside it", "add NAME.prj (WKT) beside the grid or give the DEM CRS option (e.g. EPSG:32633)");
        }

        return CrsDefinitions.FromWkt(File.ReadAllText(prj), prj);
    }

    private static double Need(string path, Dictionary<string, double> header, string key) =>
        header.TryGetValue(key, out var v) ? v : throw new SpatialDataException(path, 0, $"the header has no '{key}'", $"add '{key} N' to the header");

    private static string Clip(string s) => s.Length <= 40 ? s : s[..40] + "…";
}

using Spatial.Core;

namespace Spatial.Terrain.Rasters;

/// <summary>Reads a digital elevation model: a GeoTIFF (<c>.tif</c>, <c>.tiff</c>) or a plain ASCII grid (<c>.asc</c>, <c>.txt</c>).</summary>
public static class DemFile
{
    /// <summary>
    /// Reads the first band of <paramref name="path"/> as elevations (metres). <paramref name="crs"/>, when given,
    /// overrides the file's own CRS (GeoKeys, or the <c>.prj</c> beside an ASCII grid). Throws
    /// <see cref="SpatialDataException"/> naming the file and what is wrong.
    /// </summary>
    public static RasterGrid Read(string path, CrsDefinition? crs = null)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        var ext = Path.GetExtension(path).ToLowerInvariant();
        return ext switch
        {
            ".tif" or ".tiff" => GeoTiffReader.Read(path, crs),
            ".asc" or ".txt" => AsciiGridReader.Read(path, crs),
            _ => SniffTiff(path) ? GeoTiffReader.Read(path, crs) : AsciiGridReader.Read(path, crs),
        };
    }

    private static bool SniffTiff(string path)
    {
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "the DEM file does not exist", "check the path");
        }

        Span<byte> head = stackalloc byte[4];
        using var s = File.OpenRead(path);
        var n = s.Read(head);
        return n == 4 && ((head[0] == 'I' && head[1] == 'I') || (head[0] == 'M' && head[1] == 'M'));
    }
}

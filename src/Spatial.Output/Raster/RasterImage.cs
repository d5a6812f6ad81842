using System.Runtime.InteropServices;
using SkiaSharp;
using Spatial.Core;
using Spatial.Output.Internal;

namespace Spatial.Output.Raster;

/// <summary>Bounds of an image in WGS 84 degrees (west, south, east, north).</summary>
public readonly record struct GeoBounds(double West, double South, double East, double North);

/// <summary>An RGBA image (row-major from the top, 4 bytes per pixel, not premultiplied).</summary>
internal sealed record RgbaImage(int Width, int Height, byte[] Pixels)
{
    /// <summary>PNG bytes (SkiaSharp's encoder; deterministic for the same pixels).</summary>
    public byte[] ToPng() => png ??= Encode();

    private byte[]? png;

    private byte[] Encode()
    {
        using var bitmap = new SKBitmap(new SKImageInfo(Width, Height, SKColorType.Rgba8888, SKAlphaType.Unpremul));
        Marshal.Copy(Pixels, 0, bitmap.GetPixels(), Pixels.Length);
        using var data = bitmap.Encode(SKEncodedImageFormat.Png, 100);
        return data.ToArray();
    }
}

/// <summary>Resampling of grid values onto images (nearest cell), for the map page and the static maps.</summary>
internal static class RasterImage
{
    /// <summary>The lon/lat bounding box of a grid's outline.</summary>
    public static GeoBounds Bounds(RasterGrid grid, string what)
    {
        var ring = Layers.LayerBuilder.GridOutline(grid, 32, what);
        return new GeoBounds(ring.Min(c => c.X), ring.Min(c => c.Y), ring.Max(c => c.X), ring.Max(c => c.Y));
    }

    /// <summary>
    /// An equirectangular image (rows equally spaced in latitude, columns in longitude) over <paramref name="bounds"/>,
    /// each pixel coloured by <paramref name="colour"/> from the nearest cell value of <paramref name="values"/>
    /// (NaN → transparent). Size follows the grid's, at most <paramref name="maxSide"/> pixels a side.
    /// </summary>
    public static RgbaImage Equirectangular(RasterGrid grid, float[] values, GeoBounds bounds, Func<float, (byte R, byte G, byte B, byte A)> colour, string what, int maxSide = 2048)
    {
        var t = CrsTransform.For(grid.Crs, what);
        var aspect = (bounds.East - bounds.West) * Math.Cos((bounds.North + bounds.South) * Math.PI / 360) / Math.Max(1e-12, bounds.North - bounds.South);
        var height = Math.Clamp(grid.Height, 1, maxSide);
        var width = Math.Clamp((int)Math.Round(height * aspect), 1, maxSide);
        var dLon = (bounds.East - bounds.West) / width;
        var dLat = (bounds.North - bounds.South) / height;
        return Render(grid, values, width, height, (i, j) => t.FromLonLat(bounds.West + ((i + 0.5) * dLon), bounds.North - ((j + 0.5) * dLat)), colour);
    }

    /// <summary>An image whose pixel (i, j) centre maps to grid-CRS coordinates by <paramref name="pixelToGrid"/>.</summary>
    public static RgbaImage Render(RasterGrid grid, float[] values, int width, int height, Func<int, int, (double X, double Y)> pixelToGrid, Func<float, (byte R, byte G, byte B, byte A)> colour)
    {
        var pixels = new byte[width * height * 4];
        for (var j = 0; j < height; j++)
        {
            for (var i = 0; i < width; i++)
            {
                var (x, y) = pixelToGrid(i, j);
                var (c, r) = grid.Transform.ToPixel(x, y);
                var col = (int)Math.Floor(c);
                var row = (int)Math.Floor(r);
                var v = float.NaN;
                if (col >= 0 && row >= 0 && col < grid.Width && row < grid.Height)
                {
                    v = values[(row * grid.Width) + col];
                    if (grid.IsNoData(v))
                    {
                        v = float.NaN;
                    }
                }

                if (float.IsNaN(v))
                {
                    continue;
                }

                var (rr, gg, bb, aa) = colour(v);
                var k = ((j * width) + i) * 4;
                pixels[k] = rr;
                pixels[k + 1] = gg;
                pixels[k + 2] = bb;
                pixels[k + 3] = aa;
            }
        }

        return new RgbaImage(width, height, pixels);
    }

    /// <summary>Grey shading: shade 0…1 → grey, opaque.</summary>
    public static (byte, byte, byte, byte) Grey(float shade)
    {
        var g = (byte)Math.Round(Math.Clamp(shade, 0, 1) * 255);
        return (g, g, g, 255);
    }
}

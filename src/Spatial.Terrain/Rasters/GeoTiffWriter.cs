using System.Globalization;
using BitMiracle.LibTiff.Classic;
using Spatial.Core;
using Spatial.Core.IO;

namespace Spatial.Terrain.Rasters;

/// <summary>
/// Writes a <see cref="RasterGrid"/> as a single-band float32 GeoTIFF (GeoTIFF 1.0, OGC 19-008r4 keys) that GDAL
/// and other GIS clients read: CRS by EPSG code in the GeoKey directory (projected or geographic), the pixel-to-map
/// transform as ModelPixelScale + ModelTiepoint (north-up grids) or ModelTransformation (rotated grids), the raster
/// type PixelIsArea (the transform's origin is the outer corner of the top-left cell, as in <see cref="GeoTransform"/>),
/// and the no-data value in the GDAL_NODATA tag (42113). Deflate-compressed strips of about 64 KiB.
/// </summary>
/// <remarks>
/// The file is written atomically through <see cref="AtomicFile"/>. No date or software tag is written, so the
/// same grid always gives the same bytes. NaN cells are written as NaN; when <see cref="RasterGrid.NoData"/> is
/// null no GDAL_NODATA tag is written. A CRS given only as WKT is refused (no EPSG code to put in the keys).
/// </remarks>
public static class GeoTiffWriter
{
    // GeoKey ids and codes: OGC GeoTIFF standard 1.1 (OGC 19-008r4), tables of GeoKeys and their values.
    private const ushort GTModelTypeGeoKey = 1024;
    private const ushort GTRasterTypeGeoKey = 1025;
    private const ushort GeographicTypeGeoKey = 2048;
    private const ushort GeogAngularUnitsGeoKey = 2054;
    private const ushort ProjectedCSTypeGeoKey = 3072;
    private const ushort ProjLinearUnitsGeoKey = 3076;
    private const ushort ModelTypeProjected = 1;
    private const ushort ModelTypeGeographic = 2;
    private const ushort RasterPixelIsArea = 1;
    private const ushort AngularDegree = 9102;
    private const ushort LinearMetre = 9001;

    /// <summary>GDAL's private TIFF tag holding the no-data value as ASCII text.</summary>
    internal const TiffTag GdalNoDataTag = (TiffTag)42113;

    private const int TargetStripBytes = 1 << 16;

    private static readonly object ExtenderLock = new();
    private static bool extenderInstalled;
    private static Tiff.TiffExtendProc? parentExtender;

    /// <summary>
    /// Writes <paramref name="grid"/> to <paramref name="path"/> as a float32 GeoTIFF, atomically.
    /// </summary>
    /// <param name="path">Destination file; its folder is created when needed. An existing file is replaced whole.</param>
    /// <param name="grid">The raster; its CRS must carry an EPSG code of a geographic 2D CRS (4000–4999) or a projected CRS with metre units.</param>
    /// <exception cref="ArgumentException">The grid's CRS has no EPSG code.</exception>
    public static void Write(string path, RasterGrid grid)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(grid);
        var keys = GeoKeysFor(grid.Crs);
        InstallTagExtender();
        AtomicFile.Write(path, stream => WriteTo(stream, Path.GetFileName(path), grid, keys));
    }

    /// <summary>True when an EPSG code names a geographic 2D CRS in this writer's rule (4000–4999, e.g. 4326).</summary>
    internal static bool IsGeographic(int epsg) => epsg is >= 4000 and <= 4999;

    /// <summary>The GeoKey directory (SHORT values, header first, keys sorted by id) for <paramref name="crs"/>.</summary>
    internal static ushort[] GeoKeysFor(CrsDefinition crs)
    {
        if (crs.EpsgCode is not { } code)
        {
            throw new ArgumentException("the GeoTIFF writer needs a CRS with an EPSG code; this grid's CRS is given only as WKT.", nameof(crs));
        }

        if (code is <= 0 or > ushort.MaxValue)
        {
            throw new ArgumentException($"EPSG code {code} cannot be stored in a GeoTIFF key (1…65535).", nameof(crs));
        }

        var entries = IsGeographic(code)
            ? new (ushort Id, ushort Value)[]
            {
                (GTModelTypeGeoKey, ModelTypeGeographic),
                (GTRasterTypeGeoKey, RasterPixelIsArea),
                (GeographicTypeGeoKey, (ushort)code),
                (GeogAngularUnitsGeoKey, AngularDegree),
            }
            : new (ushort Id, ushort Value)[]
            {
                (GTModelTypeGeoKey, ModelTypeProjected),
                (GTRasterTypeGeoKey, RasterPixelIsArea),
                (ProjectedCSTypeGeoKey, (ushort)code),
                (ProjLinearUnitsGeoKey, LinearMetre),
            };

        // Header: KeyDirectoryVersion 1, KeyRevision 1, MinorRevision 0, NumberOfKeys.
        var dir = new List<ushort> { 1, 1, 0, (ushort)entries.Length };
        foreach (var (id, value) in entries)
        {
            // TIFFTagLocation 0: the value is the SHORT itself; count 1.
            dir.AddRange([id, 0, 1, value]);
        }

        return [.. dir];
    }

    /// <summary>The GDAL_NODATA text for a no-data value: shortest round-trip invariant form, "nan" for NaN.</summary>
    internal static string NoDataText(float value) =>
        float.IsNaN(value) ? "nan" : value.ToString("R", CultureInfo.InvariantCulture);

    private static void WriteTo(Stream stream, string name, RasterGrid grid, ushort[] keys)
    {
        using var tiff = Tiff.ClientOpen(name, "w", stream, new KeepOpenTiffStream())
            ?? throw new IOException($"{name}: the TIFF library could not start writing.");
        var width = grid.Width;
        var height = grid.Height;
        var rowsPerStrip = Math.Clamp(TargetStripBytes / (width * sizeof(float)), 1, height);

        tiff.SetField(TiffTag.IMAGEWIDTH, width);
        tiff.SetField(TiffTag.IMAGELENGTH, height);
        tiff.SetField(TiffTag.BITSPERSAMPLE, 32);
        tiff.SetField(TiffTag.SAMPLESPERPIXEL, 1);
        tiff.SetField(TiffTag.SAMPLEFORMAT, SampleFormat.IEEEFP);
        tiff.SetField(TiffTag.PHOTOMETRIC, Photometric.MINISBLACK);
        tiff.SetField(TiffTag.PLANARCONFIG, PlanarConfig.CONTIG);
        tiff.SetField(TiffTag.COMPRESSION, Compression.ADOBE_DEFLATE);
        tiff.SetField(TiffTag.ROWSPERSTRIP, rowsPerStrip);

        var t = grid.Transform;
        if (t.RowRotation == 0 && t.ColumnRotation == 0)
        {
            // ModelPixelScale (ScaleX, ScaleY, ScaleZ) with ScaleY positive for north-up; tiepoint raster (0,0,0) → model (X,Y,0).
            double[] scale = [t.PixelWidth, -t.PixelHeight, 0];
            double[] tie = [0, 0, 0, t.OriginX, t.OriginY, 0];
            tiff.SetField(TiffTag.GEOTIFF_MODELPIXELSCALETAG, scale.Length, scale);
            tiff.SetField(TiffTag.GEOTIFF_MODELTIEPOINTTAG, tie.Length, tie);
        }
        else
        {
            // ModelTransformation: 4×4 row-major matrix mapping (col, row, 0, 1) to (X, Y, Z, 1).
            double[] m =
            [
                t.PixelWidth, t.RowRotation, 0, t.OriginX,
                t.ColumnRotation, t.PixelHeight, 0, t.OriginY,
                0, 0, 0, 0,
                0, 0, 0, 1,
            ];
            tiff.SetField(TiffTag.GEOTIFF_MODELTRANSFORMATIONTAG, m.Length, m);
        }

        tiff.SetField(TiffTag.GEOTIFF_GEOKEYDIRECTORYTAG, keys.Length, keys);
        if (grid.NoData is { } nd)
        {
            tiff.SetField(GdalNoDataTag, NoDataText(nd));
        }

        var values = grid.Values;
        var rowBytes = width * sizeof(float);
        var buffer = new byte[rowsPerStrip * rowBytes];
        var strip = 0;
        for (var row0 = 0; row0 < height; row0 += rowsPerStrip, strip++)
        {
            var rows = Math.Min(rowsPerStrip, height - row0);
            var count = rows * rowBytes;
            var src = values.Slice(row0 * width, rows * width);
            for (var i = 0; i < src.Length; i++)
            {
                // TIFF byte order of this file is the library's native little-endian.
                BitConverter.TryWriteBytes(buffer.AsSpan(i * sizeof(float), sizeof(float)), src[i]);
            }

            if (tiff.WriteEncodedStrip(strip, buffer, count) < 0)
            {
                throw new IOException($"{name}: the TIFF library failed to write strip {strip}.");
            }
        }

        if (!tiff.WriteDirectory())
        {
            throw new IOException($"{name}: the TIFF library failed to write the image directory.");
        }
    }

    /// <summary>Registers the GeoTIFF and GDAL tags with the TIFF library once per process, chaining any earlier extender.</summary>
    private static void InstallTagExtender()
    {
        lock (ExtenderLock)
        {
            if (extenderInstalled)
            {
                return;
            }

            parentExtender = Tiff.SetTagExtender(ExtendTags);
            extenderInstalled = true;
        }
    }

    private static void ExtendTags(Tiff tiff)
    {
        // readCount/writeCount -1 = variable length, passCount = the count is passed with the value.
        TiffFieldInfo[] info =
        [
            new(TiffTag.GEOTIFF_MODELPIXELSCALETAG, -1, -1, TiffType.DOUBLE, FieldBit.Custom, true, true, "ModelPixelScaleTag"),
            new(TiffTag.GEOTIFF_MODELTIEPOINTTAG, -1, -1, TiffType.DOUBLE, FieldBit.Custom, true, true, "ModelTiepointTag"),
            new(TiffTag.GEOTIFF_MODELTRANSFORMATIONTAG, -1, -1, TiffType.DOUBLE, FieldBit.Custom, true, true, "ModelTransformationTag"),
            new(TiffTag.GEOTIFF_GEOKEYDIRECTORYTAG, -1, -1, TiffType.SHORT, FieldBit.Custom, true, true, "GeoKeyDirectoryTag"),
            new(TiffTag.GEOTIFF_GEODOUBLEPARAMSTAG, -1, -1, TiffType.DOUBLE, FieldBit.Custom, true, true, "GeoDoubleParamsTag"),
            new(TiffTag.GEOTIFF_GEOASCIIPARAMSTAG, -1, -1, TiffType.ASCII, FieldBit.Custom, true, false, "GeoAsciiParamsTag"),
            new(GdalNoDataTag, -1, -1, TiffType.ASCII, FieldBit.Custom, true, false, "GDAL_NODATA"),
        ];
        tiff.MergeFieldInfo(info, info.Length);
        parentExtender?.Invoke(tiff);
    }

    /// <summary>A stream adapter that leaves the caller's stream open when the TIFF is closed (the caller flushes and renames it).</summary>
    private sealed class KeepOpenTiffStream : TiffStream
    {
        public override void Close(object clientData)
        {
            if (clientData is Stream s)
            {
                s.Flush();
            }
        }
    }
}

using System.Globalization;
using BitMiracle.LibTiff.Classic;
using Spatial.Core;
using Spatial.Terrain.Crs;

namespace Spatial.Terrain.Rasters;

/// <summary>
/// Reads the first band of a GeoTIFF (our own reader on LibTiff.NET): float32/float64, int16/int32, uint8/uint16/uint32
/// samples, striped or tiled, any compression LibTiff.NET decodes. Georeferencing from ModelTransformationTag, or
/// ModelPixelScaleTag + ModelTiepointTag; a raster of type PixelIsPoint (GTRasterTypeGeoKey = 2) has its origin moved
/// by half a cell up and left, as GDAL does, so that the transform is always corner-based. The CRS comes from
/// ProjectedCSTypeGeoKey or GeographicTypeGeoKey (EPSG codes) unless one is given. No data from the GDAL_NODATA tag
/// (42113). Every problem becomes a <see cref="SpatialDataException"/> naming the file.
/// </summary>
internal static class GeoTiffReader
{
    private const int GtModelTypeKey = 1024;
    private const int GtRasterTypeKey = 1025;
    private const int GeographicTypeKey = 2048;
    private const int ProjectedCsTypeKey = 3072;

    public static RasterGrid Read(string path, CrsDefinition? crsOverride)
    {
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "the DEM file does not exist", "check the path");
        }

        var errors = new ErrorCollector();
        Tiff.SetErrorHandler(errors);
        Tiff? tiff;
        try
        {
            tiff = Tiff.Open(path, "r");
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or ArgumentException)
        {
            throw new SpatialDataException(path, 0, $"the DEM cannot be opened: {e.Message}", "give a readable GeoTIFF file");
        }

        if (tiff is null)
        {
            throw new SpatialDataException(path, 0, $"not a TIFF file{errors.Text}", "give a GeoTIFF (.tif) or an ASCII grid (.asc)");
        }

        using (tiff)
        {
            try
            {
                return ReadOpen(tiff, path, crsOverride, errors);
            }
            catch (SpatialDataException)
            {
                throw;
            }
            catch (Exception e) when (e is not OutOfMemoryException)
            {
                throw new SpatialDataException(path, 0, $"the GeoTIFF cannot be decoded ({e.GetType().Name}: {e.Message}){errors.Text}", "re-save it with gdal_translate (e.g. -co COMPRESS=DEFLATE)");
            }
        }
    }

    private static RasterGrid ReadOpen(Tiff tiff, string path, CrsDefinition? crsOverride, ErrorCollector errors)
    {
        var width = Int(tiff, TiffTag.IMAGEWIDTH) ?? throw Bad(path, "it has no image width");
        var height = Int(tiff, TiffTag.IMAGELENGTH) ?? throw Bad(path, "it has no image length");
        var bits = Int(tiff, TiffTag.BITSPERSAMPLE) ?? 1;
        var format = Int(tiff, TiffTag.SAMPLEFORMAT) ?? 1;
        var samples = Int(tiff, TiffTag.SAMPLESPERPIXEL) ?? 1;
        var planar = Int(tiff, TiffTag.PLANARCONFIG) ?? 1;
        if (width <= 0 || height <= 0)
        {
            throw Bad(path, $"its size is {width}×{height}");
        }

        var kind = (format, bits) switch
        {
            (3, 32) => SampleKind.Float32,
            (3, 64) => SampleKind.Float64,
            (2, 16) => SampleKind.Int16,
            (2, 32) => SampleKind.Int32,
            (1, 8) => SampleKind.UInt8,
            (1, 16) => SampleKind.UInt16,
            (1, 32) => SampleKind.UInt32,
            _ => throw new SpatialDataException(path, 0, $"sample format {format} with {bits} bits is not supported", "convert the DEM to float32, int16 or uint16 (gdal_translate -ot Float32)"),
        };
        var bytesPerSample = bits / 8;
        var pixelStride = planar == 1 ? samples : 1;
        var values = new float[checked(width * height)];

        if (tiff.IsTiled())
        {
            var tw = Int(tiff, TiffTag.TILEWIDTH) ?? throw Bad(path, "it is tiled but has no tile width");
            var th = Int(tiff, TiffTag.TILELENGTH) ?? throw Bad(path, "it is tiled but has no tile length");
            var buffer = new byte[tiff.TileSize()];
            for (var ty = 0; ty < height; ty += th)
            {
                for (var tx = 0; tx < width; tx += tw)
                {
                    var n = tiff.ReadTile(buffer, 0, tx, ty, 0, 0);
                    if (n < 0)
                    {
                        throw Bad(path, $"tile at column {tx}, row {ty} cannot be read{errors.Text}");
                    }

                    var rows = Math.Min(th, height - ty);
                    var cols = Math.Min(tw, width - tx);
                    for (var r = 0; r < rows; r++)
                    {
                        for (var c = 0; c < cols; c++)
                        {
                            values[((ty + r) * width) + tx + c] = Sample(buffer, (((r * tw) + c) * pixelStride) * bytesPerSample, kind);
                        }
                    }
                }
            }
        }
        else
        {
            var rowsPerStrip = Math.Min(Int(tiff, TiffTag.ROWSPERSTRIP) ?? height, height);
            var buffer = new byte[tiff.StripSize()];
            var strips = (height + rowsPerStrip - 1) / rowsPerStrip;
            for (var s = 0; s < strips; s++)
            {
                var n = tiff.ReadEncodedStrip(s, buffer, 0, -1);
                if (n < 0)
                {
                    throw Bad(path, $"strip {s} cannot be read{errors.Text}");
                }

                var row0 = s * rowsPerStrip;
                var rows = Math.Min(rowsPerStrip, height - row0);
                for (var r = 0; r < rows; r++)
                {
                    for (var c = 0; c < width; c++)
                    {
                        values[((row0 + r) * width) + c] = Sample(buffer, (((r * width) + c) * pixelStride) * bytesPerSample, kind);
                    }
                }
            }
        }

        var keys = GeoKeys(tiff);
        var transform = Georeference(tiff, path, keys);
        var crs = crsOverride ?? CrsFromKeys(path, keys);
        float? noData = null;
        var ndField = tiff.GetField(TiffTag.GDAL_NODATA);
        if (ndField is { Length: > 0 })
        {
            var text = AsciiField(ndField).Trim('\0', ' ');
            if (text.Length > 0)
            {
                if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var nd))
                {
                    if (text.Equals("nan", StringComparison.OrdinalIgnoreCase))
                    {
                        nd = double.NaN;
                    }
                    else
                    {
                        throw Bad(path, $"its no-data tag (GDAL_NODATA) holds '{text}', not a number");
                    }
                }

                noData = (float)nd;
            }
        }

        return new RasterGrid(width, height, transform, crs, values, noData);
    }

    private enum SampleKind
    {
        Float32,
        Float64,
        Int16,
        Int32,
        UInt8,
        UInt16,
        UInt32,
    }

    private static float Sample(byte[] b, int offset, SampleKind kind) => kind switch
    {
        SampleKind.Float32 => BitConverter.ToSingle(b, offset),
        SampleKind.Float64 => (float)BitConverter.ToDouble(b, offset),
        SampleKind.Int16 => BitConverter.ToInt16(b, offset),
        SampleKind.Int32 => BitConverter.ToInt32(b, offset),
        SampleKind.UInt8 => b[offset],
        SampleKind.UInt16 => BitConverter.ToUInt16(b, offset),
        _ => BitConverter.ToUInt32(b, offset),
    };

    private static GeoTransform Georeference(Tiff tiff, string path, Dictionary<int, int> keys)
    {
        GeoTransform gt;
        var matrix = Doubles(tiff, TiffTag.GEOTIFF_MODELTRANSFORMATIONTAG);
        if (matrix is { Length: >= 16 })
        {
            gt = new GeoTransform(matrix[3], matrix[0], matrix[1], matrix[7], matrix[4], matrix[5]);
        }
        else
        {
            var scale = Doubles(tiff, TiffTag.GEOTIFF_MODELPIXELSCALETAG);
            var tie = Doubles(tiff, TiffTag.GEOTIFF_MODELTIEPOINTTAG);
            if (scale is not { Length: >= 2 } || tie is not { Length: >= 6 })
            {
                throw new SpatialDataException(path, 0, "the TIFF has no georeferencing (no ModelPixelScale/ModelTiepoint or ModelTransformation tag)", "give a GeoTIFF, e.g. gdal_translate -a_srs … -a_ullr …");
            }

            if (tie.Length > 6)
            {
                throw new SpatialDataException(path, 0, $"the GeoTIFF has {tie.Length / 6} tie points (a warped grid)", "resample it to a regular grid first (gdalwarp)");
            }

            gt = new GeoTransform(tie[3] - (tie[0] * scale[0]), scale[0], 0, tie[4] + (tie[1] * scale[1]), 0, -scale[1]);
        }

        if (keys.TryGetValue(GtRasterTypeKey, out var rasterType) && rasterType == 2)
        {
            // PixelIsPoint: the tie point is the centre of the cell; move to the corner (as GDAL does).
            gt = gt with
            {
                OriginX = gt.OriginX - (0.5 * gt.PixelWidth) - (0.5 * gt.RowRotation),
                OriginY = gt.OriginY - (0.5 * gt.ColumnRotation) - (0.5 * gt.PixelHeight),
            };
        }

        if (gt.PixelWidth == 0 || gt.PixelHeight == 0 || double.IsNaN(gt.PixelWidth) || double.IsNaN(gt.PixelHeight))
        {
            throw Bad(path, "its pixel size is zero or not a number");
        }

        return gt;
    }

    private static CrsDefinition CrsFromKeys(string path, Dictionary<int, int> keys)
    {
        keys.TryGetValue(GtModelTypeKey, out var model);
        if ((model == 1 || model == 0) && keys.TryGetValue(ProjectedCsTypeKey, out var pcs) && pcs is > 0 and < 32767)
        {
            return BuiltIn(path, pcs);
        }

        if ((model == 2 || model == 0) && keys.TryGetValue(GeographicTypeKey, out var gcs) && gcs is > 0 and < 32767)
        {
            return BuiltIn(path, gcs);
        }

        throw new SpatialDataException(path, 0, "the GeoTIFF's coordinate system is not given by an EPSG code (ProjectedCSTypeGeoKey / GeographicTypeGeoKey)", "give the DEM's CRS as WKT (a .prj file or string) with the DEM CRS option");
    }

    private static CrsDefinition BuiltIn(string path, int code)
    {
        if (!CrsDefinitions.IsBuiltIn(code))
        {
            throw new SpatialDataException(path, 0, $"the GeoTIFF is in EPSG:{code}, which is not built in (built in: 4326 and the WGS 84 UTM zones)", "give the DEM's CRS as WKT (a .prj file or string) with the DEM CRS option, or reproject the DEM (gdalwarp -t_srs EPSG:326zz)");
        }

        return CrsDefinition.FromEpsg(code);
    }

    private static Dictionary<int, int> GeoKeys(Tiff tiff)
    {
        var keys = new Dictionary<int, int>();
        var field = tiff.GetField(TiffTag.GEOTIFF_GEOKEYDIRECTORYTAG);
        if (field is null)
        {
            return keys;
        }

        short[]? dir = null;
        foreach (var f in field)
        {
            if (f.Value is short[] or ushort[] or byte[])
            {
                dir = f.ToShortArray();
                break;
            }
        }

        if (dir is null || dir.Length < 4)
        {
            return keys;
        }

        var count = (ushort)dir[3];
        for (var i = 0; i < count && (4 * (i + 2)) <= dir.Length; i++)
        {
            var id = (ushort)dir[4 * (i + 1)];
            var location = (ushort)dir[(4 * (i + 1)) + 1];
            var value = (ushort)dir[(4 * (i + 1)) + 3];
            if (location == 0)
            {
                keys[id] = value;
            }
        }

        return keys;
    }

    private static double[]? Doubles(Tiff tiff, TiffTag tag)
    {
        var field = tiff.GetField(tag);
        if (field is null)
        {
            return null;
        }

        foreach (var f in field)
        {
            if (f.Value is double[] or byte[])
            {
                return f.ToDoubleArray();
            }
        }

        return null;
    }

    private static string AsciiField(FieldValue[] field)
    {
        foreach (var f in field)
        {
            if (f.Value is string s)
            {
                return s;
            }

            if (f.Value is byte[] b)
            {
                return System.Text.Encoding.ASCII.GetString(b);
            }
        }

        return field[^1].ToString() ?? string.Empty;
    }

    private static int? Int(Tiff tiff, TiffTag tag)
    {
        var f = tiff.GetField(tag);
        return f is { Length: > 0 } ? f[0].ToInt() : null;
    }

    private static SpatialDataException Bad(string path, string what) =>
        new(path, 0, $"the GeoTIFF cannot be used: {what}", "check the file with gdalinfo; re-save it with gdal_translate");

    private sealed class ErrorCollector : TiffErrorHandler
    {
        private readonly List<string> messages = [];

        public string Text => messages.Count == 0 ? string.Empty : $" ({string.Join("; ", messages.Take(3))})";

        public override void ErrorHandler(Tiff tif, string method, string format, params object[] args) =>
            messages.Add(args.Length > 0 ? string.Format(CultureInfo.InvariantCulture, format, args) : format);

        public override void ErrorHandlerExt(Tiff tif, object clientData, string method, string format, params object[] args) =>
            ErrorHandler(tif, method, format, args);

        public override void WarningHandler(Tiff tif, string method, string format, params object[] args)
        {
            // Unknown private tags and the like: not our concern.
        }

        public override void WarningHandlerExt(Tiff tif, object clientData, string method, string format, params object[] args)
        {
        }
    }
}

namespace Spatial.Core;

/// <summary>
/// An affine geotransform as GDAL defines it: X = <see cref="OriginX"/> + col·<see cref="PixelWidth"/> + row·<see cref="RowRotation"/>,
/// Y = <see cref="OriginY"/> + col·<see cref="ColumnRotation"/> + row·<see cref="PixelHeight"/>, where (col, row) = (0, 0) is
/// the outer corner of the top-left cell. <see cref="PixelHeight"/> is negative for north-up grids.
/// </summary>
public readonly record struct GeoTransform(double OriginX, double PixelWidth, double RowRotation, double OriginY, double ColumnRotation, double PixelHeight)
{
    /// <summary>A north-up transform with square or rectangular cells.</summary>
    public static GeoTransform NorthUp(double westX, double northY, double cellWidth, double cellHeight) =>
        new(westX, cellWidth, 0, northY, 0, -cellHeight);

    /// <summary>Map coordinates of the fractional pixel position (col, row); (0.5, 0.5) is the centre of the top-left cell.</summary>
    public (double X, double Y) ToMap(double col, double row) =>
        (OriginX + (col * PixelWidth) + (row * RowRotation), OriginY + (col * ColumnRotation) + (row * PixelHeight));

    /// <summary>Fractional pixel position of map point (x, y) — the inverse of <see cref="ToMap"/>.</summary>
    public (double Col, double Row) ToPixel(double x, double y)
    {
        var det = (PixelWidth * PixelHeight) - (RowRotation * ColumnRotation);
        var dx = x - OriginX;
        var dy = y - OriginY;
        return (((dx * PixelHeight) - (dy * RowRotation)) / det, ((dy * PixelWidth) - (dx * ColumnRotation)) / det);
    }
}

/// <summary>
/// A coordinate reference system named by an EPSG code, or given as OGC WKT (one of the two).
/// </summary>
public sealed record CrsDefinition(int? EpsgCode, string? Wkt)
{
    /// <summary>WGS 84 geographic longitude/latitude (EPSG:4326).</summary>
    public static CrsDefinition Wgs84 { get; } = new(4326, null);

    /// <summary>A CRS by EPSG code.</summary>
    public static CrsDefinition FromEpsg(int code) => new(code, null);

    /// <inheritdoc />
    public override string ToString() => EpsgCode is { } c ? $"EPSG:{c}" : "WKT";
}

/// <summary>
/// A single-band raster: <see cref="Width"/> × <see cref="Height"/> float32 values, row-major from the
/// top row, in the grid's <see cref="Crs"/>. Cells equal to <see cref="NoData"/> (or NaN) have no value.
/// </summary>
/// <remarks>Takes ownership of the value array without copying; neither side may change it afterwards.</remarks>
public sealed class RasterGrid
{
    private readonly float[] values;

    /// <summary>Wraps <paramref name="values"/> (length width × height).</summary>
    public RasterGrid(int width, int height, GeoTransform transform, CrsDefinition crs, float[] values, float? noData)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(width);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(height);
        ArgumentNullException.ThrowIfNull(crs);
        ArgumentNullException.ThrowIfNull(values);
        if ((long)width * height != values.LongLength)
        {
            throw new ArgumentException($"a {width}×{height} grid needs {(long)width * height} values; got {values.LongLength}.", nameof(values));
        }

        Width = width;
        Height = height;
        Transform = transform;
        Crs = crs;
        this.values = values;
        NoData = noData;
    }

    /// <summary>Columns.</summary>
    public int Width { get; }

    /// <summary>Rows.</summary>
    public int Height { get; }

    /// <summary>Pixel-to-map transform (corner-based, as GDAL).</summary>
    public GeoTransform Transform { get; }

    /// <summary>The grid's coordinate reference system.</summary>
    public CrsDefinition Crs { get; }

    /// <summary>The no-data value, if any; NaN cells are always treated as no data.</summary>
    public float? NoData { get; }

    /// <summary>All values, row-major from the top row.</summary>
    public ReadOnlySpan<float> Values => values;

    /// <summary>Value of cell (col, row), or NaN when it holds no data. Throws when out of range.</summary>
    public float this[int col, int row]
    {
        get
        {
            ArgumentOutOfRangeException.ThrowIfNegative(col);
            ArgumentOutOfRangeException.ThrowIfNegative(row);
            ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(col, Width);
            ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(row, Height);
            var v = values[(row * Width) + col];
            return IsNoData(v) ? float.NaN : v;
        }
    }

    /// <summary>True when <paramref name="value"/> is NaN or equals <see cref="NoData"/>.</summary>
    public bool IsNoData(float value) => float.IsNaN(value) || (NoData is { } nd && value.Equals(nd));
}

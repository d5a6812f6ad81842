using ProjNet.CoordinateSystems;
using ProjNet.CoordinateSystems.Transformations;
using Spatial.Core;

namespace Spatial.Terrain.Crs;

/// <summary>
/// A conversion between two coordinate reference systems. Geographic coordinates are (longitude, latitude)
/// in degrees; projected ones (easting, northing) in the CRS's unit (metres for UTM). Built on ProjNET 2.0.
/// </summary>
/// <remarks>
/// Built in by EPSG code: 4326 (WGS 84) and every WGS 84 UTM zone, 32601–32660 (north) and 32701–32760 (south);
/// WGS 84 ↔ UTM uses our own Krüger-series transverse Mercator (sub-millimetre), everything else ProjNET.
/// Any other CRS must be given as OGC WKT (see <see cref="CrsDefinitions"/>). Datum shifts are those ProjNET
/// applies from the WKT's TOWGS84 parameters; none for WGS 84 / ETRS89 / GRS80-based systems.
/// NaN in gives NaN out.
/// </remarks>
public sealed class CoordinateTransform
{
    private readonly MathTransform? forward;
    private readonly MathTransform? inverse;
    private readonly TransverseMercator? utm;
    private readonly bool utmIsTarget;

    private CoordinateTransform(MathTransform? forward, MathTransform? inverse, TransverseMercator? utm, bool utmIsTarget, CrsDefinition source, CrsDefinition target)
    {
        this.forward = forward;
        this.inverse = inverse;
        this.utm = utm;
        this.utmIsTarget = utmIsTarget;
        Source = source;
        Target = target;
    }

    /// <summary>The CRS of the input coordinates.</summary>
    public CrsDefinition Source { get; }

    /// <summary>The CRS of the output coordinates.</summary>
    public CrsDefinition Target { get; }

    /// <summary>True when source and target are the same CRS (the conversion is the identity).</summary>
    public bool IsIdentity { get; private init; }

    /// <summary>Creates the conversion from <paramref name="source"/> to <paramref name="target"/>; throws <see cref="ArgumentException"/> for an unknown EPSG code or unreadable WKT.</summary>
    public static CoordinateTransform Create(CrsDefinition source, CrsDefinition target)
    {
        ArgumentNullException.ThrowIfNull(source);
        ArgumentNullException.ThrowIfNull(target);
        var identity = source == target || (source.EpsgCode is { } a && a == target.EpsgCode);
        if (!identity && source.EpsgCode == 4326 && Utm(target) is { } tu)
        {
            return new CoordinateTransform(null, null, tu, true, source, target);
        }

        if (!identity && target.EpsgCode == 4326 && Utm(source) is { } su)
        {
            return new CoordinateTransform(null, null, su, false, source, target);
        }

        var s = CrsDefinitions.Build(source);
        var t = CrsDefinitions.Build(target);
        var factory = new CoordinateTransformationFactory();
        var fwd = factory.CreateFromCoordinateSystems(s, t).MathTransform;
        var inv = factory.CreateFromCoordinateSystems(t, s).MathTransform;
        return new CoordinateTransform(fwd, inv, null, false, source, target) { IsIdentity = identity };
    }

    /// <summary>Converts (x, y) from <see cref="Source"/> to <see cref="Target"/>.</summary>
    public (double X, double Y) Forward(double x, double y)
    {
        if (IsIdentity)
        {
            return (x, y);
        }

        if (double.IsNaN(x) || double.IsNaN(y))
        {
            return (double.NaN, double.NaN);
        }

        if (utm is not null)
        {
            return utmIsTarget ? utm.Forward(x, y) : utm.Inverse(x, y);
        }

        return forward!.Transform(x, y);
    }

    /// <summary>Converts (x, y) from <see cref="Target"/> back to <see cref="Source"/>.</summary>
    public (double X, double Y) Inverse(double x, double y)
    {
        if (IsIdentity)
        {
            return (x, y);
        }

        if (double.IsNaN(x) || double.IsNaN(y))
        {
            return (double.NaN, double.NaN);
        }

        if (utm is not null)
        {
            return utmIsTarget ? utm.Inverse(x, y) : utm.Forward(x, y);
        }

        return inverse!.Transform(x, y);
    }

    private static TransverseMercator? Utm(CrsDefinition crs) => crs.EpsgCode switch
    {
        >= 32601 and <= 32660 and var c => TransverseMercator.Utm(c - 32600, true),
        >= 32701 and <= 32760 and var c => TransverseMercator.Utm(c - 32700, false),
        _ => null,
    };
}

/// <summary>Creating <see cref="CrsDefinition"/>s from user input: <c>EPSG:n</c>, a WKT string, or a WKT file (<c>.prj</c>).</summary>
public static class CrsDefinitions
{
    /// <summary>
    /// Parses <paramref name="text"/>: <c>EPSG:n</c> (or a bare number) for a built-in code, a WKT string, or the
    /// path of a file holding WKT. Throws <see cref="SpatialDataException"/> naming <paramref name="origin"/> when it cannot be used.
    /// </summary>
    public static CrsDefinition Parse(string text, string origin)
    {
        ArgumentNullException.ThrowIfNull(text);
        var t = text.Trim();
        var code = t.StartsWith("EPSG:", StringComparison.OrdinalIgnoreCase) ? t[5..] : t;
        if (int.TryParse(code, System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out var epsg))
        {
            if (!IsBuiltIn(epsg))
            {
                throw new SpatialDataException(origin, 0, $"EPSG:{epsg} is not built in (built in: 4326 and the WGS 84 UTM zones 32601–32660, 32701–32760)", "give the CRS as WKT (a string or a .prj file) instead");
            }

            return CrsDefinition.FromEpsg(epsg);
        }

        var wkt = t;
        if (!LooksLikeWkt(t))
        {
            if (!File.Exists(t))
            {
                throw new SpatialDataException(origin, 0, $"'{t}' is neither EPSG:n, WKT nor an existing file", "give EPSG:4326, EPSG:326zz/327zz, a WKT string or a .prj file");
            }

            wkt = File.ReadAllText(t).Trim();
            origin = t;
        }

        return FromWkt(wkt, origin);
    }

    /// <summary>Reads a WKT definition, checking that ProjNET can use it; throws <see cref="SpatialDataException"/> naming <paramref name="origin"/> otherwise.</summary>
    public static CrsDefinition FromWkt(string wkt, string origin)
    {
        ArgumentNullException.ThrowIfNull(wkt);
        var trimmed = wkt.Trim();
        try
        {
            var cs = new CoordinateSystemFactory().CreateFromWkt(trimmed);
            var epsg = cs.AuthorityCode > 0 && string.Equals(cs.Authority, "EPSG", StringComparison.OrdinalIgnoreCase) && IsBuiltIn((int)cs.AuthorityCode)
                ? (int?)cs.AuthorityCode
                : null;
            return epsg is { } e ? CrsDefinition.FromEpsg(e) : new CrsDefinition(null, trimmed);
        }
        catch (Exception e) when (e is ArgumentException or FormatException or NotSupportedException or NotImplementedException or InvalidOperationException or IndexOutOfRangeException)
        {
            throw new SpatialDataException(origin, 0, $"the coordinate system definition (WKT) cannot be read: {e.Message}", "give OGC WKT 1 (as in a .prj file) or a built-in EPSG code");
        }
    }

    /// <summary>True for 4326 and the WGS 84 UTM zones.</summary>
    public static bool IsBuiltIn(int epsg) => epsg == 4326 || (epsg is >= 32601 and <= 32660) || (epsg is >= 32701 and <= 32760);

    /// <summary>True when the CRS is geographic (longitude/latitude in degrees).</summary>
    public static bool IsGeographic(CrsDefinition crs)
    {
        ArgumentNullException.ThrowIfNull(crs);
        return Build(crs) is GeographicCoordinateSystem;
    }

    internal static CoordinateSystem Build(CrsDefinition crs)
    {
        if (crs.EpsgCode is { } code)
        {
            if (code == 4326)
            {
                return GeographicCoordinateSystem.WGS84;
            }

            if (code is >= 32601 and <= 32660)
            {
                return ProjectedCoordinateSystem.WGS84_UTM(code - 32600, true);
            }

            if (code is >= 32701 and <= 32760)
            {
                return ProjectedCoordinateSystem.WGS84_UTM(code - 32700, false);
            }

            if (crs.Wkt is null)
            {
                throw new ArgumentException($"EPSG:{code} is not built in; give the CRS as WKT.", nameof(crs));
            }
        }

        if (crs.Wkt is null)
        {
            throw new ArgumentException("a CRS needs an EPSG code or WKT.", nameof(crs));
        }

        return new CoordinateSystemFactory().CreateFromWkt(crs.Wkt);
    }

    private static bool LooksLikeWkt(string t) =>
        t.StartsWith("PROJCS[", StringComparison.OrdinalIgnoreCase) || t.StartsWith("GEOGCS[", StringComparison.OrdinalIgnoreCase)
        || t.StartsWith("PROJCRS[", StringComparison.OrdinalIgnoreCase) || t.StartsWith("GEOGCRS[", StringComparison.OrdinalIgnoreCase)
        || t.StartsWith("COMPD_CS[", StringComparison.OrdinalIgnoreCase);
}

using System.Globalization;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Records.Csv;

namespace Spatial.Records;

/// <summary>A station list as read: the stations in file order and the warnings met on the way.</summary>
/// <param name="Stations">Stations in the order of the file; ids are unique.</param>
/// <param name="Warnings">Located warnings (nothing was dropped for them).</param>
public sealed record StationList(IReadOnlyList<Station> Stations, IReadOnlyList<Diagnostic> Warnings);

/// <summary>
/// Reads and writes station lists (CSV). Input columns, matched by name without regard to case:
/// <c>station</c> (or <c>id</c>), <c>name</c> (optional), <c>longitude</c> (or <c>lon</c>),
/// <c>latitude</c> (or <c>lat</c>), optional <c>elevation_m</c> (or <c>elevation</c>), optional <c>crs</c>.
/// Comma, semicolon or tab delimited (detected); a semicolon or tab file may use decimal commas; UTF-8 with or
/// without a byte-order mark; plain or gzip.
/// </summary>
/// <remarks>
/// Coordinates must be WGS 84 longitude/latitude in degrees (EPSG:4326). A <c>crs</c> column naming any other
/// system is refused with a located message: the records stage does not transform coordinates (convert the
/// list first, e.g. with PROJ's <c>cs2cs</c>).
/// </remarks>
public static class StationListFile
{
    /// <summary>Lowest and highest listed elevation accepted, metres (below the Dead Sea shore, above Everest: common practice).</summary>
    internal const double MinElevationM = -500;

    /// <summary>Highest listed elevation accepted, metres.</summary>
    internal const double MaxElevationM = 9000;

    private const string Expected = "station,name,longitude,latitude[,elevation_m][,crs]";

    /// <summary>
    /// Reads the station list at <paramref name="path"/>. Throws <see cref="SpatialDataException"/> (file and
    /// line) for an unreadable file, a missing column, a short row, a bad or out-of-range number, a duplicate id,
    /// or a CRS other than WGS 84.
    /// </summary>
    public static StationList Read(string path) => Read(path, null);

    /// <summary>
    /// Reads the station list at <paramref name="path"/>; a row whose <c>crs</c> column names an EPSG code other than
    /// 4326 has its coordinates (x in the longitude column, y in the latitude column) converted to WGS 84 by
    /// <paramref name="toWgs84"/> (EPSG code, x, y → longitude, latitude; it throws <see cref="ArgumentException"/> for a
    /// code it does not know). Without a converter such a row is refused, as by <see cref="Read(string)"/>.
    /// </summary>
    public static StationList Read(string path, Func<int, double, double, (double Longitude, double Latitude)>? toWgs84)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        using var csv = CsvRecordReader.Open(path);
        return Read(csv, toWgs84);
    }

    internal static StationList Read(CsvRecordReader csv, Func<int, double, double, (double Longitude, double Latitude)>? toWgs84 = null)
    {
        if (!csv.Read())
        {
            throw new SpatialDataException(csv.FileName, 1, "the station list is empty", $"expected a header row {Expected} and one row per station");
        }

        var header = new string[csv.FieldCount];
        for (var i = 0; i < header.Length; i++)
        {
            header[i] = csv.FieldString(i).ToLowerInvariant();
        }

        var headerLine = csv.Line;
        var idCol = Find(csv, header, true, "station", "id", "station_id");
        var nameCol = Find(csv, header, false, "name", "station_name");
        var lonCol = Find(csv, header, true, "longitude", "lon");
        var latCol = Find(csv, header, true, "latitude", "lat");
        var elevCol = Find(csv, header, false, "elevation_m", "elevation");
        var crsCol = Find(csv, header, false, "crs");
        var decimalComma = csv.Delimiter != (byte)',';

        var stations = new List<Station>();
        var warnings = new List<Diagnostic>();
        var seen = new Dictionary<string, long>(StringComparer.Ordinal);
        while (csv.Read())
        {
            if (csv.FieldCount != header.Length)
            {
                throw csv.Error($"the row has {csv.FieldCount} fields; the header (line {headerLine}) has {header.Length}", "give every row the same columns as the header; quote a name that holds the delimiter");
            }

            var id = csv.FieldString(idCol);
            if (!StationId.IsValid(id, out var why))
            {
                throw csv.Error($"station id '{CsvText.Show(csv.Field(idCol))}' is not valid: {why}", "give each station an id of 1-64 printable characters", idCol);
            }

            if (seen.TryGetValue(id, out var firstLine))
            {
                throw csv.Error($"station '{id}' is listed twice (first on line {firstLine})", "list each station once", idCol);
            }

            seen[id] = csv.Line;
            var name = nameCol >= 0 ? csv.FieldString(nameCol) : string.Empty;
            var epsg = crsCol >= 0 ? CheckCrs(csv, crsCol, toWgs84 is not null) : 4326;
            double lon, lat;
            if (epsg == 4326)
            {
                lon = Coordinate(csv, lonCol, "longitude", 180, decimalComma);
                lat = Coordinate(csv, latCol, "latitude", 90, decimalComma);
            }
            else
            {
                (lon, lat) = Projected(csv, lonCol, latCol, epsg, decimalComma, toWgs84!);
            }
            double? elevation = null;
            if (elevCol >= 0 && !CsvText.Trim(csv.Field(elevCol)).IsEmpty)
            {
                if (!CsvText.TryParseDouble(csv.Field(elevCol), decimalComma, out var e))
                {
                    throw csv.Error($"elevation_m '{CsvText.Show(csv.Field(elevCol))}' is not a number", "give the elevation in metres, or leave it empty when unknown", elevCol);
                }

                if (e is < MinElevationM or > MaxElevationM)
                {
                    throw csv.Error(FormattableString.Invariant($"elevation_m {e} is outside {MinElevationM}…{MaxElevationM} m"), "give the elevation in metres above sea level (not feet), or leave it empty", elevCol);
                }

                elevation = e;
            }

            if (lon == 0 && lat == 0)
            {
                warnings.Add(Diagnostic.Warning(csv.FileName, csv.Line, $"station '{id}' is at longitude 0, latitude 0", "check that its coordinates are not a placeholder"));
            }

            stations.Add(new Station(new StationId(id), name, lon, lat, elevation));
        }

        if (stations.Count == 0)
        {
            throw new SpatialDataException(csv.FileName, headerLine + 1, "the station list has a header but no stations", "add one row per station below the header");
        }

        return new StationList(stations, warnings);
    }

    /// <summary>
    /// Writes <paramref name="stations"/> to <paramref name="path"/> atomically as CSV
    /// (<c>station,name,longitude,latitude,elevation_m</c>; WGS 84 degrees; empty elevation when unknown; "\n" line ends).
    /// </summary>
    public static void Write(string path, IReadOnlyList<Station> stations)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(stations);
        AtomicFile.WriteText(path, w =>
        {
            w.Write("station,name,longitude,latitude,elevation_m\n");
            foreach (var s in stations)
            {
                w.Write(CsvText.Field(s.Id.Value));
                w.Write(',');
                w.Write(CsvText.Field(s.Name));
                w.Write(',');
                w.Write(CsvText.Number(s.Longitude));
                w.Write(',');
                w.Write(CsvText.Number(s.Latitude));
                w.Write(',');
                if (s.ElevationListedM is { } e)
                {
                    w.Write(CsvText.Number(e));
                }

                w.Write('\n');
            }
        });
    }

    private static int Find(CsvRecordReader csv, string[] header, bool required, params string[] names)
    {
        var found = -1;
        for (var i = 0; i < header.Length; i++)
        {
            if (Array.IndexOf(names, header[i]) >= 0)
            {
                if (found >= 0)
                {
                    throw csv.Error($"columns {found + 1} and {i + 1} both give '{names[0]}'", "keep one of them");
                }

                found = i;
            }
        }

        if (found < 0 && required)
        {
            throw csv.Error($"the header has no '{names[0]}' column (found: {string.Join(", ", header)})", $"name the columns {Expected}");
        }

        return found;
    }

    private static double Coordinate(CsvRecordReader csv, int col, string what, double limit, bool decimalComma)
    {
        var field = csv.Field(col);
        if (!CsvText.TryParseDouble(field, decimalComma, out var v))
        {
            throw csv.Error($"{what} '{CsvText.Show(field)}' is not a number", $"give the {what} in decimal degrees (WGS 84)", col);
        }

        if (v < -limit || v > limit)
        {
            throw csv.Error(FormattableString.Invariant($"{what} {v} is outside -{limit}…{limit} degrees"), $"give the {what} in decimal degrees (WGS 84); check that longitude and latitude are not swapped or projected", col);
        }

        return v;
    }

    /// <summary>The row's EPSG code (4326 for an empty field or WGS 84); refuses any other code unless it can be converted.</summary>
    private static int CheckCrs(CsvRecordReader csv, int col, bool canConvert)
    {
        var text = csv.FieldString(col);
        var t = text.Replace(" ", string.Empty, StringComparison.Ordinal).ToUpperInvariant();
        if (t.Length == 0 || t is "EPSG:4326" or "4326" or "WGS84" or "EPSG4326")
        {
            return 4326;
        }

        var digits = t.StartsWith("EPSG:", StringComparison.Ordinal) ? t[5..] : t;
        if (canConvert && int.TryParse(digits, NumberStyles.None, CultureInfo.InvariantCulture, out var code) && code > 0)
        {
            return code;
        }

        throw csv.Error(
            string.Create(CultureInfo.InvariantCulture, $"crs '{text}' is not supported: expected EPSG:4326 (WGS 84 longitude/latitude){(canConvert ? " or another EPSG code such as EPSG:32633" : string.Empty)}"),
            "name the CRS as EPSG:CODE, or convert the coordinates to EPSG:4326 first (e.g. with PROJ's cs2cs)",
            col);
    }

    private static (double Longitude, double Latitude) Projected(CsvRecordReader csv, int xCol, int yCol, int epsg, bool decimalComma, Func<int, double, double, (double Longitude, double Latitude)> toWgs84)
    {
        if (!CsvText.TryParseDouble(csv.Field(xCol), decimalComma, out var x) || !double.IsFinite(x))
        {
            throw csv.Error($"x '{CsvText.Show(csv.Field(xCol))}' (longitude column, EPSG:{epsg}) is not a number", "give the coordinate in the units of the named CRS", xCol);
        }

        if (!CsvText.TryParseDouble(csv.Field(yCol), decimalComma, out var y) || !double.IsFinite(y))
        {
            throw csv.Error($"y '{CsvText.Show(csv.Field(yCol))}' (latitude column, EPSG:{epsg}) is not a number", "give the coordinate in the units of the named CRS", yCol);
        }

        (double Longitude, double Latitude) p;
        try
        {
            p = toWgs84(epsg, x, y);
        }
        catch (ArgumentException e)
        {
            throw csv.Error($"EPSG:{epsg} cannot be converted to WGS 84 ({e.Message})", "use EPSG:4326 or a UTM zone (EPSG:326xx/327xx), or convert the coordinates first");
        }

        if (!double.IsFinite(p.Longitude) || !double.IsFinite(p.Latitude) || Math.Abs(p.Latitude) > 90 || Math.Abs(p.Longitude) > 180)
        {
            throw csv.Error(FormattableString.Invariant($"({x}, {y}) in EPSG:{epsg} is not a place on Earth"), "check the coordinates and the crs column", xCol);
        }

        return p;
    }
}

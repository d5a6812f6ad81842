using System.Globalization;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Terrain.Coast;
using Spatial.Terrain.Crs;
using Spatial.Terrain.Rasters;
using Spatial.Terrain.Surface;

namespace Spatial.Terrain;

/// <summary>What <see cref="Covariates.Compute"/> uses.</summary>
public sealed record CovariateOptions
{
    /// <summary>The elevation model (metres), in any supported CRS; null = no DEM columns.</summary>
    public RasterGrid? Dem { get; init; }

    /// <summary>Name of the DEM used in warnings (usually its path).</summary>
    public string DemName { get; init; } = "DEM";

    /// <summary>The coast; null = no coast columns. <see cref="CoastGeometry.World"/> is the built-in one.</summary>
    public CoastGeometry? Coast { get; init; }

    /// <summary>|listed − DEM| above this many metres sets <c>elevation_flag</c> (default 100 m, common practice).</summary>
    public double ElevationThresholdM { get; init; } = 100;
}

/// <summary>
/// The covariates of one station; NaN (or null) where unknown.
/// </summary>
/// <param name="Station">Station id.</param>
/// <param name="Longitude">Longitude, degrees (WGS 84).</param>
/// <param name="Latitude">Latitude, degrees (WGS 84).</param>
/// <param name="ElevationListedM">Elevation from the station list, metres; null when not listed.</param>
/// <param name="ElevationDemM">DEM elevation by bilinear interpolation at the station, metres.</param>
/// <param name="ElevationDiffM">Listed minus DEM elevation, metres.</param>
/// <param name="ElevationFlag">True when |listed − DEM| exceeds the threshold; null when either is unknown.</param>
/// <param name="SlopeDeg">Horn (1981) slope of the DEM cell holding the station, degrees.</param>
/// <param name="AspectDeg">Downslope direction, degrees clockwise from north [0, 360); NaN on flat ground.</param>
/// <param name="Northness">cos(aspect); NaN when the aspect is unknown.</param>
/// <param name="Eastness">sin(aspect); NaN when the aspect is unknown.</param>
/// <param name="Relief1KmM">Max − min of DEM cells within 1 km of the station's cell, metres.</param>
/// <param name="Relief5KmM">Max − min of DEM cells within 5 km, metres.</param>
/// <param name="CoastKm">Geodesic distance to the nearest coast point, km; positive on land, negative at sea (when the coast has land polygons).</param>
/// <param name="CoastAzimuthDeg">Azimuth from the station to that coast point, degrees clockwise from north [0, 360).</param>
public sealed record CovariateRow(
    StationId Station,
    double Longitude,
    double Latitude,
    double? ElevationListedM,
    double ElevationDemM,
    double ElevationDiffM,
    bool? ElevationFlag,
    double SlopeDeg,
    double AspectDeg,
    double Northness,
    double Eastness,
    double Relief1KmM,
    double Relief5KmM,
    double CoastKm,
    double CoastAzimuthDeg);

/// <summary>The covariate table: one row per station in input order, and the warnings met on the way.</summary>
public sealed class CovariateTable
{
    /// <summary>The column names, in order (the file contract of <c>covariates.csv</c>).</summary>
    public static readonly IReadOnlyList<string> Columns =
    [
        "station", "longitude", "latitude", "elevation_listed_m", "elevation_dem_m", "elevation_diff_m", "elevation_flag",
        "slope_deg", "aspect_deg", "northness", "eastness", "relief_1km_m", "relief_5km_m", "coast_km", "coast_azimuth_deg",
    ];

    internal CovariateTable(IReadOnlyList<CovariateRow> rows, IReadOnlyList<Diagnostic> warnings)
    {
        Rows = rows;
        Warnings = warnings;
    }

    /// <summary>Rows in the order of the stations given.</summary>
    public IReadOnlyList<CovariateRow> Rows { get; }

    /// <summary>Stations outside the DEM, on no-data cells, and the like.</summary>
    public IReadOnlyList<Diagnostic> Warnings { get; }

    /// <summary>
    /// Writes the table as CSV (comma, "\n", header, invariant culture, doubles round-trip short, empty where unknown,
    /// <c>elevation_flag</c> 1 or 0), atomically.
    /// </summary>
    public void Write(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        AtomicFile.WriteText(path, w =>
        {
            w.Write(string.Join(',', Columns));
            w.Write('\n');
            foreach (var r in Rows)
            {
                w.Write(Quote(r.Station.Value));
                foreach (var v in new[] { r.Longitude, r.Latitude, r.ElevationListedM ?? double.NaN, r.ElevationDemM, r.ElevationDiffM })
                {
                    w.Write(',');
                    w.Write(Num(v));
                }

                w.Write(',');
                w.Write(r.ElevationFlag switch { true => "1", false => "0", null => string.Empty });
                foreach (var v in new[] { r.SlopeDeg, r.AspectDeg, r.Northness, r.Eastness, r.Relief1KmM, r.Relief5KmM, r.CoastKm, r.CoastAzimuthDeg })
                {
                    w.Write(',');
                    w.Write(Num(v));
                }

                w.Write('\n');
            }
        });
    }

    private static string Num(double v) => double.IsFinite(v) ? v.ToString("R", CultureInfo.InvariantCulture) : string.Empty;

    private static string Quote(string s) =>
        s.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : s;
}

/// <summary>Terrain covariates of every land cell of a DEM (row-major from the top row; NaN at sea and where unknown).</summary>
/// <param name="Width">Columns.</param>
/// <param name="Height">Rows.</param>
/// <param name="Transform">The DEM's geotransform.</param>
/// <param name="Crs">The DEM's CRS.</param>
/// <param name="Land">True for a cell with data that is on land (inside the coast's land polygons, when it has any).</param>
/// <param name="Longitude">Cell-centre longitude, degrees WGS 84.</param>
/// <param name="Latitude">Cell-centre latitude, degrees WGS 84.</param>
/// <param name="ElevationM">The cell's elevation, metres.</param>
/// <param name="SlopeDeg">Horn slope, degrees.</param>
/// <param name="AspectDeg">Downslope aspect, degrees from north; NaN when flat.</param>
/// <param name="Northness">cos(aspect).</param>
/// <param name="Eastness">sin(aspect).</param>
/// <param name="Relief1KmM">Relief within 1 km, metres.</param>
/// <param name="Relief5KmM">Relief within 5 km, metres.</param>
/// <param name="CoastKm">Signed coast distance of the cell centre, km (NaN without a coast).</param>
public sealed record GridCovariates(
    int Width,
    int Height,
    GeoTransform Transform,
    CrsDefinition Crs,
    bool[] Land,
    double[] Longitude,
    double[] Latitude,
    float[] ElevationM,
    float[] SlopeDeg,
    float[] AspectDeg,
    float[] Northness,
    float[] Eastness,
    float[] Relief1KmM,
    float[] Relief5KmM,
    float[] CoastKm);

/// <summary>The terrain stage: DEM elevation, slope, aspect, relief and coast distance per station or per DEM cell.</summary>
public static class Covariates
{
    private const double Deg = Math.PI / 180;

    /// <summary>
    /// Computes the covariates of <paramref name="stations"/> (in their order). A station outside the DEM or on a
    /// no-data cell gets empty DEM columns and a warning; it never fails the run. Deterministic whatever the thread count.
    /// </summary>
    /// <remarks>
    /// Elevation: bilinear interpolation between cell centres in the DEM's own CRS (the station is converted from WGS 84);
    /// slope and aspect: Horn (1981) on the 3×3 window of the cell holding the station; relief: max − min of the cells
    /// whose centres lie within 1 km / 5 km of that cell's centre; coast: nearest point on the WGS 84 ellipsoid
    /// (see <see cref="CoastGeometry"/>).
    /// </remarks>
    public static CovariateTable Compute(IReadOnlyList<Station> stations, CovariateOptions options)
    {
        ArgumentNullException.ThrowIfNull(stations);
        ArgumentNullException.ThrowIfNull(options);
        var n = stations.Count;
        var rows = new CovariateRow[n];
        var warnings = new List<Diagnostic>?[n];
        var dem = options.Dem;
        TerrainMetrics? metrics = dem is null ? null : new TerrainMetrics(dem);
        var x = new double[n];
        var y = new double[n];
        if (dem is not null)
        {
            var toDem = CoordinateTransform.Create(CrsDefinition.Wgs84, dem.Crs);
            for (var i = 0; i < n; i++)
            {
                (x[i], y[i]) = toDem.Forward(stations[i].Longitude, stations[i].Latitude);
            }
        }

        Parallel.For(0, n, i =>
        {
            var s = stations[i];
            double z = double.NaN, slope = double.NaN, aspect = double.NaN, r1 = double.NaN, r5 = double.NaN;
            if (dem is not null && metrics is not null)
            {
                z = Bilinear.Sample(dem, x[i], y[i], out var status);
                if (status == SampleStatus.Ok)
                {
                    var (pc, pr) = dem.Transform.ToPixel(x[i], y[i]);
                    var col = Math.Min((int)pc, dem.Width - 1);
                    var row = Math.Min((int)pr, dem.Height - 1);
                    (slope, aspect) = metrics.Horn(col, row);
                    r1 = metrics.Relief(col, row, 1000);
                    r5 = metrics.Relief(col, row, 5000);
                }
                else
                {
                    var what = status == SampleStatus.Outside ? "lies outside the DEM" : "lies on a no-data cell of the DEM";
                    (warnings[i] ??= []).Add(Diagnostic.Warning(options.DemName, 0,
                        $"station {s.Id} ({s.Longitude.ToString("R", CultureInfo.InvariantCulture)}, {s.Latitude.ToString("R", CultureInfo.InvariantCulture)}) {what}; its DEM elevation, slope, aspect and relief are left empty",
                        "use a DEM that covers every station"));
                }
            }

            double coastKm = double.NaN, coastAz = double.NaN;
            if (options.Coast is { } coast)
            {
                var hit = CoastDistance.Nearest(coast, s.Latitude, s.Longitude);
                coastKm = hit.DistanceM / 1000;
                coastAz = hit.AzimuthDeg;
            }

            var diff = s.ElevationListedM is { } listed ? listed - z : double.NaN;
            bool? flag = double.IsNaN(diff) ? null : Math.Abs(diff) > options.ElevationThresholdM;
            var (sa, ca) = double.IsNaN(aspect) ? (double.NaN, double.NaN) : Math.SinCos(aspect * Deg);
            rows[i] = new CovariateRow(s.Id, s.Longitude, s.Latitude, s.ElevationListedM, z, diff, flag, slope, aspect, ca, sa, r1, r5, coastKm, coastAz);
        });

        var all = new List<Diagnostic>();
        foreach (var w in warnings)
        {
            if (w is not null)
            {
                all.AddRange(w);
            }
        }

        return new CovariateTable(rows, all);
    }

    /// <summary>
    /// The same covariates for every cell of <paramref name="dem"/> (cell centres), for a predicted surface: land cells
    /// (data, and inside the coast's land polygons when it has any) get values; other cells NaN. Relief uses one
    /// sparse table per row (O(radius/cell) per cell); slope, aspect and coast distance run in parallel; deterministic.
    /// </summary>
    public static GridCovariates ForGrid(RasterGrid dem, CoastGeometry? coast)
    {
        ArgumentNullException.ThrowIfNull(dem);
        var w = dem.Width;
        var h = dem.Height;
        var n = w * h;
        var metrics = new TerrainMetrics(dem);
        var lon = new double[n];
        var lat = new double[n];
        var toWgs = CoordinateTransform.Create(dem.Crs, CrsDefinition.Wgs84);
        for (var r = 0; r < h; r++)
        {
            for (var c = 0; c < w; c++)
            {
                var (mx, my) = dem.Transform.ToMap(c + 0.5, r + 0.5);
                (lon[(r * w) + c], lat[(r * w) + c]) = toWgs.Forward(mx, my);
            }
        }

        var elevation = new float[n];
        var slope = new float[n];
        var aspect = new float[n];
        var north = new float[n];
        var east = new float[n];
        var coastKm = new float[n];
        var land = new bool[n];
        var r1 = metrics.ReliefAll(1000);
        var r5 = metrics.ReliefAll(5000);
        Parallel.For(0, h, r =>
        {
            for (var c = 0; c < w; c++)
            {
                var i = (r * w) + c;
                var z = dem.Values[i];
                var hasData = !dem.IsNoData(z);
                var d = double.NaN;
                if (hasData && coast is not null)
                {
                    d = CoastDistance.Nearest(coast, lat[i], lon[i]).DistanceM / 1000;
                }

                land[i] = hasData && (coast is null || !coast.HasLand || d >= 0);
                if (!land[i])
                {
                    elevation[i] = slope[i] = aspect[i] = north[i] = east[i] = coastKm[i] = r1[i] = r5[i] = float.NaN;
                    continue;
                }

                var (s, a) = metrics.Horn(c, r);
                elevation[i] = z;
                slope[i] = (float)s;
                aspect[i] = (float)a;
                north[i] = double.IsNaN(a) ? float.NaN : (float)Math.Cos(a * Deg);
                east[i] = double.IsNaN(a) ? float.NaN : (float)Math.Sin(a * Deg);
                coastKm[i] = (float)d;
            }
        });

        return new GridCovariates(w, h, dem.Transform, dem.Crs, land, lon, lat, elevation, slope, aspect, north, east, r1, r5, coastKm);
    }
}

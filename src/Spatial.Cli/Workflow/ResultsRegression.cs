using System.Globalization;
using System.Text;
using System.Text.Json.Nodes;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Regression;
using Spatial.Terrain;
using Spatial.Terrain.Rasters;

namespace Spatial.Cli.Workflow;

/// <summary>
/// The workflow shortcut behind <c>spatial regress --results DIR</c>: joins the per-station summaries of
/// <c>fit</c> (<c>stations.csv</c>) with the covariate table (<c>covariates.csv</c>), adds the derived
/// predictors, and fits the timing, duration and amount components and the chosen season metrics against
/// the usual predictors, one model per response, with the full diagnostics of the regression stage.
/// </summary>
internal static class ResultsRegression
{
    /// <summary>Predictors fitted by default: elevation (km, from the DEM, else the list), coast distance (per 10 km) and latitude.</summary>
    public static readonly IReadOnlyList<string> DefaultPredictors = ["elevation_km", "coast_10km", "latitude"];

    /// <summary>Season metrics fitted by default besides the labelled components (station medians).</summary>
    public static readonly IReadOnlyList<string> DefaultMetrics =
        ["median_onset_day", "median_meltout_day", "median_centroid_day", "median_snow_days", "median_longest_cover_days", "median_peak_depth_mm"];

    /// <summary>Name of the joined table written into the regression folder (reusable with <c>regress --table</c>).</summary>
    public const string JoinedTable = "table.csv";

    /// <summary>What one run of the shortcut produced.</summary>
    public sealed record Outcome(string Folder, string TablePath, IReadOnlyList<ModelReport> Models, IReadOnlyList<string> Surfaces);

    /// <summary>
    /// Runs the shortcut on <paramref name="resultsDir"/>. <paramref name="responses"/> null means the labelled components
    /// (timing, duration, amount) plus <see cref="DefaultMetrics"/>; <paramref name="predictors"/> null means
    /// <see cref="DefaultPredictors"/>. With <paramref name="gridDem"/>, also writes predicted surfaces for every response.
    /// </summary>
    public static Outcome Run(string resultsDir, IReadOnlyList<string>? responses, IReadOnlyList<string>? predictors, RegressionOptions options, string? gridDem, string? gridCoast)
    {
        var stationsPath = Path.Combine(resultsDir, ResultLayout.Stations);
        var covariatesPath = Path.Combine(resultsDir, ResultLayout.Covariates);
        foreach (var needed in new[] { stationsPath, covariatesPath })
        {
            if (!File.Exists(needed))
            {
                throw new SpatialDataException(needed, 0, "the results folder lacks this file", $"run 'spatial {(needed == stationsPath ? "fit" : "covariates")}' into {resultsDir} first");
            }
        }

        var stations = Table.ReadCsv(stationsPath);
        var covariates = Table.ReadCsv(covariatesPath);
        var joinedText = Join(stations, covariates, covariatesPath);
        var folder = Path.Combine(resultsDir, ResultLayout.RegressionFolder);
        var tablePath = Path.Combine(folder, JoinedTable);
        AtomicFile.WriteAllText(tablePath, joinedText);
        var table = Table.ParseCsv(joinedText, tablePath);

        var chosenPredictors = predictors ?? DefaultPredictors;
        var chosenResponses = responses ?? DefaultResponses(resultsDir, table);
        var models = new List<ModelReport>();
        foreach (var response in chosenResponses)
        {
            if (!table.HasColumn(response))
            {
                throw new SpatialDataException(tablePath, 1, $"no response column '{response}'", $"choose among: {string.Join(", ", table.Columns.Where(c => c.StartsWith("median_", StringComparison.Ordinal)))}");
            }

            models.Add(RegressionRun.Fit(table, new ModelSpec(response, chosenPredictors), options));
        }

        ResultFiles.Write(folder, models);
        var surfaces = gridDem is null ? [] : WriteSurfaces(folder, models, chosenPredictors, gridDem, gridCoast);
        return new Outcome(folder, tablePath, models, surfaces);
    }

    /// <summary>The labelled timing, duration and amount components (from basis.json) and the default metrics present in the table.</summary>
    internal static IReadOnlyList<string> DefaultResponses(string resultsDir, Table table)
    {
        var list = new List<string>();
        var basisPath = Path.Combine(resultsDir, ResultLayout.Basis);
        if (File.Exists(basisPath) && JsonNode.Parse(File.ReadAllText(basisPath))?["labels"] is JsonArray labels)
        {
            for (var k = 0; k < labels.Count; k++)
            {
                var label = labels[k]?.GetValue<string>();
                if (label is "timing" or "duration" or "amount" && table.HasColumn($"median_c{k + 1}"))
                {
                    list.Add($"median_c{k + 1}");
                }
            }
        }

        list.AddRange(DefaultMetrics.Where(table.HasColumn));
        return list;
    }

    /// <summary>
    /// Joins the two tables on <c>station</c> (stations of <paramref name="stations"/> without covariates are left out)
    /// and adds <c>elevation_m</c> (DEM elevation, else the listed one), <c>elevation_km</c> and <c>coast_10km</c>.
    /// </summary>
    internal static string Join(Table stations, Table covariates, string covariatesPath)
    {
        if (!covariates.HasColumn("station") || !stations.HasColumn("station"))
        {
            throw new SpatialDataException(covariatesPath, 1, "both tables need a 'station' column", "write them with 'spatial fit' and 'spatial covariates'");
        }

        var byStation = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var r = 0; r < covariates.RowCount; r++)
        {
            byStation.TryAdd(covariates.Cell(r, "station"), r);
        }

        var covColumns = covariates.Columns.Where(c => c != "station" && !stations.HasColumn(c)).ToList();
        var header = new List<string>(stations.Columns);
        header.AddRange(covColumns);
        header.AddRange(["elevation_m", "elevation_km", "coast_10km"]);
        var sb = new StringBuilder();
        sb.Append(string.Join(',', header.Select(Quote))).Append('\n');
        for (var r = 0; r < stations.RowCount; r++)
        {
            var id = stations.Cell(r, "station");
            if (!byStation.TryGetValue(id, out var cr))
            {
                continue;
            }

            var cells = stations.Columns.Select(c => stations.Cell(r, c)).ToList();
            cells.AddRange(covColumns.Select(c => covariates.Cell(cr, c)));
            var elevation = Number(Cell(covariates, cr, "elevation_dem_m"));
            if (double.IsNaN(elevation))
            {
                elevation = Number(Cell(covariates, cr, "elevation_listed_m"));
            }

            var coast = Number(Cell(covariates, cr, "coast_km"));
            cells.Add(Format(elevation));
            cells.Add(Format(elevation / 1000));
            cells.Add(Format(coast / 10));
            sb.Append(string.Join(',', cells.Select(Quote))).Append('\n');
        }

        return sb.ToString();
    }

    private static List<string> WriteSurfaces(string folder, IReadOnlyList<ModelReport> models, IReadOnlyList<string> predictors, string demPath, string? coastPath)
    {
        var dem = DemFile.Read(demPath);
        var coast = coastPath is null ? null : coastPath == "world" ? Terrain.Coast.CoastGeometry.World : Terrain.Coast.CoastGeometry.FromGeoJson(coastPath);
        var grid = Covariates.ForGrid(dem, coast);
        var n = grid.Width * grid.Height;
        var cells = new List<float[]>(predictors.Count);
        foreach (var p in predictors)
        {
            cells.Add(GridColumn(grid, p, n, demPath));
        }

        var written = new List<string>();
        foreach (var model in models)
        {
            var result = SurfacePrediction.Predict(model.Fit, cells);
            var name = model.Spec.Response;
            foreach (var (suffix, values) in new[] { (string.Empty, result.Prediction), ("_lo95", result.Lower95), ("_hi95", result.Upper95) })
            {
                var data = new float[n];
                for (var i = 0; i < n; i++)
                {
                    data[i] = grid.Land[i] && double.IsFinite(values[i]) ? (float)values[i] : float.NaN;
                }

                var path = Path.Combine(folder, $"predicted_{name}{suffix}.tif");
                GeoTiffWriter.Write(path, new RasterGrid(grid.Width, grid.Height, grid.Transform, grid.Crs, data, float.NaN));
                written.Add(path);
            }
        }

        return written;
    }

    private static float[] GridColumn(GridCovariates grid, string predictor, int n, string demPath)
    {
        var column = new float[n];
        for (var i = 0; i < n; i++)
        {
            column[i] = predictor switch
            {
                "elevation_km" => grid.ElevationM[i] / 1000f,
                "elevation_m" or "elevation_dem_m" => grid.ElevationM[i],
                "coast_10km" => grid.CoastKm[i] / 10f,
                "coast_km" => grid.CoastKm[i],
                "latitude" => (float)grid.Latitude[i],
                "longitude" => (float)grid.Longitude[i],
                "slope_deg" => grid.SlopeDeg[i],
                "northness" => grid.Northness[i],
                "eastness" => grid.Eastness[i],
                "relief_1km_m" => grid.Relief1KmM[i],
                "relief_5km_m" => grid.Relief5KmM[i],
                _ => throw new SpatialDataException(demPath, 0, $"a predicted surface cannot be made for predictor '{predictor}' (it is not a terrain covariate of the grid)", "leave out --grid, or use only terrain predictors"),
            };
        }

        return column;
    }

    private static string Cell(Table t, int row, string column) => t.HasColumn(column) ? t.Cell(row, column) : string.Empty;

    private static double Number(string text) =>
        double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) ? v : double.NaN;

    private static string Format(double v) => double.IsFinite(v) ? v.ToString("R", CultureInfo.InvariantCulture) : string.Empty;

    private static string Quote(string s) =>
        s.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : s;
}

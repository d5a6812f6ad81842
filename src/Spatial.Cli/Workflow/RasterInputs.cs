using System.Globalization;
using System.Text.Json.Nodes;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Output;
using Spatial.Output.Report;
using Spatial.Regression;
using Spatial.Records;
using Spatial.Terrain.Rasters;

namespace Spatial.Cli.Workflow;

/// <summary>
/// Reads what <c>export</c> and <c>report</c> draw besides the results tables: the DEM (for hillshade), the
/// predicted surfaces of <c>regress --grid</c>, and the daily curves of chosen seasons (for reconstructions).
/// </summary>
internal static class RasterInputs
{
    /// <summary>
    /// The DEM to shade: <paramref name="given"/> when set, else the DEM that <c>covariates</c> used (from the
    /// results folder's manifest) when it still exists; null when neither.
    /// </summary>
    public static (RasterGrid? Grid, string? Path) Dem(string resultsDir, string? given)
    {
        var path = given ?? FromManifest(resultsDir, "covariates", "dem");
        if (path is null)
        {
            return (null, null);
        }

        if (!File.Exists(path))
        {
            if (given is not null)
            {
                throw new SpatialDataException(path, 0, "the DEM file does not exist", "give a GeoTIFF or ASCII grid with --dem, or leave it out");
            }

            return (null, null);
        }

        return (DemFile.Read(path), path);
    }

    /// <summary>Predicted surfaces by response (<c>regression/predicted_RESPONSE.tif</c>, without the interval bounds).</summary>
    public static Dictionary<string, RasterGrid> Surfaces(ResultsFolder folder)
    {
        var surfaces = new Dictionary<string, RasterGrid>(StringComparer.Ordinal);
        foreach (var name in folder.SurfaceFiles)
        {
            if (name.EndsWith("_lo95.tif", StringComparison.Ordinal) || name.EndsWith("_hi95.tif", StringComparison.Ordinal))
            {
                continue;
            }

            var response = name["predicted_".Length..^".tif".Length];
            surfaces[response] = DemFile.Read(Path.Combine(folder.FolderPath, ResultLayout.RegressionFolder, name));
        }

        return surfaces;
    }

    /// <summary>
    /// Daily curves of up to three seasons for step-by-step reconstructions: the best described, a typical one and
    /// the worst described (by the last residual column of <c>seasons.csv</c>, among seasons with at least 300
    /// observed days so that a gap does not pass for a misfit). Empty when the folder lacks the matrix or seasons.
    /// </summary>
    public static List<SeasonCurve> Reconstructions(string resultsDir)
    {
        var seasonsPath = Path.Combine(resultsDir, ResultLayout.Seasons);
        var matrixPath = Path.Combine(resultsDir, ResultLayout.SeasonMatrix);
        if (!File.Exists(seasonsPath) || !File.Exists(matrixPath))
        {
            return [];
        }

        var table = Table.ReadCsv(seasonsPath);
        var residual = table.Columns.Where(c => c.StartsWith("residual_", StringComparison.Ordinal)).LastOrDefault();
        if (residual is null || !table.HasColumn("observed_days"))
        {
            return [];
        }

        var candidates = new List<(double Residual, string Station, int Season)>();
        for (var r = 0; r < table.RowCount; r++)
        {
            if (double.TryParse(table.Cell(r, residual), NumberStyles.Float, CultureInfo.InvariantCulture, out var res)
                && int.TryParse(table.Cell(r, "observed_days"), NumberStyles.Integer, CultureInfo.InvariantCulture, out var days) && days >= 300
                && int.TryParse(table.Cell(r, "season"), NumberStyles.Integer, CultureInfo.InvariantCulture, out var season)
                && double.IsFinite(res))
            {
                candidates.Add((res, table.Cell(r, "station"), season));
            }
        }

        if (candidates.Count == 0)
        {
            return [];
        }

        candidates.Sort((a, b) =>
        {
            var byResidual = a.Residual.CompareTo(b.Residual);
            var byStation = string.CompareOrdinal(a.Station, b.Station);
            return byResidual != 0 ? byResidual : byStation != 0 ? byStation : a.Season.CompareTo(b.Season);
        });
        var chosen = new[] { candidates[0], candidates[candidates.Count / 2], candidates[^1] }.Distinct().ToList();
        var matrix = SeasonMatrixFile.Read(matrixPath);
        var curves = new List<SeasonCurve>();
        foreach (var (_, station, season) in chosen)
        {
            for (var i = 0; i < matrix.Rows; i++)
            {
                if (matrix.Keys[i].Station.Value == station && matrix.Keys[i].Season == season)
                {
                    var row = matrix.Row(i);
                    var values = new double[row.Length];
                    for (var d = 0; d < row.Length; d++)
                    {
                        values[d] = row[d];
                    }

                    curves.Add(new SeasonCurve(station, season, values));
                    break;
                }
            }
        }

        return curves;
    }

    private static string? FromManifest(string resultsDir, string verb, string parameter)
    {
        var path = Path.Combine(resultsDir, ResultLayout.Manifest);
        if (!File.Exists(path))
        {
            return null;
        }

        try
        {
            return JsonNode.Parse(File.ReadAllText(path))?["runs"]?[verb]?["parameters"]?[parameter]?.GetValue<string>();
        }
        catch (System.Text.Json.JsonException)
        {
            return null;
        }
        catch (InvalidOperationException)
        {
            return null;
        }
    }
}

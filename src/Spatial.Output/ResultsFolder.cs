using System.Text.Json;
using System.Text.Json.Nodes;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Output.Internal;

namespace Spatial.Output;

/// <summary>
/// A results folder as the stages wrote it (see DEVELOPERS.md, "File contracts between stages"), read from its
/// files only. Every file is optional except that at least station points must come from somewhere
/// (<c>station_list.csv</c>, or <c>covariates.csv</c> with longitude and latitude) for the map layers.
/// Missing files are listed in <see cref="Missing"/>; unknown extra columns are carried through.
/// </summary>
public sealed class ResultsFolder
{
    private readonly List<string> missing = [];

    private ResultsFolder(string path)
    {
        FolderPath = path;
        StationList = ReadTable(ResultLayout.StationList);
        Stations = ReadTable(ResultLayout.Stations);
        Covariates = ReadTable(ResultLayout.Covariates);
        Seasons = ReadTable(ResultLayout.Seasons);
        Fitted = ReadTable(System.IO.Path.Combine(ResultLayout.RegressionFolder, "fitted.csv"));
        Local = ReadTable(System.IO.Path.Combine(ResultLayout.RegressionFolder, "local.csv"));
        Basis = ReadJson(ResultLayout.Basis);
        Interpretation = ReadJson(ResultLayout.Interpretation);
        Quality = ReadJson(ResultLayout.QualityJson);
        Manifest = ReadJson(ResultLayout.Manifest);
        Regression = ReadJson(System.IO.Path.Combine(ResultLayout.RegressionFolder, "regression.json"));
        foreach (var name in new[] { "coastline.geojson", "coast.geojson" })
        {
            var p = System.IO.Path.Combine(path, name);
            if (File.Exists(p))
            {
                CoastlinePath = p;
                break;
            }
        }

        var reg = System.IO.Path.Combine(path, ResultLayout.RegressionFolder);
        SurfaceFiles = Directory.Exists(reg)
            ? Directory.GetFiles(reg, "predicted_*.tif").Select(System.IO.Path.GetFileName).OfType<string>().Order(StringComparer.Ordinal).ToArray()
            : [];
    }

    /// <summary>The folder.</summary>
    public string FolderPath { get; }

    /// <summary>Contract files that were not found (relative names), in the order they were looked for.</summary>
    public IReadOnlyList<string> Missing => missing;

    /// <summary>A coastline GeoJSON found in the folder (<c>coastline.geojson</c> or <c>coast.geojson</c>), or null.</summary>
    public string? CoastlinePath { get; }

    /// <summary>Names of <c>regression/predicted_*.tif</c> files present (for the lead's GeoTIFF wiring), ordinal order.</summary>
    public IReadOnlyList<string> SurfaceFiles { get; }

    /// <summary>The season start (MM-DD) from basis.json, or the default 09-01.</summary>
    public string SeasonStart => Basis?["season_start"]?.GetValue<string>() ?? SeasonCalendar.Default.StartText;

    internal DataTable? StationList { get; }

    internal DataTable? Stations { get; }

    internal DataTable? Covariates { get; }

    internal DataTable? Seasons { get; }

    internal DataTable? Fitted { get; }

    internal DataTable? Local { get; }

    internal JsonNode? Basis { get; }

    internal JsonNode? Interpretation { get; }

    internal JsonNode? Quality { get; }

    internal JsonNode? Manifest { get; }

    internal JsonNode? Regression { get; }

    /// <summary>
    /// Reads the folder. Throws <see cref="SpatialDataException"/> when the folder does not exist or a present file
    /// cannot be parsed (file, line, what was expected).
    /// </summary>
    public static ResultsFolder Open(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        if (!Directory.Exists(path))
        {
            throw new SpatialDataException(path, 0, "the results folder does not exist", "give the folder that import/fit/covariates/regress wrote");
        }

        return new ResultsFolder(path);
    }

    private DataTable? ReadTable(string relative)
    {
        var p = System.IO.Path.Combine(FolderPath, relative);
        if (!File.Exists(p))
        {
            missing.Add(relative.Replace('\\', '/'));
            return null;
        }

        var t = Csv.Read(p);
        return new DataTable(relative.Replace('\\', '/'), t.Columns, t.Rows);
    }

    private JsonNode? ReadJson(string relative)
    {
        var p = System.IO.Path.Combine(FolderPath, relative);
        if (!File.Exists(p))
        {
            missing.Add(relative.Replace('\\', '/'));
            return null;
        }

        try
        {
            return JsonNode.Parse(File.ReadAllText(p), documentOptions: new JsonDocumentOptions { AllowTrailingCommas = false });
        }
        catch (JsonException e)
        {
            throw new SpatialDataException(relative, (e.LineNumber ?? -1) + 1, $"not valid JSON: {e.Message.Split('.')[0]}", "write the file again with the stage that produces it");
        }
    }
}

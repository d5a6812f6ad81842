namespace Spatial.Core.IO;

/// <summary>
/// File names inside a results folder. Every verb writes into (and reads from) one folder with
/// these names, so that later verbs, the report and the map page find what earlier verbs wrote.
/// </summary>
public static class ResultLayout
{
    /// <summary>Run provenance: inputs with SHA-256, parameters, tool version, time (one per verb run, merged).</summary>
    public const string Manifest = "manifest.json";

    /// <summary>Season matrix written by <c>import</c> (Parquet: station, season, observed_days, below_min_days, d000…d364).</summary>
    public const string SeasonMatrix = "matrix.parquet";

    /// <summary>Station list as read and validated by <c>import</c> (CSV: station, name, longitude, latitude, elevation_m).</summary>
    public const string StationList = "station_list.csv";

    /// <summary>Import quality counts (JSON).</summary>
    public const string QualityJson = "quality.json";

    /// <summary>Import quality table for people (text).</summary>
    public const string QualityText = "quality.txt";

    /// <summary>Fitted basis (JSON): mean, components, eigenvalues, labels, provenance.</summary>
    public const string Basis = "basis.json";

    /// <summary>Per station-season coefficients, residuals and metrics (CSV).</summary>
    public const string Seasons = "seasons.csv";

    /// <summary>Per-station summaries and trends (CSV).</summary>
    public const string Stations = "stations.csv";

    /// <summary>Component interpretation and season selections (JSON).</summary>
    public const string Interpretation = "interpretation.json";

    /// <summary>Terrain and geography covariates per station (CSV).</summary>
    public const string Covariates = "covariates.csv";

    /// <summary>Folder of regression results (regression.json, fitted.csv, local.csv, predicted_*.tif).</summary>
    public const string RegressionFolder = "regression";

    /// <summary>Folder of exported GIS layers.</summary>
    public const string LayersFolder = "layers";

    /// <summary>The self-contained HTML report.</summary>
    public const string Report = "report.html";

    /// <summary>Folder of static maps and plots (SVG, PNG).</summary>
    public const string FiguresFolder = "figures";
}

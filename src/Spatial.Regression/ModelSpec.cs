namespace Spatial.Regression;

/// <summary>What to fit: a response column on predictor columns of a <see cref="Table"/>.</summary>
/// <param name="Response">Response column name.</param>
/// <param name="Predictors">Predictor column names, in design order.</param>
/// <param name="Intercept">True to include a constant term.</param>
/// <param name="Weights">Optional column of positive weights for weighted least squares.</param>
public sealed record ModelSpec(string Response, IReadOnlyList<string> Predictors, bool Intercept = true, string? Weights = null);

/// <summary>Which neighbours Moran's I of the residuals uses.</summary>
public enum MoranNeighbours
{
    /// <summary>The k nearest stations (<see cref="RegressionOptions.MoranK"/>).</summary>
    KNearest,

    /// <summary>Every other station, weight 1/distance.</summary>
    InverseDistance,
}

/// <summary>
/// How a model is fitted and diagnosed. Spatial diagnostics (Moran's I, block cross-validation, local
/// regression) need station coordinates (WGS 84 degrees) in the table.
/// </summary>
public sealed record RegressionOptions
{
    /// <summary>Longitude and latitude column names; null to use <c>longitude</c>/<c>latitude</c> when the table has both.</summary>
    public (string Longitude, string Latitude)? Coordinates { get; init; }

    /// <summary>Column naming the rows in outputs (row numbers are used when the table has no such column).</summary>
    public string StationColumn { get; init; } = "station";

    /// <summary>Neighbours for Moran's I.</summary>
    public MoranNeighbours MoranNeighbours { get; init; } = MoranNeighbours.KNearest;

    /// <summary>k for k-nearest-neighbour weights (clamped to n − 1).</summary>
    public int MoranK { get; init; } = 8;

    /// <summary>Row-standardised (default) or unstandardised weights.</summary>
    public WeightStyle MoranStyle { get; init; } = WeightStyle.RowStandardised;

    /// <summary>Random permutations for Moran's I (0 = none).</summary>
    public int Permutations { get; init; } = 999;

    /// <summary>Seed of the permutation generator.</summary>
    public int Seed { get; init; } = 20261201;

    /// <summary>Block side for spatial block cross-validation, km; null to skip it.</summary>
    public double? BlockKm { get; init; }

    /// <summary>Local regression to run; null to skip it.</summary>
    public GwrSpec? Local { get; init; }

    /// <summary>How many of the most influential rows (largest Cook's distance) to name.</summary>
    public int InfluentialCount { get; init; } = 5;
}

/// <summary>A row named as influential.</summary>
/// <param name="Station">Station (or row) name.</param>
/// <param name="Line">1-based line in the table file.</param>
/// <param name="Leverage">Hat-matrix diagonal.</param>
/// <param name="CooksDistance">Cook's distance.</param>
public sealed record InfluentialRow(string Station, long Line, double Leverage, double CooksDistance);

/// <summary>Everything found for one model. Per-row arrays follow <see cref="RowIds"/>.</summary>
/// <param name="Spec">The model asked for.</param>
/// <param name="Source">Table source (file path as given).</param>
/// <param name="RowsRead">Data rows in the table.</param>
/// <param name="RowsDropped">Rows left out because a used column was empty.</param>
/// <param name="RowIds">Station (or row) names of the rows used.</param>
/// <param name="Observed">Response values of the rows used.</param>
/// <param name="Fit">The least-squares fit.</param>
/// <param name="Influential">The rows with the largest Cook's distance, largest first.</param>
/// <param name="Moran">Moran's I of the residuals (null without coordinates).</param>
/// <param name="BlockCv">Block cross-validation (null unless asked and coordinates are present).</param>
/// <param name="Local">Local regression (null unless asked and coordinates are present).</param>
/// <param name="Notes">Plain-language notes (e.g. why a spatial diagnostic was skipped).</param>
public sealed record ModelReport(
    ModelSpec Spec,
    string Source,
    int RowsRead,
    int RowsDropped,
    IReadOnlyList<string> RowIds,
    IReadOnlyList<double> Observed,
    LeastSquaresFit Fit,
    IReadOnlyList<InfluentialRow> Influential,
    MoranResult? Moran,
    BlockCvResult? BlockCv,
    GwrResult? Local,
    IReadOnlyList<string> Notes);

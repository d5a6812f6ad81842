using Spatial.Core;

namespace Spatial.Fitting;

/// <summary>The training distribution of one coefficient (seasons used to estimate the basis).</summary>
/// <param name="Mean">Mean of the coefficient.</param>
/// <param name="Sd">Sample standard deviation (denominator n − 1).</param>
/// <param name="Quantiles">Quantiles at probabilities 0, 1/(Q−1), …, 1 (type 7), for percentiles of new seasons.</param>
public sealed record TrainingDistribution(double Mean, double Sd, double[] Quantiles);

/// <summary>
/// A fitted basis of seasonal curves: mean curve and K orthonormal components (mm, 365 days from
/// <see cref="SeasonStart"/>), their variances and sampling errors, labels and the training distribution.
/// </summary>
/// <param name="FormatVersion">Version of the basis file format.</param>
/// <param name="SeasonStart">Season start, MM-DD.</param>
/// <param name="Units">Depth units of mean and components (always mm).</param>
/// <param name="Mean">Mean depth per day [365], mm; NaN for a day never observed in training.</param>
/// <param name="Components">K unit vectors [K][365], oriented by the sign convention.</param>
/// <param name="Eigenvalues">Variance along each component [K], mm².</param>
/// <param name="VarianceFraction">Eigenvalue ÷ total variance (trace of the covariance) [K].</param>
/// <param name="CumulativeFraction">Running sum of <paramref name="VarianceFraction"/> [K].</param>
/// <param name="NorthError">North et al. (1982) sampling error of each eigenvalue, λ√(2/N*) [K], mm².</param>
/// <param name="SeparableFromNext">False when component k and k+1 are closer than the sampling error (North's rule) [K].</param>
/// <param name="Labels">amount, timing, duration or other [K].</param>
/// <param name="TotalVariance">Trace of the covariance, mm².</param>
/// <param name="TrainingSeasons">Seasons used to estimate the basis.</param>
/// <param name="EffectiveSeasons">Effective sample size N* used by the sampling errors.</param>
/// <param name="Rotated">True when the components were rotated by varimax.</param>
/// <param name="Method">"pairwise" or "em" (refined).</param>
/// <param name="Metrics">Season-metric rules used in training.</param>
/// <param name="Training">Training distribution of each coefficient [K].</param>
/// <param name="Provenance">Free key/value provenance (tool, options).</param>
public sealed record Basis(
    int FormatVersion,
    string SeasonStart,
    string Units,
    double[] Mean,
    double[][] Components,
    double[] Eigenvalues,
    double[] VarianceFraction,
    double[] CumulativeFraction,
    double[] NorthError,
    bool[] SeparableFromNext,
    string[] Labels,
    double TotalVariance,
    int TrainingSeasons,
    double EffectiveSeasons,
    bool Rotated,
    string Method,
    MetricOptions Metrics,
    TrainingDistribution[] Training,
    IReadOnlyDictionary<string, string> Provenance)
{
    /// <summary>The format version this library writes and reads.</summary>
    public const int CurrentFormatVersion = 1;

    /// <summary>Number of components.</summary>
    public int K => Components.Length;
}

/// <summary>
/// Per station-season results, in the row order of the input matrix: K coefficients, residual_0…residual_K,
/// and the metrics. NaN = unknown.
/// </summary>
public sealed class SeasonScores
{
    private readonly double[] coefficients;
    private readonly double[] residuals;
    private readonly double[] metricValues;
    private readonly int[] modelledBareDays;

    /// <param name="keys">Row keys.</param>
    /// <param name="k">Number of components.</param>
    /// <param name="coefficients">[row × K].</param>
    /// <param name="residuals">[row × (K + 1)].</param>
    /// <param name="metricValues">[row × metrics], in the order of <see cref="SeasonMetrics.Names"/>.</param>
    /// <param name="modelledBareDays">[row].</param>
    internal SeasonScores(IReadOnlyList<SeasonKey> keys, int k, double[] coefficients, double[] residuals, double[] metricValues, int[] modelledBareDays)
    {
        Keys = keys;
        K = k;
        this.coefficients = coefficients;
        this.residuals = residuals;
        this.metricValues = metricValues;
        this.modelledBareDays = modelledBareDays;
    }

    /// <summary>Row keys (station, season, observed days, below-minimum flag).</summary>
    public IReadOnlyList<SeasonKey> Keys { get; }

    /// <summary>Number of components.</summary>
    public int K { get; }

    /// <summary>Rows.</summary>
    public int Count => Keys.Count;

    /// <summary>Coefficient of component <paramref name="component"/> (0-based) of row <paramref name="row"/>, mm.</summary>
    public double Coefficient(int row, int component) => coefficients[(row * K) + component];

    /// <summary>residual_<paramref name="k"/> (0…K) of row <paramref name="row"/>: unexplained fraction of the observed anomaly's root sum of squares.</summary>
    public double Residual(int row, int k) => residuals[(row * (K + 1)) + k];

    /// <summary>Metrics of row <paramref name="row"/>.</summary>
    public SeasonMetrics Metrics(int row)
    {
        var m = metricValues.AsSpan(row * SeasonMetrics.Count, SeasonMetrics.Count);
        return new SeasonMetrics(m[0], m[1], m[2], m[3], m[4], m[5], m[6]) { ModelledBareDays = modelledBareDays[row] };
    }

    /// <summary>Metric number <paramref name="metric"/> (order of <see cref="SeasonMetrics.Names"/>) of row <paramref name="row"/>.</summary>
    internal double Metric(int row, int metric) => metricValues[(row * SeasonMetrics.Count) + metric];

    /// <summary>Modelled-bare days of row <paramref name="row"/> (<see cref="SeasonMetrics.ModelledBareDays"/>).</summary>
    internal int ModelledBareDays(int row) => modelledBareDays[row];

    internal ReadOnlySpan<double> CoefficientRow(int row) => coefficients.AsSpan(row * K, K);

    /// <summary>Multiplies each coefficient column by its sign (+1/−1), in place, before the scores are handed out.</summary>
    internal SeasonScores WithSigns(int[] signs)
    {
        for (var r = 0; r < Count; r++)
        {
            for (var c = 0; c < K; c++)
            {
                if (signs[c] < 0)
                {
                    coefficients[(r * K) + c] = -coefficients[(r * K) + c];
                }
            }
        }

        return this;
    }
}

/// <summary>Why a component got its label: its correlation and partial correlation with each metric, and the label scores.</summary>
/// <param name="Component">1-based component number.</param>
/// <param name="Label">amount, timing, duration or other.</param>
/// <param name="Correlations">Pearson r of the (oriented) coefficient with each metric over training seasons where the metric is known.</param>
/// <param name="Basis">Metric(s) the label rests on (<c>peak_depth_mm</c>, <c>centroid_day</c>, <c>longest_cover_days</c>), or empty for other.</param>
/// <param name="Orientation">The sign rule applied.</param>
public sealed record ComponentLabel(int Component, string Label, IReadOnlyDictionary<string, double> Correlations, string Basis, string Orientation)
{
    /// <summary>Partial correlation p of the (oriented) coefficient with each metric given the earlier components (component 1: plain r), over training seasons where the metric and all coefficients are known.</summary>
    public IReadOnlyDictionary<string, double> PartialCorrelations { get; init; } = new Dictionary<string, double>(StringComparer.Ordinal);

    /// <summary>Label scores from <see cref="PartialCorrelations"/>: amount = p(peak), timing = −p(centroid day) (positive = earlier), duration = p(longest cover) (positive = longer).</summary>
    public IReadOnlyDictionary<string, double> Scores { get; init; } = new Dictionary<string, double>(StringComparer.Ordinal);

    /// <summary>Every aspect (amount, timing, duration) whose |score| reaches the labelling minimum, largest first: a component the data do not separate from a second aspect carries both here, while <see cref="Label"/> names one, each label going to one component only.</summary>
    public IReadOnlyList<string> Aspects { get; init; } = [];
}

/// <summary>A season picked out by a selection.</summary>
/// <param name="Station">Station.</param>
/// <param name="Season">Season name.</param>
/// <param name="Value">The value the selection sorts by.</param>
/// <param name="Residual">The residual that admitted it.</param>
/// <param name="Cause">For the worst described: coverage, spikes, flat-line or shape; otherwise empty.</param>
/// <param name="Detail">A short reason in words.</param>
public sealed record SelectedSeason(StationId Station, int Season, double Value, double Residual, string Cause, string Detail);

/// <summary>Seasons sorted by one component among those it describes well.</summary>
/// <param name="Component">1-based component.</param>
/// <param name="ResidualBelow">Admission threshold on residual after this component.</param>
/// <param name="Admitted">Seasons admitted.</param>
/// <param name="Highest">Highest coefficients first.</param>
/// <param name="Lowest">Lowest coefficients first.</param>
public sealed record ComponentSelection(int Component, double ResidualBelow, int Admitted, SelectedSeason[] Highest, SelectedSeason[] Lowest);

/// <summary>Labels and selections.</summary>
public sealed record Interpretation(ComponentLabel[] Labels, ComponentSelection[] Selections, SelectedSeason[] BestDescribed, SelectedSeason[] WorstDescribed);

/// <summary>Summary of one quantity over a station's seasons.</summary>
/// <param name="Name">c1…cK or a metric name.</param>
/// <param name="N">Seasons where it is known.</param>
/// <param name="Median">Median.</param>
/// <param name="Iqr">Interquartile range (type 7 quantiles).</param>
/// <param name="MkS">Mann–Kendall S.</param>
/// <param name="MkZ">Mann–Kendall Z (continuity and tie corrected).</param>
/// <param name="MkP">Two-sided p of Z.</param>
/// <param name="SenPerDecade">Sen's slope × 10 (units of the quantity per decade).</param>
public sealed record SummaryStatistic(string Name, int N, double Median, double Iqr, double MkS, double MkZ, double MkP, double SenPerDecade);

/// <summary>Per-station summaries of coefficients and metrics.</summary>
public sealed record StationSummary(StationId Station, int Seasons, SummaryStatistic[] Statistics);

/// <summary>One EM refinement iteration.</summary>
/// <param name="Iteration">1-based.</param>
/// <param name="RmsChangeMm">RMS change of the filled-in days since the previous iteration, mm.</param>
/// <param name="RelativeChange">RMS change ÷ RMS of the centred observed data.</param>
/// <param name="LeadingVarianceFraction">Cumulative variance fraction of the K components after this iteration.</param>
public sealed record RefinementStep(int Iteration, double RmsChangeMm, double RelativeChange, double LeadingVarianceFraction);

/// <summary>Everything <see cref="SeasonalFit.Fit"/> computed.</summary>
/// <param name="Basis">The basis.</param>
/// <param name="Seasons">Per station-season results (all rows, including those below the minimum).</param>
/// <param name="Stations">Per-station summaries (training seasons only).</param>
/// <param name="Interpretation">Labels and selections.</param>
/// <param name="Refinement">EM iterations (empty without refinement).</param>
/// <param name="Converged">False when refinement stopped at the iteration limit.</param>
/// <param name="AllEigenvalues">All 365 eigenvalues of the (final) covariance, descending, mm² (before rotation).</param>
public sealed record FitResult(Basis Basis, SeasonScores Seasons, StationSummary[] Stations, Interpretation Interpretation, RefinementStep[] Refinement, bool Converged, double[] AllEigenvalues);

/// <summary>Everything <see cref="SeasonalFit.Apply"/> computed.</summary>
/// <param name="Basis">The basis applied.</param>
/// <param name="Seasons">Coefficients, residuals and metrics of the new seasons.</param>
/// <param name="ZScores">(c − training mean) ÷ training sd, [row × K].</param>
/// <param name="Percentiles">Percentile (0…100) of each coefficient in the training distribution, [row × K].</param>
public sealed record ApplyResult(Basis Basis, SeasonScores Seasons, double[] ZScores, double[] Percentiles);

namespace Spatial.Fitting;

/// <summary>Rules for the season metrics (onset, melt-out, cover, snow days, peak, centroid).</summary>
/// <param name="ThresholdMm">A day is snow-covered when its depth is at or above this, millimetres (default 25 mm = 2.5 cm; common practice).</param>
/// <param name="BridgeDays">Longest run of missing days that may be bridged when the observed days on both sides are on the same side of the threshold (default 3; common practice). Never bridges a season edge.</param>
public sealed record MetricOptions(double ThresholdMm = 25.0, int BridgeDays = 3)
{
    /// <summary>The defaults: 25 mm, 3 days.</summary>
    public static MetricOptions Default { get; } = new();
}

/// <summary>Options of <see cref="SeasonalFit.Fit"/>.</summary>
/// <param name="Components">Number of components K kept (1…365; default 4).</param>
/// <param name="Refine">Run the EM refinement (Beckers &amp; Rixen 2003; Everson &amp; Sirovich 1995) after the pairwise-complete start.</param>
/// <param name="RefineMaxIterations">Most EM iterations.</param>
/// <param name="RefineTolerance">EM stops when the RMS change of the filled-in days between iterations, divided by the RMS of the centred observed data, falls below this, and so does the change still to come estimated from the rate of convergence (at least 1e-8: the covariance is summed in single precision).</param>
/// <param name="Ridge">Ridge term added to the gappy normal equations, as a fraction of the mean of their diagonal (0 = plain least squares).</param>
/// <param name="Varimax">Rotate the K components by varimax (Kaiser 1958) before projection.</param>
/// <param name="Metrics">Season-metric rules.</param>
/// <param name="SelectionResidual">Seasons enter the per-component selections only when their residual after that component is below this (0…1).</param>
/// <param name="SelectionCount">How many seasons each end of a selection lists.</param>
/// <param name="LabelMinCorrelation">A component is labelled amount/timing/duration only when the |score| of that label (from partial correlations with the metrics, see the interpretation rules) is at least this; otherwise "other".</param>
/// <param name="MaxThreads">Upper bound on threads (null = all cores). Results do not depend on it.</param>
/// <param name="MinObservedDays">Seasons with fewer observed days are left out of the basis estimation (as are those flagged below the import's minimum); they are still projected and reported.</param>
public sealed record FitOptions(
    int Components = 4,
    bool Refine = false,
    int RefineMaxIterations = 100,
    double RefineTolerance = 1e-4,
    double Ridge = 0.0,
    bool Varimax = false,
    MetricOptions? Metrics = null,
    double SelectionResidual = 0.5,
    int SelectionCount = 10,
    double LabelMinCorrelation = 0.3,
    int? MaxThreads = null,
    int MinObservedDays = 0)
{
    /// <summary>The metric rules in force (never null).</summary>
    public MetricOptions MetricRules => Metrics ?? MetricOptions.Default;
}

/// <summary>Options of <see cref="SeasonalFit.Apply"/>.</summary>
/// <param name="Ridge">Ridge term for the gappy projection, as in <see cref="FitOptions.Ridge"/>.</param>
/// <param name="Metrics">Season-metric rules (null = those stored in the basis).</param>
/// <param name="MaxThreads">Upper bound on threads (null = all cores).</param>
public sealed record ApplyOptions(double Ridge = 0.0, MetricOptions? Metrics = null, int? MaxThreads = null);

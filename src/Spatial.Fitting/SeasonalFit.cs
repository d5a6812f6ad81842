using System.Globalization;
using Spatial.Core;
using Spatial.Fitting.Internal;

namespace Spatial.Fitting;

/// <summary>
/// The fitting stage: decomposes seasonal snow-depth curves with missing days into a mean curve and a few
/// orthonormal components, projects every season onto them, measures each season, labels the components and
/// summarises each station.
/// </summary>
/// <remarks>
/// <para>Mean: per day, the mean of the observed depths over the training seasons (rows not flagged
/// <see cref="SeasonKey.BelowMinDays"/>). Covariance: pairwise-complete, C_ij = Σ (x_si − m_i)(x_sj − m_j)/(n_ij − 1)
/// over seasons observed on both days (the usual unbiased sample covariance when nothing is missing).
/// Eigen-decomposition of C (Math.NET managed), eigenvalues descending; variance fraction = λ_k / trace(C).</para>
/// <para>Refinement (optional): EM in the manner of Beckers &amp; Rixen (2003) and Everson &amp; Sirovich (1995): missing days
/// are filled from the current mean and K components, mean and covariance re-estimated from the filled data, and the
/// fill recomputed, until the RMS change of the fill ÷ RMS of the observed anomalies, and the change still to come
/// estimated from the rate of the last two iterations, drop below the tolerance (<c>Settled</c>). Each iteration
/// finds the leading vectors by a few steps of subspace iteration warm-started from the previous ones; the returned basis
/// comes from a full decomposition of the final covariance. The covariance is accumulated in single precision, so the
/// change cannot fall much below 1e-8 of the anomalies: a tolerance under 1e-8 is refused.</para>
/// <para>Coefficients: gappy least squares on the observed days only (optional ridge). Residuals:
/// residual_k = √(Σ_obs (x − m − Σ_{i≤k} c_i v_i)²) / √(Σ_obs (x − m)²), residual_0 = 1, with the same coefficients c.</para>
/// <para>Sampling errors: North et al. (1982), δλ_k = λ_k √(2/N*), N* from the leading coefficients (see
/// <c>Statistics.EffectiveSeasons</c>: design effect of seasons sharing a year, and lag-1 autocorrelation within stations);
/// components k and k+1 are flagged not separable when λ_k − λ_{k+1} ≤ δλ_k.</para>
/// <para>Season metrics (threshold and bridge length in <see cref="MetricOptions"/>): a short gap between days of the
/// same state is bridged; a gap flanked only by observed bare days (or by the season's end and a bare day) is
/// <i>modelled bare</i> when the season's own reconstruction m + Σ c_k v_k stays below the threshold throughout it
/// (counted in <see cref="SeasonMetrics.ModelledBareDays"/>, never given a depth); every other gap — in particular any
/// gap touching cover — is of unknown state, and a metric it could change is unknown (<see cref="SeasonMetrics"/>).</para>
/// <para>Labels: sequential partial correlations of component k with the metrics given components 1…k−1; scores
/// amount = p(peak), timing = −p(centroid day), duration = p(longest cover); in component order each
/// component takes its largest free label when |score| ≥ <see cref="FitOptions.LabelMinCorrelation"/>
/// (<see cref="ComponentLabel"/>).</para>
/// <para>Results do not depend on the thread count: rows are cut into chunks by row count only, each chunk summed
/// alone, chunks added in order.</para>
/// </remarks>
public static class SeasonalFit
{
    private const int QuantileCount = 201;

    /// <summary>Vectors the EM's subspace iteration carries beyond the K components (a wider block converges faster).</summary>
    private const int SubspaceExtraVectors = 8;

    /// <summary>Subspace-iteration steps per EM iteration (warm-started from the previous iteration's vectors).</summary>
    private const int SubspaceSteps = 2;

    /// <summary>Smallest EM tolerance: the covariance is summed in single precision and the change stalls near 1e-9…3e-9.</summary>
    public const double MinRefineTolerance = 1e-8;

    /// <summary>Largest convergence rate the EM stopping rule assumes (a tail of at most 99 changes).</summary>
    private const double MaxRate = 0.99;

    /// <summary>Fits a basis to <paramref name="matrix"/> and scores every season. The matrix is not changed.</summary>
    /// <exception cref="SpatialDataException">Fewer than two training seasons, or fewer usable days than components.</exception>
    public static FitResult Fit(SeasonMatrix matrix, FitOptions options, IProgress<double>? progress = null)
    {
        ArgumentNullException.ThrowIfNull(matrix);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfLessThan(options.Components, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(options.Components, Layout.Days);
        ArgumentOutOfRangeException.ThrowIfNegative(options.Ridge);
        ArgumentOutOfRangeException.ThrowIfLessThan(options.RefineTolerance, MinRefineTolerance);
        var k = options.Components;
        var po = Layout.Parallel(options.MaxThreads);
        var train = TrainingRows(matrix, options.MinObservedDays);
        if (train.Length < 2)
        {
            throw new SpatialDataException("season matrix", 0, $"{train.Length} season(s) have enough observed days to estimate a basis; at least 2 are needed", "lower the minimum observed days or add seasons");
        }

        Report(progress, 0.0);
        var sw = StageTimer.Start();
        var mean = Covariance.Mean(matrix, train, null, po, out var dayCounts);
        var usable = dayCounts.Count(c => c > 0);
        if (usable < k)
        {
            throw new SpatialDataException("season matrix", 0, $"only {usable} days are ever observed; {k} components need at least as many", "ask for fewer components");
        }

        StageTimer.Lap(sw, "mean");
        Report(progress, 0.05);
        var cov = Covariance.Estimate(matrix, train, mean, null, po, f => Report(progress, 0.05 + (0.45 * f)), out _);
        StageTimer.Lap(sw, "covariance");
        var (values, vectors) = SymmetricEigen.Decompose(cov, Layout.Days);
        StageTimer.Lap(sw, "eigen");
        var steps = new List<RefinementStep>();
        var converged = true;
        var method = "pairwise";
        if (options.Refine)
        {
            method = "em";
            converged = false;
            (mean, cov, values, vectors, converged) = Refine(matrix, train, mean, vectors, k, options, po, steps);
        }

        Report(progress, 0.6);
        var trace = 0.0;
        for (var d = 0; d < Layout.Days; d++)
        {
            trace += cov[(d * Layout.Days) + d];
        }

        var components = vectors.Take(k).Select(v => ZeroUnusable((double[])v.Clone(), mean)).ToArray();
        var eig = values.Take(k).ToArray();
        if (options.Varimax && k > 1)
        {
            components = Varimax.Rotate(components);
            eig = components.Select(v => Quadratic(cov, v)).ToArray();
            var order = Enumerable.Range(0, k).OrderByDescending(i => eig[i]).ThenBy(i => i).ToArray();
            components = order.Select(i => components[i]).ToArray();
            eig = order.Select(i => eig[i]).ToArray();
            foreach (var c in components)
            {
                SymmetricEigen.FixSign(c);
            }
        }

        // First scoring, then orientation from the metrics, then the sign flip applied to the scores.
        var projector = new GappyProjector(mean, components, options.Ridge);
        var scores = Scoring.Score(matrix, projector, options.MetricRules, po, f => Report(progress, 0.6 + (0.3 * f)));
        StageTimer.Lap(sw, "projection and metrics");
        var correlations = Correlations(scores, train, k, po);
        StageTimer.Lap(sw, "correlations");
        var partials = PartialCorrelations(scores, train, k, po);
        StageTimer.Lap(sw, "partial correlations");
        var labels = Interpreter.Label(components, partials, options.LabelMinCorrelation);
        for (var c = 0; c < k; c++)
        {
            if (labels[c].Sign < 0)
            {
                for (var m = 0; m < partials[c].Length; m++)
                {
                    partials[c][m] = -partials[c][m];
                }

                for (var d = 0; d < Layout.Days; d++)
                {
                    components[c][d] = -components[c][d];
                }

                for (var m = 0; m < correlations[c].Length; m++)
                {
                    correlations[c][m] = -correlations[c][m];
                }
            }
        }

        scores = scores.WithSigns(labels.Select(l => l.Sign).ToArray());
        StageTimer.Lap(sw, "orientation");
        Report(progress, 0.92);

        var nStar = Statistics.EffectiveSeasons(matrix.Keys, train, r => scores.Coefficient(r, 0), out var icc, out var r1);
        StageTimer.Lap(sw, "effective sample size");
        var north = eig.Select(l => l * Math.Sqrt(2.0 / nStar)).ToArray();
        var separable = new bool[k];
        for (var c = 0; c < k; c++)
        {
            var next = c + 1 < k ? eig[c + 1] : (options.Varimax ? double.NaN : (k < values.Length ? values[k] : double.NaN));
            separable[c] = double.IsNaN(next) || eig[c] - next > north[c];
        }

        var fraction = eig.Select(l => trace > 0 ? l / trace : double.NaN).ToArray();
        var cumulative = new double[k];
        for (var c = 0; c < k; c++)
        {
            cumulative[c] = (c > 0 ? cumulative[c - 1] : 0) + fraction[c];
        }

        var training = new TrainingDistribution[k];
        Parallel.For(
            0,
            k,
            po,
            () => (Values: LargeArrays.AllocateUninitialized<double>(train.Length), Scratch: LargeArrays.AllocateUninitialized<double>(train.Length)),
            (c, _, buffers) =>
            {
                var n = 0;
                foreach (var r in train)
                {
                    var v = scores.Coefficient(r, c);
                    if (double.IsFinite(v))
                    {
                        buffers.Values[n++] = v;
                    }
                }

                training[c] = Distribution(buffers.Values.AsSpan(0, n), buffers.Scratch);
                return buffers;
            },
            _ => { });
        StageTimer.Lap(sw, "training distribution");
        var provenance = new SortedDictionary<string, string>(StringComparer.Ordinal)
        {
            ["method"] = method,
            ["components"] = k.ToString(CultureInfo.InvariantCulture),
            ["ridge"] = options.Ridge.ToString("R", CultureInfo.InvariantCulture),
            ["varimax"] = options.Varimax ? "true" : "false",
            ["threshold_mm"] = options.MetricRules.ThresholdMm.ToString("R", CultureInfo.InvariantCulture),
            ["bridge_days"] = options.MetricRules.BridgeDays.ToString(CultureInfo.InvariantCulture),
            ["training_seasons"] = train.Length.ToString(CultureInfo.InvariantCulture),
            ["season_year_icc"] = icc.ToString("R", CultureInfo.InvariantCulture),
            ["lag1_autocorrelation"] = r1.ToString("R", CultureInfo.InvariantCulture),
            ["covariance"] = options.Refine ? "complete covariance of EM-filled data, denominator n-1" : "pairwise-complete, overall daily means, denominator n_ij-1",
        };
        var basis = new Basis(
            Basis.CurrentFormatVersion,
            matrix.Calendar.StartText,
            "mm",
            mean,
            components,
            eig,
            fraction,
            cumulative,
            north,
            separable,
            labels.Select(l => l.Label).ToArray(),
            trace,
            train.Length,
            nStar,
            options.Varimax && k > 1,
            method,
            options.MetricRules,
            training,
            provenance);

        var labelRecords = Enumerable.Range(0, k).Select(c => new ComponentLabel(
            c + 1,
            labels[c].Label,
            Enumerable.Range(0, SeasonMetrics.Names.Count).ToDictionary(m => SeasonMetrics.Names[m], m => correlations[c][m], StringComparer.Ordinal),
            labels[c].Metric,
            labels[c].Rule)
        {
            PartialCorrelations = Enumerable.Range(0, SeasonMetrics.Names.Count).ToDictionary(m => SeasonMetrics.Names[m], m => partials[c][m], StringComparer.Ordinal),
            Scores = Enumerable.Range(0, 3).ToDictionary(i => Interpreter.ScoreNames[i], i => Interpreter.Scores(partials[c])[i], StringComparer.Ordinal),
            Aspects = Interpreter.Aspects(partials[c], options.LabelMinCorrelation),
        }).ToArray();
        var interpretation = Selections.Build(matrix, scores, train, basis, labelRecords, options);
        StageTimer.Lap(sw, "selections");
        var stations = StationSummaries.Build(scores, train, po);
        StageTimer.Lap(sw, "station summaries");
        Report(progress, 1.0);
        return new FitResult(basis, scores, stations, interpretation, steps.ToArray(), converged, values);
    }

    /// <summary>
    /// Projects <paramref name="matrix"/> onto a saved <paramref name="basis"/>: coefficients, residuals, metrics, and
    /// anomalies of each coefficient against the basis's training distribution (z-score and percentile 0…100).
    /// </summary>
    /// <exception cref="SpatialDataException">The matrix's season start differs from the basis's.</exception>
    public static ApplyResult Apply(Basis basis, SeasonMatrix matrix, ApplyOptions options)
    {
        ArgumentNullException.ThrowIfNull(basis);
        ArgumentNullException.ThrowIfNull(matrix);
        ArgumentNullException.ThrowIfNull(options);
        if (!string.Equals(basis.SeasonStart, matrix.Calendar.StartText, StringComparison.Ordinal))
        {
            throw new SpatialDataException("season matrix", 0, $"seasons start on {matrix.Calendar.StartText} but the basis was fitted to seasons starting on {basis.SeasonStart}", "import the records with the basis's season start");
        }

        var po = Layout.Parallel(options.MaxThreads);
        var projector = new GappyProjector(basis.Mean, basis.Components, options.Ridge);
        var scores = Scoring.Score(matrix, projector, options.Metrics ?? basis.Metrics, po, null);
        var k = basis.K;
        var z = new double[(long)matrix.Rows * k];
        var pct = new double[(long)matrix.Rows * k];
        for (var r = 0; r < matrix.Rows; r++)
        {
            for (var c = 0; c < k; c++)
            {
                var v = scores.Coefficient(r, c);
                var t = basis.Training[c];
                z[(r * k) + c] = t.Sd > 0 ? (v - t.Mean) / t.Sd : double.NaN;
                pct[(r * k) + c] = Percentile(t.Quantiles, v);
            }
        }

        return new ApplyResult(basis, scores, z, pct);
    }

    /// <summary>Percentile (0…100) of <paramref name="value"/> by linear interpolation in equally spaced quantiles; NaN for NaN.</summary>
    internal static double Percentile(double[] quantiles, double value)
    {
        if (double.IsNaN(value) || quantiles.Length < 2)
        {
            return double.NaN;
        }

        var q = quantiles.Length - 1;
        if (value <= quantiles[0])
        {
            return 0;
        }

        if (value >= quantiles[q])
        {
            return 100;
        }

        var hi = 1;
        while (quantiles[hi] < value)
        {
            hi++;
        }

        var lo = hi - 1;
        var span = quantiles[hi] - quantiles[lo];
        var frac = span > 0 ? (value - quantiles[lo]) / span : 0.5;
        return 100.0 * (lo + frac) / q;
    }

    private static (double[] Mean, double[] Cov, double[] Values, double[][] Vectors, bool Converged) Refine(
        SeasonMatrix matrix, int[] train, double[] mean, double[][] vectors, int k, FitOptions options, ParallelOptions po, List<RefinementStep> steps)
    {
        var components = vectors.Take(k).Select(v => ZeroUnusable((double[])v.Clone(), mean)).ToArray();
        var projector = new GappyProjector(mean, components, options.Ridge);
        var coeffs = new double[(long)train.Length * k];
        var memory = matrix.DepthsMemory;
        var chunks = Layout.Chunks(train.Length);
        double obsSum2 = 0;
        var obsParts = new double[chunks.Length];
        Parallel.For(0, chunks.Length, po, c =>
        {
            var scratch = new double[projector.ScratchLength];
            var res = new double[k + 1];
            var span = memory.Span;
            var s2 = 0.0;
            for (var t = chunks[c].Start; t < chunks[c].End; t++)
            {
                var row = span.Slice(train[t] * Layout.Days, Layout.Days);
                projector.Project(row, coeffs.AsSpan(t * k, k), res, scratch);
                for (var d = 0; d < Layout.Days; d++)
                {
                    if (!float.IsNaN(row[d]) && !double.IsNaN(mean[d]))
                    {
                        s2 += (row[d] - mean[d]) * (row[d] - mean[d]);
                    }
                }

                for (var a = 0; a < k; a++)
                {
                    if (double.IsNaN(coeffs[(t * k) + a]))
                    {
                        coeffs.AsSpan(t * k, k).Clear();
                        break;
                    }
                }
            }

            obsParts[c] = s2;
        });
        long observedCells = 0;
        foreach (var t in train)
        {
            observedCells += matrix.Keys[t].ObservedDays;
        }

        foreach (var p in obsParts)
        {
            obsSum2 += p;
        }

        var obsRms = Math.Sqrt(obsSum2 / Math.Max(1, observedCells));
        var fill = new EmFill(mean, projector.ComponentsByDay, k, coeffs);
        double[] cov = [];
        var block = Math.Min(Layout.Days, k + SubspaceExtraVectors);
        IReadOnlyList<double[]> lead = vectors.Take(block).ToArray();
        var previousRelative = double.NaN;
        for (var it = 1; it <= options.RefineMaxIterations; it++)
        {
            var newMean = Covariance.Mean(matrix, train, fill, po, out _);
            cov = Covariance.Estimate(matrix, train, newMean, fill, po, null, out _);

            // Only the leading K vectors drive the next fill: a few steps of subspace iteration from the previous
            // iteration's vectors instead of a full decomposition; the basis returned comes from a full one.
            (var leadValues, lead) = SymmetricEigen.Leading(cov, Layout.Days, lead, block, SubspaceSteps);
            var newComponents = lead.Take(k).Select(v => ZeroUnusable((double[])v.Clone(), newMean)).ToArray();
            var newProjector = new GappyProjector(newMean, newComponents, options.Ridge);
            var newCoeffs = new double[(long)train.Length * k];
            var changeParts = new double[chunks.Length];
            var missingParts = new long[chunks.Length];
            var current = fill;
            Parallel.For(0, chunks.Length, po, c =>
            {
                var centred = new double[Layout.Days];
                var span = memory.Span;
                double change = 0;
                long missing = 0;
                for (var t = chunks[c].Start; t < chunks[c].End; t++)
                {
                    var row = span.Slice(train[t] * Layout.Days, Layout.Days);
                    for (var d = 0; d < Layout.Days; d++)
                    {
                        centred[d] = double.IsNaN(newMean[d]) ? 0 : (float.IsNaN(row[d]) ? current.Value(t, d) : row[d]) - newMean[d];
                    }

                    var cs = newCoeffs.AsSpan(t * k, k);
                    newProjector.ProjectComplete(centred, cs);
                    for (var d = 0; d < Layout.Days; d++)
                    {
                        if (!float.IsNaN(row[d]) || double.IsNaN(newMean[d]))
                        {
                            continue;
                        }

                        var v = newMean[d];
                        for (var a = 0; a < k; a++)
                        {
                            v += newProjector.ComponentsByDay[(d * k) + a] * cs[a];
                        }

                        var delta = v - current.Value(t, d);
                        change += delta * delta;
                        missing++;
                    }
                }

                changeParts[c] = change;
                missingParts[c] = missing;
            });
            var totalChange = changeParts.Sum();
            var totalMissing = missingParts.Sum();
            var rms = totalMissing > 0 ? Math.Sqrt(totalChange / totalMissing) : 0;
            var rel = obsRms > 0 ? rms / obsRms : 0;
            var traceNow = 0.0;
            for (var d = 0; d < Layout.Days; d++)
            {
                traceNow += cov[(d * Layout.Days) + d];
            }

            steps.Add(new RefinementStep(it, rms, rel, traceNow > 0 ? leadValues.Take(k).Sum() / traceNow : double.NaN));
            mean = newMean;
            fill = new EmFill(newMean, newProjector.ComponentsByDay, k, newCoeffs);
            if (Settled(rel, previousRelative, options.RefineTolerance))
            {
                var (values, all) = SymmetricEigen.Decompose(cov, Layout.Days);
                return (mean, cov, values, all, true);
            }

            previousRelative = rel;
        }

        var (lastValues, lastVectors) = SymmetricEigen.Decompose(cov, Layout.Days);
        return (mean, cov, lastValues, lastVectors, false);
    }

    /// <summary>
    /// EM stopping rule: the change of this iteration and the change still to come are both below the tolerance. The
    /// changes of a linearly converging iteration shrink by a rate ρ each time, so what is still to come is about
    /// change × ρ/(1 − ρ) (the geometric tail; ρ from the last two changes, at most 0.99): a slow iteration (ρ near 1)
    /// must get its change far below the tolerance before it stops, a fast one stops as soon as the change is below it.
    /// </summary>
    internal static bool Settled(double relative, double previousRelative, double tolerance)
    {
        if (!(relative < tolerance))
        {
            return false;
        }

        if (double.IsNaN(previousRelative))
        {
            return true;
        }

        var rate = previousRelative > 0 ? Math.Min(relative / previousRelative, MaxRate) : MaxRate;
        return relative * Math.Max(1, rate / (1 - rate)) < tolerance;
    }

    /// <summary>Rows not flagged below the minimum, with observed days, and at least <paramref name="minObservedDays"/> of them, in row order.</summary>
    private static int[] TrainingRows(SeasonMatrix matrix, int minObservedDays)
    {
        var keys = matrix.Keys;
        var count = 0;
        for (var r = 0; r < matrix.Rows; r++)
        {
            count += IsTraining(keys[r]) ? 1 : 0;
        }

        var train = new int[count];
        var t = 0;
        for (var r = 0; r < matrix.Rows; r++)
        {
            if (IsTraining(keys[r]))
            {
                train[t++] = r;
            }
        }

        return train;

        bool IsTraining(SeasonKey key) => !key.BelowMinDays && key.ObservedDays > 0 && key.ObservedDays >= minObservedDays;
    }

    private static double[][] Correlations(SeasonScores scores, int[] train, int k, ParallelOptions po)
    {
        // Each (component, metric) pair is summed alone, in row order: the same numbers whatever the thread count.
        var result = new double[k][];
        Parallel.For(0, k, po, c => result[c] = Statistics.PearsonWithMetrics(scores, c, train));
        return result;
    }

    /// <summary>The interpreter's sequential partial correlations, one metric per task (each metric is computed alone there too).</summary>
    private static double[][] PartialCorrelations(SeasonScores scores, int[] train, int k, ParallelOptions po)
    {
        var metrics = SeasonMetrics.Names.Count;
        var result = new double[k][];
        for (var c = 0; c < k; c++)
        {
            result[c] = new double[metrics];
        }

        Parallel.For(0, metrics, po, m =>
        {
            var one = Interpreter.PartialCorrelations(scores.Coefficient, (r, _) => scores.Metric(r, m), k, 1, train);
            for (var c = 0; c < k; c++)
            {
                result[c][m] = one[c][0];
            }
        });
        return result;
    }

    /// <summary>Mean, sd and quantiles of finite <paramref name="values"/> (reordered: sorted ascending in place); <paramref name="scratch"/> at least as long.</summary>
    private static TrainingDistribution Distribution(Span<double> values, Span<double> scratch)
    {
        if (values.Length == 0)
        {
            return new TrainingDistribution(double.NaN, double.NaN, []);
        }

        RadixSort.Sort(values, scratch);
        ReadOnlySpan<double> sorted = values;
        var mean = 0.0;
        foreach (var v in sorted)
        {
            mean += v;
        }

        mean /= sorted.Length;
        var ss = 0.0;
        foreach (var v in sorted)
        {
            ss += (v - mean) * (v - mean);
        }

        var sd = sorted.Length > 1 ? Math.Sqrt(ss / (sorted.Length - 1)) : double.NaN;
        var q = new double[QuantileCount];
        for (var i = 0; i < QuantileCount; i++)
        {
            q[i] = Trend.Quantile(sorted, (double)i / (QuantileCount - 1));
        }

        return new TrainingDistribution(mean, sd, q);
    }

    private static double Quadratic(double[] cov, double[] v)
    {
        var s = 0.0;
        for (var i = 0; i < Layout.Days; i++)
        {
            var row = 0.0;
            for (var j = 0; j < Layout.Days; j++)
            {
                row += cov[(i * Layout.Days) + j] * v[j];
            }

            s += v[i] * row;
        }

        return s;
    }

    private static double[] ZeroUnusable(double[] v, double[] mean)
    {
        for (var d = 0; d < v.Length; d++)
        {
            if (double.IsNaN(mean[d]))
            {
                v[d] = 0;
            }
        }

        return v;
    }

    private static void Report(IProgress<double>? progress, double value) => progress?.Report(Math.Clamp(value, 0, 1));
}

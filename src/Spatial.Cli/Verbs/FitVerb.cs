using System.CommandLine;
using System.Globalization;
using Spatial.Core.IO;
using Spatial.Fitting;
using Spatial.Records;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial fit MATRIX --out DIR</c>: season matrix → basis, per-season scores and metrics, per-station trends.</summary>
internal static class FitVerb
{
    public static Command Create(CliEnv env)
    {
        var matrixArg = new Argument<string>("MATRIX") { Description = "Season matrix written by 'spatial import' (matrix.parquet)." };
        var outOpt = new Option<string>("--out") { Description = "Results folder (basis.json, seasons.csv, stations.csv, interpretation.json are written here).", Required = true };
        var componentsOpt = new Option<int>("--components") { Description = "Number of components to keep (1…365).", DefaultValueFactory = _ => 4 };
        var refineOpt = new Option<bool>("--refine") { Description = "Refine by EM: fill missing days from the components and re-estimate until the fill settles." };
        var thresholdOpt = new Option<double>("--threshold-mm") { Description = "Depth at or above which a day counts as snow-covered, mm.", DefaultValueFactory = _ => 25.0 };
        var bridgeOpt = new Option<int>("--bridge-days") { Description = "Longest run of missing days a metric may bridge between days on the same side of the threshold.", DefaultValueFactory = _ => 3 };
        var minDaysOpt = new Option<int>("--min-days") { Description = "Seasons with fewer observed days are left out of the basis (still scored and reported).", DefaultValueFactory = _ => 0 };
        var ridgeOpt = new Option<double>("--ridge") { Description = "Ridge term for the per-season least squares, as a fraction of the mean diagonal (0 = none).", DefaultValueFactory = _ => 0.0 };
        var varimaxOpt = new Option<bool>("--varimax") { Description = "Rotate the components by varimax (Kaiser 1958)." };
        var iterationsOpt = new Option<int>("--max-iterations") { Description = "Most EM iterations with --refine.", DefaultValueFactory = _ => 100 };
        var toleranceOpt = new Option<double>("--tolerance") { Description = "EM stops when the RMS change of the filled-in days ÷ RMS of the observed anomalies falls below this.", DefaultValueFactory = _ => 1e-4 };
        var selectBelowOpt = new Option<double>("--select-below") { Description = "Selections list only seasons whose residual after the component is below this (0…1).", DefaultValueFactory = _ => 0.5 };
        var selectCountOpt = new Option<int>("--select-count") { Description = "How many seasons each end of a selection (and the best and worst described) lists.", DefaultValueFactory = _ => 10 };
        var threadsOpt = new Option<int?>("--threads") { Description = "Most threads to use (default: all cores). Results do not depend on it." };
        var cmd = new Command("fit", "Fit seasonal components to a season matrix: mean curve, components, variances, per-season coefficients, residuals and metrics, per-station trends.")
        {
            matrixArg, outOpt, componentsOpt, refineOpt, thresholdOpt, bridgeOpt, minDaysOpt, ridgeOpt, varimaxOpt, iterationsOpt, toleranceOpt, selectBelowOpt, selectCountOpt, threadsOpt,
        };
        cmd.SetAction(parseResult =>
        {
            var matrixPath = parseResult.GetValue(matrixArg)!;
            var outDir = parseResult.GetValue(outOpt)!;
            var k = parseResult.GetValue(componentsOpt);
            var threshold = parseResult.GetValue(thresholdOpt);
            var bridge = parseResult.GetValue(bridgeOpt);
            var minDays = parseResult.GetValue(minDaysOpt);
            var ridge = parseResult.GetValue(ridgeOpt);
            var json = parseResult.GetValue(CliApp.Json);
            if (k is < 1 or > 365)
            {
                throw new UsageException($"--components must be 1…365; got {k}.");
            }

            if (!double.IsFinite(threshold) || threshold <= 0)
            {
                throw new UsageException($"--threshold-mm must be a positive number of millimetres; got {threshold.ToString(CultureInfo.InvariantCulture)}.");
            }

            if (bridge < 0 || minDays is < 0 or > 365 || !(ridge >= 0))
            {
                throw new UsageException("--bridge-days, --min-days (0…365) and --ridge must not be negative.");
            }

            var iterations = parseResult.GetValue(iterationsOpt);
            var tolerance = parseResult.GetValue(toleranceOpt);
            var selectBelow = parseResult.GetValue(selectBelowOpt);
            var selectCount = parseResult.GetValue(selectCountOpt);
            var threads = parseResult.GetValue(threadsOpt);
            if (iterations < 1 || !(tolerance >= SeasonalFit.MinRefineTolerance))
            {
                throw new UsageException($"--max-iterations must be at least 1 and --tolerance at least 1e-8 (the covariance is summed in single precision); got {iterations} and {tolerance.ToString(CultureInfo.InvariantCulture)}.");
            }

            if (!(selectBelow is > 0 and <= 1) || selectCount < 1)
            {
                throw new UsageException($"--select-below must be in (0, 1] and --select-count at least 1; got {selectBelow.ToString(CultureInfo.InvariantCulture)} and {selectCount}.");
            }

            if (threads is < 1)
            {
                throw new UsageException($"--threads must be at least 1; got {threads}.");
            }

            var matrix = SeasonMatrixFile.Read(matrixPath);
            var options = new FitOptions(
                Components: k,
                Refine: parseResult.GetValue(refineOpt),
                RefineMaxIterations: iterations,
                RefineTolerance: tolerance,
                Ridge: ridge,
                Varimax: parseResult.GetValue(varimaxOpt),
                Metrics: new MetricOptions(threshold, bridge),
                SelectionResidual: selectBelow,
                SelectionCount: selectCount,
                MaxThreads: threads,
                MinObservedDays: minDays);
            var result = CliOutput.WithProgress(env, json, "fitting", p => SeasonalFit.Fit(matrix, options, p));
            FitFiles.Write(outDir, result);
            RunManifest.Record(outDir, "fit", [matrixPath], new Dictionary<string, string?>
            {
                ["components"] = k.ToString(CultureInfo.InvariantCulture),
                ["refine"] = options.Refine ? "true" : "false",
                ["threshold_mm"] = threshold.ToString("R", CultureInfo.InvariantCulture),
                ["bridge_days"] = bridge.ToString(CultureInfo.InvariantCulture),
                ["min_days"] = minDays.ToString(CultureInfo.InvariantCulture),
                ["ridge"] = ridge.ToString("R", CultureInfo.InvariantCulture),
                ["varimax"] = options.Varimax ? "true" : "false",
                ["max_iterations"] = iterations.ToString(CultureInfo.InvariantCulture),
                ["tolerance"] = tolerance.ToString("R", CultureInfo.InvariantCulture),
                ["select_below"] = selectBelow.ToString("R", CultureInfo.InvariantCulture),
                ["select_count"] = selectCount.ToString(CultureInfo.InvariantCulture),
            });
            var b = result.Basis;
            if (json)
            {
                CliOutput.WriteJson(env, new Dictionary<string, object?>
                {
                    ["verb"] = "fit",
                    ["out"] = outDir,
                    ["seasons"] = matrix.Rows,
                    ["training_seasons"] = b.TrainingSeasons,
                    ["effective_seasons"] = b.EffectiveSeasons,
                    ["method"] = b.Method,
                    ["refine_iterations"] = result.Refinement.Length,
                    ["converged"] = result.Converged,
                    ["components"] = Enumerable.Range(0, b.K).Select(c => new Dictionary<string, object?>
                    {
                        ["component"] = c + 1,
                        ["label"] = b.Labels[c],
                        ["eigenvalue"] = b.Eigenvalues[c],
                        ["variance_fraction"] = b.VarianceFraction[c],
                        ["cumulative_fraction"] = b.CumulativeFraction[c],
                        ["north_error"] = b.NorthError[c],
                        ["separable_from_next"] = b.SeparableFromNext[c],
                        ["label_metric"] = result.Interpretation.Labels[c].Basis,
                        ["scores"] = result.Interpretation.Labels[c].Scores,
                    }).ToArray(),
                    ["refinement"] = result.Refinement.Select(s => new Dictionary<string, object?>
                    {
                        ["iteration"] = s.Iteration,
                        ["rms_change_mm"] = s.RmsChangeMm,
                        ["relative_change"] = s.RelativeChange,
                    }).ToArray(),
                    ["files"] = new[] { ResultLayout.Basis, ResultLayout.Seasons, ResultLayout.Stations, ResultLayout.Interpretation },
                });
            }
            else
            {
                env.Out.WriteLine(FormattableString.Invariant($"fit: {matrix.Rows} seasons ({b.TrainingSeasons} used for the basis, effective {b.EffectiveSeasons:0.#}), method {b.Method}{(options.Refine ? $", {result.Refinement.Length} EM iterations{(result.Converged ? string.Empty : " (not converged)")}" : string.Empty)}"));
                var em = result.Refinement;
                for (var i = 0; i < em.Length; i++)
                {
                    if (em.Length > 8 && i == 3)
                    {
                        env.Out.WriteLine(FormattableString.Invariant($"  … {em.Length - 6} more EM iterations (all of them in interpretation.json)"));
                        i = em.Length - 3;
                    }

                    var step = em[i];
                    env.Out.WriteLine(FormattableString.Invariant($"  EM iteration {step.Iteration,2}: fill changed by {step.RmsChangeMm:0.###} mm RMS ({step.RelativeChange:0.###e+0} of the observed anomalies), K components hold {100 * step.LeadingVarianceFraction:0.00} %"));
                }

                env.Out.WriteLine("  component  label     variance %  ± North   cumulative %  separable  amount  timing  duration");
                for (var c = 0; c < b.K; c++)
                {
                    var l = result.Interpretation.Labels[c];
                    string S(string name) => l.Scores.TryGetValue(name, out var v) && double.IsFinite(v) ? v.ToString("+0.00;-0.00", CultureInfo.InvariantCulture) : "   -";
                    var north = b.TotalVariance > 0 ? 100 * b.NorthError[c] / b.TotalVariance : double.NaN;
                    env.Out.WriteLine(FormattableString.Invariant($"  {c + 1,9}  {b.Labels[c],-8}  {100 * b.VarianceFraction[c],10:0.00}  {north,7:0.00}  {100 * b.CumulativeFraction[c],12:0.00}  {(b.SeparableFromNext[c] ? "yes" : "no"),-9}  {S("amount"),6}  {S("timing"),6}  {S("duration"),8}"));
                }

                env.Out.WriteLine("  scores: partial correlation, given the earlier components, with peak depth (amount), minus the centroid day (timing: + = earlier) and the longest cover (duration: + = longer); a label needs |score| >= 0.3");
                foreach (var s in result.Interpretation.WorstDescribed.Take(5))
                {
                    env.Out.WriteLine(FormattableString.Invariant($"  poorly described: {s.Station.Value} {s.Season} residual {s.Residual:0.000} ({s.Cause}: {s.Detail})"));
                }

                env.Out.WriteLine($"  wrote {ResultLayout.Basis}, {ResultLayout.Seasons}, {ResultLayout.Stations}, {ResultLayout.Interpretation} in {outDir}");
            }

            return ExitCodes.Done;
        });
        return cmd;
    }
}

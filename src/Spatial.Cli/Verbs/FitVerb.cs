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
        var cmd = new Command("fit", "Fit seasonal components to a season matrix: mean curve, components, variances, per-season coefficients, residuals and metrics, per-station trends.")
        {
            matrixArg, outOpt, componentsOpt, refineOpt, thresholdOpt, bridgeOpt, minDaysOpt, ridgeOpt, varimaxOpt,
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

            var matrix = SeasonMatrixFile.Read(matrixPath);
            var options = new FitOptions(
                Components: k,
                Refine: parseResult.GetValue(refineOpt),
                Ridge: ridge,
                Varimax: parseResult.GetValue(varimaxOpt),
                Metrics: new MetricOptions(threshold, bridge),
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
                    }).ToArray(),
                    ["files"] = new[] { ResultLayout.Basis, ResultLayout.Seasons, ResultLayout.Stations, ResultLayout.Interpretation },
                });
            }
            else
            {
                env.Out.WriteLine(FormattableString.Invariant($"fit: {matrix.Rows} seasons ({b.TrainingSeasons} used for the basis, effective {b.EffectiveSeasons:0.#}), method {b.Method}{(options.Refine ? $", {result.Refinement.Length} EM iterations{(result.Converged ? string.Empty : " (not converged)")}" : string.Empty)}"));
                env.Out.WriteLine("  component  label     variance %  cumulative %  separable");
                for (var c = 0; c < b.K; c++)
                {
                    env.Out.WriteLine(FormattableString.Invariant($"  {c + 1,9}  {b.Labels[c],-8}  {100 * b.VarianceFraction[c],10:0.00}  {100 * b.CumulativeFraction[c],12:0.00}  {(b.SeparableFromNext[c] ? "yes" : "no")}"));
                }

                env.Out.WriteLine($"  wrote {ResultLayout.Basis}, {ResultLayout.Seasons}, {ResultLayout.Stations}, {ResultLayout.Interpretation} in {outDir}");
            }

            return ExitCodes.Done;
        });
        return cmd;
    }
}

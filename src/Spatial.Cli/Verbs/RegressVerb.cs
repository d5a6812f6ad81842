using System.CommandLine;
using System.Globalization;
using System.Text.Json.Nodes;
using Spatial.Core.IO;
using Spatial.Regression;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial regress</c>: least squares with inference and spatial diagnostics on any CSV table.</summary>
internal static class RegressVerb
{
    public static Command Create(CliEnv env)
    {
        var table = new Option<string?>("--table") { Description = "CSV table with a header row (comma separated, invariant numbers). Needs --response and --predictors." };
        var response = new Option<string?>("--response") { Description = "Response column (with --results: comma-separated responses; default the timing, duration and amount components and the main season metrics)." };
        var predictors = new Option<string?>("--predictors") { Description = "Predictor columns, comma separated (e.g. elevation_dem_m,coast_km; with --results default elevation_km,coast_10km,latitude)." };
        var results = new Option<string?>("--results") { Description = "Workflow shortcut: join RESULTS/stations.csv (fit) with RESULTS/covariates.csv and fit each response; writes RESULTS/regression/." };
        var grid = new Option<string?>("--grid") { Description = "With --results: DEM whose land cells get the covariates, the predictions and 95 % prediction intervals (GeoTIFFs, masked at sea)." };
        var gridCoast = new Option<string?>("--coast") { Description = "With --grid: coastline GeoJSON (land polygons mask the sea; distances for coast predictors), or 'world'." };
        var noIntercept = new Option<bool>("--no-intercept") { Description = "Fit without a constant term (R² is then the uncentred one)." };
        var weights = new Option<string?>("--weights") { Description = "Column of positive weights for weighted least squares." };
        var output = new Option<string?>("--out") { Description = "Results folder: files go to OUT/regression/ (regression.json, fitted.csv, local.csv) and OUT/manifest.json." };
        var coords = new Option<string?>("--coords") { Description = "Longitude and latitude columns (WGS 84 degrees), as LON,LAT. Default: longitude,latitude when the table has both." };
        var moranK = new Option<int>("--moran-k") { Description = "Neighbours per station for Moran's I of the residuals (k nearest, great-circle).", DefaultValueFactory = _ => 8 };
        var moranWeights = new Option<string>("--moran-weights") { Description = "Neighbour weights for Moran's I: knn or inverse-distance.", DefaultValueFactory = _ => "knn" };
        var permutations = new Option<int>("--permutations") { Description = "Random permutations for Moran's I p-value (fixed seed).", DefaultValueFactory = _ => 999 };
        var seed = new Option<int>("--seed") { Description = "Seed of the permutation test.", DefaultValueFactory = _ => 20261201 };
        var blockKm = new Option<double?>("--block-km") { Description = "Spatial block cross-validation with square blocks of this side, km." };
        var local = new Option<string?>("--local") { Description = "Local (geographically weighted) regression with a gaussian or bisquare kernel; bandwidth by AICc." };
        var adaptive = new Option<bool>("--adaptive") { Description = "With --local: bandwidth as a number of nearest neighbours instead of km." };
        var bandwidth = new Option<double?>("--bandwidth") { Description = "With --local: use this bandwidth (km, or neighbours with --adaptive) instead of searching." };

        var cmd = new Command("regress", "Fit a response against predictors of any table: coefficients with inference, diagnostics, Moran's I of residuals, block cross-validation, local regression.")
        {
            table, response, predictors, results, grid, gridCoast, noIntercept, weights, output, coords, moranK, moranWeights, permutations, seed, blockKm, local, adaptive, bandwidth,
        };

        cmd.SetAction(parse =>
        {
            var json = parse.GetValue(CliApp.Json);
            var resultsDir = parse.GetValue(results);
            var tablePath = parse.GetValue(table);
            if (resultsDir is null && (tablePath is null || parse.GetValue(response) is null || parse.GetValue(predictors) is null))
            {
                throw new UsageException("regress needs --table, --response and --predictors, or --results DIR");
            }

            if (resultsDir is not null && tablePath is not null)
            {
                throw new UsageException("give either --table or --results, not both");
            }

            if (resultsDir is null && (parse.GetValue(grid) is not null || parse.GetValue(gridCoast) is not null))
            {
                throw new UsageException("--grid and --coast go with --results");
            }

            var preds = parse.GetValue(predictors)?.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
            if (preds is { Length: 0 })
            {
                throw new UsageException("--predictors needs at least one column name");
            }

            (string, string)? coordColumns = null;
            if (parse.GetValue(coords) is { } c)
            {
                var parts = c.Split(',', StringSplitOptions.TrimEntries);
                if (parts.Length != 2 || parts.Any(p => p.Length == 0))
                {
                    throw new UsageException($"--coords expects LON,LAT column names, got '{c}'");
                }

                coordColumns = (parts[0], parts[1]);
            }

            var k = parse.GetValue(moranK);
            if (k < 1)
            {
                throw new UsageException($"--moran-k must be at least 1, got {k}");
            }

            var neighbours = parse.GetValue(moranWeights) switch
            {
                "knn" => MoranNeighbours.KNearest,
                "inverse-distance" => MoranNeighbours.InverseDistance,
                var other => throw new UsageException($"--moran-weights must be knn or inverse-distance, got '{other}'"),
            };
            var block = parse.GetValue(blockKm);
            if (block is { } b && !(b > 0))
            {
                throw new UsageException($"--block-km must be a positive number of km, got {b.ToString(CultureInfo.InvariantCulture)}");
            }

            GwrSpec? gwr = null;
            if (parse.GetValue(local) is { } kernelText)
            {
                var kernel = kernelText switch
                {
                    "gaussian" => GwrKernel.Gaussian,
                    "bisquare" => GwrKernel.Bisquare,
                    _ => throw new UsageException($"--local must be gaussian or bisquare, got '{kernelText}'"),
                };
                gwr = new GwrSpec(kernel, parse.GetValue(adaptive), parse.GetValue(bandwidth));
            }
            else if (parse.GetValue(adaptive) || parse.GetValue(bandwidth) is not null)
            {
                throw new UsageException("--adaptive and --bandwidth need --local gaussian|bisquare");
            }

            var perms = parse.GetValue(permutations);
            if (perms < 0)
            {
                throw new UsageException($"--permutations must be 0 or more, got {perms}");
            }

            var options = new RegressionOptions
            {
                Coordinates = coordColumns,
                MoranK = k,
                MoranNeighbours = neighbours,
                Permutations = perms,
                Seed = parse.GetValue(seed),
                BlockKm = block,
                Local = gwr,
            };
            if (resultsDir is not null)
            {
                return RunResults(env, json, resultsDir, parse.GetValue(response), preds, options, parse.GetValue(grid), parse.GetValue(gridCoast));
            }

            var spec = new ModelSpec(parse.GetValue(response)!, preds!, !parse.GetValue(noIntercept), parse.GetValue(weights));
            var data = Table.ReadCsv(tablePath!);
            var report = CliOutput.WithProgress(env, json, "regress", _ => RegressionRun.Fit(data, spec, options));

            var outDir = parse.GetValue(output);
            if (outDir is not null)
            {
                ResultFiles.Write(Path.Combine(outDir, ResultLayout.RegressionFolder), [report]);
                RunManifest.Record(outDir, "regress", [tablePath!], new Dictionary<string, string?>
                {
                    ["response"] = spec.Response,
                    ["predictors"] = string.Join(",", spec.Predictors),
                    ["intercept"] = spec.Intercept ? "true" : "false",
                    ["weights"] = spec.Weights,
                    ["coords"] = coordColumns is { } cc ? $"{cc.Item1},{cc.Item2}" : null,
                    ["moran_k"] = k.ToString(CultureInfo.InvariantCulture),
                    ["moran_weights"] = parse.GetValue(moranWeights),
                    ["permutations"] = perms.ToString(CultureInfo.InvariantCulture),
                    ["seed"] = options.Seed.ToString(CultureInfo.InvariantCulture),
                    ["block_km"] = block?.ToString("R", CultureInfo.InvariantCulture),
                    ["local"] = parse.GetValue(local),
                    ["adaptive"] = gwr is null ? null : (gwr.Adaptive ? "true" : "false"),
                    ["bandwidth"] = parse.GetValue(bandwidth)?.ToString("R", CultureInfo.InvariantCulture),
                });
            }

            if (json)
            {
                var doc = JsonNode.Parse(ResultFiles.Json([report]))!.AsObject();
                var summary = new JsonObject
                {
                    ["verb"] = "regress",
                    ["table"] = tablePath,
                    ["out"] = outDir is null ? null : Path.Combine(outDir, ResultLayout.RegressionFolder),
                    ["models"] = doc["models"]!.DeepClone(),
                };
                env.Out.WriteLine(summary.ToJsonString(CliOutput.JsonOptions));
            }
            else
            {
                RegressionText.Write(env.Out, report);
                if (outDir is not null)
                {
                    env.Out.WriteLine($"wrote {Path.Combine(outDir, ResultLayout.RegressionFolder)}");
                }
            }

            return ExitCodes.Done;
        });
        return cmd;
    }

    private static int RunResults(CliEnv env, bool json, string dir, string? responses, string[]? predictors, RegressionOptions options, string? grid, string? coast)
    {
        var chosen = responses?.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        var outcome = CliOutput.WithProgress(env, json, "regress", _ => Workflow.ResultsRegression.Run(dir, chosen, predictors, options, grid, coast));
        var inputs = new List<string> { Path.Combine(dir, ResultLayout.Stations), Path.Combine(dir, ResultLayout.Covariates) };
        if (grid is not null)
        {
            inputs.Add(grid);
        }

        if (coast is not null && coast != "world")
        {
            inputs.Add(coast);
        }

        RunManifest.Record(dir, "regress", inputs, new Dictionary<string, string?>
        {
            ["results"] = dir,
            ["responses"] = string.Join(",", outcome.Models.Select(m => m.Spec.Response)),
            ["predictors"] = string.Join(",", outcome.Models.Count > 0 ? outcome.Models[0].Spec.Predictors : []),
            ["moran_k"] = options.MoranK.ToString(CultureInfo.InvariantCulture),
            ["permutations"] = options.Permutations.ToString(CultureInfo.InvariantCulture),
            ["seed"] = options.Seed.ToString(CultureInfo.InvariantCulture),
            ["block_km"] = options.BlockKm?.ToString("R", CultureInfo.InvariantCulture),
            ["local"] = options.Local is null ? null : options.Local.Kernel == GwrKernel.Gaussian ? "gaussian" : "bisquare",
            ["grid"] = grid,
            ["coast"] = coast,
        });
        if (json)
        {
            var doc = JsonNode.Parse(ResultFiles.Json(outcome.Models))!.AsObject();
            var summary = new JsonObject
            {
                ["verb"] = "regress",
                ["table"] = outcome.TablePath,
                ["out"] = outcome.Folder,
                ["surfaces"] = new JsonArray(outcome.Surfaces.Select(x => (JsonNode)JsonValue.Create(x)!).ToArray()),
                ["models"] = doc["models"]!.DeepClone(),
            };
            env.Out.WriteLine(summary.ToJsonString(CliOutput.JsonOptions));
        }
        else
        {
            foreach (var model in outcome.Models)
            {
                RegressionText.Write(env.Out, model);
                env.Out.WriteLine();
            }

            env.Out.WriteLine($"wrote {outcome.Folder} ({outcome.Models.Count} models{(outcome.Surfaces.Count > 0 ? $", {outcome.Surfaces.Count} predicted-surface files" : string.Empty)}); joined table {outcome.TablePath}");
        }

        return ExitCodes.Done;
    }
}

/// <summary>The readable summary of a model printed by <c>regress</c>.</summary>
internal static class RegressionText
{
    private static string G(double v, int digits = 4) =>
        double.IsNaN(v) ? "-" : double.IsPositiveInfinity(v) ? "inf" : double.IsNegativeInfinity(v) ? "-inf" : v.ToString("G" + digits, CultureInfo.InvariantCulture);

    private static string P(double p) => double.IsNaN(p) ? "-" : p < 1e-4 ? "<1e-4" : p.ToString("F4", CultureInfo.InvariantCulture);

    public static void Write(TextWriter w, ModelReport r)
    {
        var f = r.Fit;
        w.WriteLine($"{r.Spec.Response} ~ {(r.Spec.Intercept ? "1 + " : string.Empty)}{string.Join(" + ", r.Spec.Predictors)}{(r.Spec.Weights is null ? string.Empty : $"   (weights: {r.Spec.Weights})")}");
        w.WriteLine(FormattableString.Invariant($"n = {f.N} (of {r.RowsRead} rows; {r.RowsDropped} dropped), residual df = {f.DfResidual}"));
        w.WriteLine();
        var header = new[] { "term", "estimate", "se", "t", "p", "95% low", "95% high", "se HC3", "std", "VIF" };
        var rows = f.Coefficients.Select(c => new[] { c.Name, G(c.Estimate, 6), G(c.StandardError), G(c.T), P(c.P), G(c.CiLow, 6), G(c.CiHigh, 6), G(c.StandardErrorHc3), G(c.Standardised, 3), G(c.Vif, 3) }).ToList();
        var widths = header.Select((h, i) => Math.Max(h.Length, rows.Count == 0 ? 0 : rows.Max(r2 => r2[i].Length))).ToArray();
        w.WriteLine(string.Join("  ", header.Select((h, i) => i == 0 ? h.PadRight(widths[i]) : h.PadLeft(widths[i]))));
        foreach (var row in rows)
        {
            w.WriteLine(string.Join("  ", row.Select((s, i) => i == 0 ? s.PadRight(widths[i]) : s.PadLeft(widths[i]))));
        }

        w.WriteLine();
        w.WriteLine($"residual se {G(f.Sigma)}   R² {G(f.RSquared, 5)}{(f.HasIntercept ? string.Empty : " (uncentred)")}   adjusted R² {G(f.AdjustedRSquared, 5)}   F {G(f.F)} (p {P(f.FP)})");
        w.WriteLine($"AIC {G(f.Aic, 6)}   BIC {G(f.Bic, 6)}   condition number {G(f.ConditionNumber)}   Breusch–Pagan (Koenker) {G(f.BreuschPagan.Statistic)} on {f.BreuschPagan.Df} df (p {P(f.BreuschPagan.P)})");
        if (r.Influential.Count > 0)
        {
            w.WriteLine("most influential: " + string.Join(", ", r.Influential.Select(i => $"{i.Station} (Cook {G(i.CooksDistance, 3)}, leverage {G(i.Leverage, 3)})")));
        }

        if (r.Moran is { } m)
        {
            w.WriteLine($"Moran's I of residuals ({m.Weights}): {G(m.I)} (expected {G(m.Expected)}), z {G(m.ZRandomisation, 3)} under randomisation, permutation p {(m.Permutations > 0 ? G(m.PPermutation, 3) : "-")} ({m.Permutations} permutations)");
        }

        if (r.BlockCv is { } b)
        {
            w.WriteLine($"block cross-validation ({G(b.BlockKm)} km, {b.Blocks} blocks): RMSE {G(b.RmseInSample)} in sample, {G(b.RmseOutOfBlock)} out of block; R² {G(b.R2InSample, 4)} in sample, {G(b.R2OutOfBlock, 4)} out of block");
        }

        if (r.Local is { } l)
        {
            var unit = l.Adaptive ? "neighbours" : "km";
            w.WriteLine($"local regression ({(l.Kernel == GwrKernel.Gaussian ? "gaussian" : "bisquare")}, bandwidth {G(l.Bandwidth, 5)} {unit}): AICc {G(l.Aicc, 6)}, effective parameters {G(l.TraceS, 4)}, local R² median {G(Median(l.LocalR2), 3)}");
        }

        foreach (var note in r.Notes)
        {
            w.WriteLine($"note: {note}");
        }
    }

    private static double Median(double[] v)
    {
        var s = v.Where(x => !double.IsNaN(x)).Order().ToArray();
        return s.Length == 0 ? double.NaN : s.Length % 2 == 1 ? s[s.Length / 2] : 0.5 * (s[(s.Length / 2) - 1] + s[s.Length / 2]);
    }
}

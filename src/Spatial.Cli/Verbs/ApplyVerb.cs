using System.CommandLine;
using System.Globalization;
using Spatial.Fitting;
using Spatial.Records;

namespace Spatial.Cli.Verbs;

/// <summary>
/// <c>spatial apply BASIS RECORDS --out DIR</c>: projects new seasons — daily records (CSV or .csv.gz, with
/// <c>--stations</c>) imported with the basis's own season start, or a season matrix from <c>import</c> — onto a
/// saved basis and scores them against its training seasons.
/// </summary>
internal static class ApplyVerb
{
    public static Command Create(CliEnv env)
    {
        var basisArg = new Argument<string>("BASIS") { Description = "basis.json written by 'spatial fit'." };
        var matrixArg = new Argument<string>("RECORDS") { Description = "New daily records (CSV or .csv.gz, as for 'spatial import'; needs --stations), or a season matrix (matrix.parquet from 'spatial import')." };
        var stationsOpt = new Option<string?>("--stations") { Description = "Station list of the new records (needed when RECORDS are daily records)." };
        var unitOpt = new Option<string>("--unit") { Description = "Depth unit of the records file: mm, cm, m or in.", DefaultValueFactory = _ => "mm" };
        var minDaysOpt = new Option<int>("--min-days") { Description = "Seasons with fewer observed days are marked (they are still projected).", DefaultValueFactory = _ => 250 };
        var outOpt = new Option<string>("--out") { Description = "Folder for anomalies.csv.", Required = true };
        var ridgeOpt = new Option<double>("--ridge") { Description = "Ridge term for the per-season least squares (fraction of the mean diagonal).", DefaultValueFactory = _ => 0.0 };
        var cmd = new Command("apply", "Project new seasons onto a saved basis: coefficients, residuals, metrics, z-scores and percentiles against the basis's training seasons.")
        {
            basisArg, matrixArg, stationsOpt, unitOpt, minDaysOpt, outOpt, ridgeOpt,
        };
        cmd.SetAction(parseResult =>
        {
            var basisPath = parseResult.GetValue(basisArg)!;
            var matrixPath = parseResult.GetValue(matrixArg)!;
            var outDir = parseResult.GetValue(outOpt)!;
            var ridge = parseResult.GetValue(ridgeOpt);
            if (!(ridge >= 0))
            {
                throw new UsageException("--ridge must not be negative.");
            }

            var basis = BasisFile.Read(basisPath);
            var inputs = new List<string> { basisPath, matrixPath };
            Spatial.Core.SeasonMatrix matrix;
            if (matrixPath.EndsWith(".parquet", StringComparison.OrdinalIgnoreCase))
            {
                matrix = SeasonMatrixFile.Read(matrixPath);
            }
            else
            {
                var stations = parseResult.GetValue(stationsOpt) ?? throw new UsageException("daily records need --stations S.csv (or give a matrix.parquet from 'spatial import')");
                if (!Spatial.Core.DepthUnits.TryParse(parseResult.GetValue(unitOpt), out var unit))
                {
                    throw new UsageException($"--unit must be mm, cm, m or in; got '{parseResult.GetValue(unitOpt)}'");
                }

                var calendar = Spatial.Core.SeasonCalendar.TryParse(basis.SeasonStart)
                    ?? throw new Spatial.Core.SpatialDataException(basisPath, 0, $"the basis's season start '{basis.SeasonStart}' is not MM-DD", "write the basis again with 'spatial fit'");
                var imported = CliOutput.WithProgress(env, parseResult.GetValue(CliApp.Json), "import", p => RecordsImport.Run(
                    new ImportOptions(matrixPath, stations) { StationCrsToWgs84 = Workflow.StationCrs.ToWgs84, Calendar = calendar, Unit = unit, MinDays = parseResult.GetValue(minDaysOpt) }, p, env.Cancel));
                matrix = imported.Matrix;
                inputs.Add(stations);
            }

            var result = SeasonalFit.Apply(basis, matrix, new ApplyOptions(Ridge: ridge));
            FitFiles.WriteApply(outDir, result);
            RunManifest.Record(outDir, "apply", inputs, new Dictionary<string, string?>
            {
                ["ridge"] = ridge.ToString("R", CultureInfo.InvariantCulture),
            });
            if (parseResult.GetValue(CliApp.Json))
            {
                CliOutput.WriteJson(env, new Dictionary<string, object?>
                {
                    ["verb"] = "apply",
                    ["out"] = outDir,
                    ["seasons"] = matrix.Rows,
                    ["components"] = basis.K,
                    ["labels"] = basis.Labels,
                    ["files"] = new[] { FitFiles.Anomalies },
                });
            }
            else
            {
                env.Out.WriteLine($"apply: {matrix.Rows} seasons projected onto {basis.K} components; wrote {FitFiles.Anomalies} in {outDir}");
            }

            return ExitCodes.Done;
        });
        return cmd;
    }
}

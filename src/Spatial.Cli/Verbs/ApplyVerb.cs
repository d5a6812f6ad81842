using System.CommandLine;
using System.Globalization;
using Spatial.Fitting;
using Spatial.Records;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial apply BASIS MATRIX --out DIR</c>: projects new seasons onto a saved basis and scores them against its training seasons.</summary>
internal static class ApplyVerb
{
    public static Command Create(CliEnv env)
    {
        var basisArg = new Argument<string>("BASIS") { Description = "basis.json written by 'spatial fit'." };
        var matrixArg = new Argument<string>("MATRIX") { Description = "Season matrix of the new records (matrix.parquet from 'spatial import')." };
        var outOpt = new Option<string>("--out") { Description = "Folder for anomalies.csv.", Required = true };
        var ridgeOpt = new Option<double>("--ridge") { Description = "Ridge term for the per-season least squares (fraction of the mean diagonal).", DefaultValueFactory = _ => 0.0 };
        var cmd = new Command("apply", "Project new seasons onto a saved basis: coefficients, residuals, metrics, z-scores and percentiles against the basis's training seasons.")
        {
            basisArg, matrixArg, outOpt, ridgeOpt,
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
            var matrix = SeasonMatrixFile.Read(matrixPath);
            var result = SeasonalFit.Apply(basis, matrix, new ApplyOptions(Ridge: ridge));
            FitFiles.WriteApply(outDir, result);
            RunManifest.Record(outDir, "apply", [basisPath, matrixPath], new Dictionary<string, string?>
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

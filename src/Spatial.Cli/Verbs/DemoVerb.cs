using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using Spatial.Core.IO;

namespace Spatial.Cli.Verbs;

/// <summary>
/// <c>spatial demo</c>: writes the invented region Marrowfell and runs the whole pipeline on it — import, fit,
/// covariates, regress (with predicted surfaces), export and report — then prints where everything is and
/// the command that opens the map page. Each step is the same verb a user would run, so the demo shows
/// exactly what the tool does.
/// </summary>
internal static class DemoVerb
{
    public static Command Create(CliEnv env)
    {
        var outDir = new Option<string>("--out") { Description = "Folder for the demo: region/ (the invented inputs) and results/ (everything computed).", DefaultValueFactory = _ => "demo-out" };
        var seed = new Option<int>("--seed") { Description = "Seed of the region's stations, weather and faults.", DefaultValueFactory = _ => 1 };
        var stations = new Option<int>("--stations") { Description = "Number of stations.", DefaultValueFactory = _ => 150 };
        var seasons = new Option<int>("--seasons") { Description = "Number of seasons ending with 2024.", DefaultValueFactory = _ => 45 };
        var command = new Command("demo", "Build the invented demo region and run the whole job on it: import, fit, covariates, regress, export, report; prints the paths and how to open the map page.")
        {
            outDir, seed, stations, seasons,
        };
        command.SetAction(parse =>
        {
            var json = parse.GetValue(CliApp.Json);
            var root = parse.GetValue(outDir)!;
            var region = Path.Combine(root, "region");
            var results = Path.Combine(root, "results");
            var n = parse.GetValue(stations);
            var s = parse.GetValue(seasons);
            var steps = new List<(string Step, double Seconds)>();
            var inv = CultureInfo.InvariantCulture;
            var records = Path.Combine(region, "records.csv.gz");
            var stationList = Path.Combine(region, "stations.csv");
            var dem = Path.Combine(region, "dem.tif");
            var coast = Path.Combine(region, "coastline.geojson");
            string[][] plan =
            [
                ["scenario", "--out", region, "--seed", parse.GetValue(seed).ToString(inv), "--stations", n.ToString(inv), "--seasons", s.ToString(inv)],
                ["import", "--records", records, "--stations", stationList, "--out", results],
                ["fit", Path.Combine(results, ResultLayout.SeasonMatrix), "--out", results, "--refine"],
                ["covariates", "--stations", stationList, "--dem", dem, "--coast", coast, "--out", Path.Combine(results, ResultLayout.Covariates)],
                ["regress", "--results", results, "--grid", dem, "--coast", coast, "--block-km", "20", "--local", "bisquare", "--adaptive"],
                ["export", results, "--coast", coast, "--dem", dem],
                ["report", results, "--coast", coast, "--dem", dem],
            ];
            foreach (var args in plan)
            {
                if (!json)
                {
                    env.Err.WriteLine($"demo: spatial {string.Join(' ', args)}");
                }

                using var stepOut = new StringWriter();
                using var stepErr = new StringWriter();
                var clock = Stopwatch.StartNew();
                var code = CliApp.Run(args, env with { Out = stepOut, Err = stepErr });
                steps.Add((args[0], clock.Elapsed.TotalSeconds));
                if (code != ExitCodes.Done)
                {
                    env.Err.Write(stepErr.ToString());
                    env.Err.WriteLine($"spatial: demo stopped at step '{args[0]}' (exit {code}).");
                    return code;
                }

                if (!json)
                {
                    env.Out.Write(stepOut.ToString());
                }
            }

            var report = Path.Combine(results, ResultLayout.Report);
            var layers = Path.Combine(results, ResultLayout.LayersFolder);
            if (json)
            {
                CliOutput.WriteJson(env, new
                {
                    region,
                    results,
                    report,
                    layers,
                    view_command = $"spatial view {results}",
                    steps = steps.Select(x => new { step = x.Step, seconds = Math.Round(x.Seconds, 2) }).ToArray(),
                });
            }
            else
            {
                env.Out.WriteLine();
                env.Out.WriteLine($"demo done in {steps.Sum(x => x.Seconds).ToString("F1", inv)} s");
                env.Out.WriteLine($"  region (invented inputs): {region}");
                env.Out.WriteLine($"  results:                  {results}");
                env.Out.WriteLine($"  report:                   {report}");
                env.Out.WriteLine($"  GIS layers:               {layers}");
                env.Out.WriteLine($"  open the map page:        dotnet run --project src/Spatial.Cli -c Release -- view {results}");
                env.Out.WriteLine("Results support, and do not replace, the judgement of qualified hydrologists and avalanche professionals; defer to local codes and practice.");
            }

            return ExitCodes.Done;
        });
        return command;
    }
}

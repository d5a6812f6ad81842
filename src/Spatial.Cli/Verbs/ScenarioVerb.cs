using System.CommandLine;
using System.Globalization;
using Spatial.Scenario;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial scenario --out DIR [--seed N] [--stations N] [--seasons N]</c>: writes the invented Marrowfell region.</summary>
internal static class ScenarioVerb
{
    public static Command Create(CliEnv env)
    {
        var outOption = new Option<string>("--out") { Description = "Folder to write the region into (created when needed).", Required = true };
        var seedOption = new Option<int>("--seed") { Description = "Seed of the stations, weather and faults (the island is fixed).", DefaultValueFactory = _ => ScenarioOptions.Default.Seed };
        var stationsOption = new Option<int>("--stations") { Description = $"Number of stations (1–{ScenarioOptions.MaxStations}).", DefaultValueFactory = _ => ScenarioOptions.Default.Stations };
        var seasonsOption = new Option<int>("--seasons") { Description = $"Number of seasons ending with {ScenarioOptions.Default.LastSeason} (2–{ScenarioOptions.MaxSeasons}).", DefaultValueFactory = _ => ScenarioOptions.Default.Seasons };
        var threadsOption = new Option<int?>("--threads") { Description = "Most threads to use (default: all cores); the output does not depend on it." };

        var cmd = new Command("scenario", "Write the invented demo region Marrowfell: DEM, coastline, stations, daily snow records with faults, and ground truth.");
        cmd.Options.Add(outOption);
        cmd.Options.Add(seedOption);
        cmd.Options.Add(stationsOption);
        cmd.Options.Add(seasonsOption);
        cmd.Options.Add(threadsOption);
        cmd.SetAction(parseResult =>
        {
            var folder = parseResult.GetValue(outOption)!;
            var options = new ScenarioOptions(
                Seed: parseResult.GetValue(seedOption),
                Stations: parseResult.GetValue(stationsOption),
                Seasons: parseResult.GetValue(seasonsOption),
                MaxThreads: parseResult.GetValue(threadsOption));
            Check(options.Stations is >= 1 and <= ScenarioOptions.MaxStations, $"--stations must be 1–{ScenarioOptions.MaxStations}; got {options.Stations}.");
            Check(options.Seasons is >= 2 and <= ScenarioOptions.MaxSeasons, $"--seasons must be 2–{ScenarioOptions.MaxSeasons}; got {options.Seasons}.");
            Check(options.MaxThreads is null or >= 1, $"--threads must be at least 1; got {options.MaxThreads}.");
            Check(!File.Exists(folder), $"--out names a file, not a folder: {folder}.");

            var json = parseResult.GetValue(CliApp.Json);
            var started = DateTime.UtcNow;
            var paths = CliOutput.WithProgress(env, json, "scenario", progress =>
            {
                var scenario = MarrowfellScenario.Generate(options, progress);
                return ScenarioFiles.Write(folder, scenario);
            });
            RunManifest.Record(folder, "scenario", [], new Dictionary<string, string?>
            {
                ["seed"] = options.Seed.ToString(CultureInfo.InvariantCulture),
                ["stations"] = options.Stations.ToString(CultureInfo.InvariantCulture),
                ["seasons"] = options.Seasons.ToString(CultureInfo.InvariantCulture),
                ["last_season"] = options.LastSeason.ToString(CultureInfo.InvariantCulture),
            });
            var seconds = (DateTime.UtcNow - started).TotalSeconds;
            var files = paths.Select(p => new ScenarioFileSummary(Path.GetFileName(p), new FileInfo(p).Length)).ToArray();
            if (json)
            {
                CliOutput.WriteJson(env, new ScenarioSummary(folder, options.Seed, options.Stations, options.Seasons, options.FirstSeason, options.LastSeason, files));
            }
            else
            {
                env.Out.WriteLine(FormattableString.Invariant($"Marrowfell (invented): {options.Stations} stations, seasons {options.FirstSeason}–{options.LastSeason}, seed {options.Seed}, in {seconds:F1} s:"));
                foreach (var f in files)
                {
                    env.Out.WriteLine(FormattableString.Invariant($"  {Path.Combine(folder, f.File)}  ({f.Bytes / 1024.0:F0} KiB)"));
                }
            }

            return ExitCodes.Done;
        });
        return cmd;
    }

    private static void Check(bool ok, string message)
    {
        if (!ok)
        {
            throw new UsageException(message);
        }
    }

    private sealed record ScenarioFileSummary(string File, long Bytes);

    private sealed record ScenarioSummary(string Folder, int Seed, int Stations, int Seasons, int FirstSeason, int LastSeason, IReadOnlyList<ScenarioFileSummary> Files);
}

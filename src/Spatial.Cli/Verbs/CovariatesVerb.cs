using System.CommandLine;
using System.Globalization;
using System.Text.Json.Nodes;
using Spatial.Core;
using Spatial.Records;
using Spatial.Terrain;
using Spatial.Terrain.Coast;
using Spatial.Terrain.Crs;
using Spatial.Terrain.Rasters;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial covariates</c>: stations + DEM + coast → covariates.csv.</summary>
internal static class CovariatesVerb
{
    public static Command Create(CliEnv env)
    {
        var stations = new Option<string>("--stations") { Description = "Station list: CSV with station,name,longitude,latitude[,elevation_m] (WGS 84 degrees).", Required = true };
        var dem = new Option<string?>("--dem") { Description = "Elevation model: GeoTIFF (.tif; float32, int16 or uint16) or ASCII grid (.asc with a .prj beside it). Without it the DEM columns stay empty." };
        var demCrs = new Option<string?>("--dem-crs") { Description = "The DEM's coordinate system when the file does not say it: EPSG:4326, EPSG:326zz/327zz (UTM), a WKT string or a .prj file." };
        var coast = new Option<string>("--coast") { Description = "Coast: a GeoJSON file (WGS 84; polygons = land, so distances are signed), 'world' for the built-in Natural Earth 1:10m coast, or 'none'.", DefaultValueFactory = _ => "world" };
        var output = new Option<string>("--out") { Description = "The covariate table to write (CSV); manifest.json goes beside it.", Required = true };
        var threshold = new Option<double>("--elevation-threshold-m") { Description = "Flag a station whose listed elevation differs from the DEM's by more than this many metres.", DefaultValueFactory = _ => 100 };

        var cmd = new Command("covariates", "Terrain and geography per station: DEM elevation (bilinear), Horn slope and aspect, local relief, geodesic distance and direction to the coast.")
        {
            stations, dem, demCrs, coast, output, threshold,
        };

        cmd.SetAction(parse =>
        {
            var json = parse.GetValue(CliApp.Json);
            var stationsPath = parse.GetValue(stations)!;
            var demPath = parse.GetValue(dem);
            var demCrsText = parse.GetValue(demCrs);
            var coastText = parse.GetValue(coast) ?? "world";
            var outPath = parse.GetValue(output)!;
            var thresholdM = parse.GetValue(threshold);
            if (!(thresholdM >= 0) || double.IsInfinity(thresholdM))
            {
                throw new UsageException($"--elevation-threshold-m {thresholdM.ToString(CultureInfo.InvariantCulture)} must be a non-negative number of metres.");
            }

            if (Directory.Exists(outPath))
            {
                throw new UsageException($"--out '{outPath}' is a folder; give the file to write, e.g. {Path.Combine(outPath, Core.IO.ResultLayout.Covariates)}.");
            }

            if (demCrsText is not null && demPath is null)
            {
                throw new UsageException("--dem-crs needs --dem.");
            }

            var list = StationListFile.Read(stationsPath, Workflow.StationCrs.ToWgs84);
            CrsDefinition? crs = demCrsText is null ? null : CrsDefinitions.Parse(demCrsText, "--dem-crs");
            var grid = demPath is null ? null : DemFile.Read(demPath, crs);
            CoastGeometry? coastGeometry = coastText.ToLowerInvariant() switch
            {
                "world" => CoastGeometry.World,
                "none" => null,
                _ => CoastGeometry.FromGeoJson(coastText),
            };

            var table = CliOutput.WithProgress(env, json, "covariates", _ => Covariates.Compute(list.Stations, new CovariateOptions
            {
                Dem = grid,
                DemName = demPath ?? "DEM",
                Coast = coastGeometry,
                ElevationThresholdM = thresholdM,
            }));
            table.Write(outPath);
            var folder = Path.GetDirectoryName(Path.GetFullPath(outPath)) ?? ".";
            var inputs = new List<string> { stationsPath };
            if (demPath is not null)
            {
                inputs.Add(demPath);
            }

            if (coastGeometry is not null && coastText != "world")
            {
                inputs.Add(coastText);
            }

            RunManifest.Record(folder, "covariates", inputs, new Dictionary<string, string?>
            {
                ["stations"] = stationsPath,
                ["dem"] = demPath,
                ["dem_crs"] = grid?.Crs.ToString(),
                ["coast"] = coastText,
                ["out"] = outPath,
                ["elevation_threshold_m"] = thresholdM.ToString("R", CultureInfo.InvariantCulture),
            });

            var warnings = list.Warnings.Concat(table.Warnings).ToList();
            var flagged = table.Rows.Count(r => r.ElevationFlag == true);
            var withDem = table.Rows.Count(r => !double.IsNaN(r.ElevationDemM));
            if (json)
            {
                var summary = new JsonObject
                {
                    ["verb"] = "covariates",
                    ["out"] = outPath,
                    ["stations"] = table.Rows.Count,
                    ["with_dem_elevation"] = withDem,
                    ["elevation_flagged"] = flagged,
                    ["coast"] = coastText,
                    ["warnings"] = new JsonArray([.. warnings.Select(w => (JsonNode?)JsonValue.Create(w.ToString()))]),
                };
                env.Out.WriteLine(summary.ToJsonString(CliOutput.JsonOptions));
            }
            else
            {
                foreach (var w in warnings.Take(10))
                {
                    env.Err.WriteLine($"spatial: warning: {w}");
                }

                if (warnings.Count > 10)
                {
                    env.Err.WriteLine($"spatial: … and {warnings.Count - 10} more warnings (see --json).");
                }

                env.Out.WriteLine($"covariates: {table.Rows.Count} stations ({withDem} with a DEM elevation, {flagged} flagged above {thresholdM.ToString("R", CultureInfo.InvariantCulture)} m) → {outPath}");
            }

            return ExitCodes.Done;
        });
        return cmd;
    }
}

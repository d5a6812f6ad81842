using System.CommandLine;
using System.Globalization;
using System.Text.Json.Nodes;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Records;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial import</c>: daily records + station list → season matrix, station list, quality report.</summary>
internal static class ImportVerb
{
    public static Command Create(CliEnv env)
    {
        var records = new Option<string>("--records") { Description = "Daily records: CSV (comma, semicolon or tab), plain or .csv.gz; columns station,date,depth[,unit][,flag][,element].", Required = true };
        var stations = new Option<string>("--stations") { Description = "Station list: CSV with station,name,longitude,latitude[,elevation_m][,crs] (WGS 84 degrees).", Required = true };
        var output = new Option<string>("--out") { Description = "Results folder (created): matrix.parquet, station_list.csv, quality.json, quality.txt, manifest.json.", Required = true };
        var seasonStart = new Option<string>("--season-start") { Description = "First day of the season, MM-DD (03-01 for a southern-hemisphere network).", DefaultValueFactory = _ => "09-01" };
        var minDays = new Option<int>("--min-days") { Description = "Seasons with fewer observed days are kept but marked below_min_days (0-365).", DefaultValueFactory = _ => 250 };
        var unit = new Option<string>("--unit") { Description = "Unit of depths whose row gives none: mm, cm, m or in (1 in = 25.4 mm).", DefaultValueFactory = _ => "mm" };
        var stationColumn = new Option<string>("--station-column") { Description = "Name of the station id column.", DefaultValueFactory = _ => "station" };
        var dateColumn = new Option<string>("--date-column") { Description = "Name of the date column (YYYY-MM-DD).", DefaultValueFactory = _ => "date" };
        var depthColumn = new Option<string>("--depth-column") { Description = "Name of the snow depth column.", DefaultValueFactory = _ => "depth" };
        var unitColumn = new Option<string>("--unit-column") { Description = "Name of the optional per-row unit column.", DefaultValueFactory = _ => "unit" };
        var flagColumn = new Option<string>("--flag-column") { Description = "Name of the optional quality-flag column.", DefaultValueFactory = _ => "flag" };
        var elementColumn = new Option<string>("--element-column") { Description = "Name of the optional measured-element column.", DefaultValueFactory = _ => "element" };
        var element = new Option<string?>("--element") { Description = "Element value meaning snow depth (default: snow_depth, snowdepth, depth, hs or sd, any case)." };
        var badFlags = new Option<string?>("--bad-flags") { Description = "Comma-separated quality flags whose rows are dropped and counted, e.g. X,S." };
        var maxDepth = new Option<double>("--max-depth-mm") { Description = "Depths above this many millimetres are implausible and removed.", DefaultValueFactory = _ => 10_000 };
        var spike = new Option<double>("--spike-mm") { Description = "A single day more than this many millimetres above both neighbours is a spike and removed.", DefaultValueFactory = _ => 500 };
        var flatDays = new Option<int>("--flat-days") { Description = "This many or more consecutive days with one non-zero depth are a stuck sensor and removed.", DefaultValueFactory = _ => 30 };
        var maxUnparseable = new Option<double>("--max-unparseable-percent") { Description = "Rows whose depth is not a number are dropped while at most this percentage of rows; above it the import fails.", DefaultValueFactory = _ => 1.0 };

        var cmd = new Command("import", "Read daily snow-depth records and a station list; check them; write the season matrix and a quality report.")
        {
            records, stations, output, seasonStart, minDays, unit,
            stationColumn, dateColumn, depthColumn, unitColumn, flagColumn, elementColumn, element, badFlags,
            maxDepth, spike, flatDays, maxUnparseable,
        };

        cmd.SetAction(parse =>
        {
            var json = parse.GetValue(CliApp.Json);
            var recordsPath = parse.GetValue(records)!;
            var stationsPath = parse.GetValue(stations)!;
            var outDir = parse.GetValue(output)!;
            var calendar = SeasonCalendar.TryParse(parse.GetValue(seasonStart))
                ?? throw new UsageException($"--season-start '{parse.GetValue(seasonStart)}' is not a day of the year as MM-DD (29 February is not allowed), e.g. 09-01 or 03-01.");
            if (!DepthUnits.TryParse(parse.GetValue(unit), out var depthUnit))
            {
                throw new UsageException($"--unit '{parse.GetValue(unit)}' is not one of mm, cm, m, in.");
            }

            if (File.Exists(outDir))
            {
                throw new UsageException($"--out '{outDir}' is a file; give a folder.");
            }

            var flags = (parse.GetValue(badFlags) ?? string.Empty).Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
            var options = new ImportOptions(recordsPath, stationsPath)
            {
                StationCrsToWgs84 = Workflow.StationCrs.ToWgs84,
                Calendar = calendar,
                MinDays = parse.GetValue(minDays),
                Unit = depthUnit,
                Columns = new RecordColumns(parse.GetValue(stationColumn)!, parse.GetValue(dateColumn)!, parse.GetValue(depthColumn)!, parse.GetValue(unitColumn)!, parse.GetValue(flagColumn)!, parse.GetValue(elementColumn)!),
                Element = parse.GetValue(element),
                BadFlags = flags,
                MaxDepthMm = parse.GetValue(maxDepth),
                SpikeJumpMm = parse.GetValue(spike),
                FlatlineDays = parse.GetValue(flatDays),
                MaxUnparseablePercent = parse.GetValue(maxUnparseable),
            };
            try
            {
                options.Validate();
            }
            catch (ArgumentOutOfRangeException e)
            {
                throw new UsageException(OptionMessage(e));
            }

            var result = CliOutput.WithProgress(env, json, "import", p => RecordsImport.Run(options, p, env.Cancel));
            RecordsImport.WriteResults(outDir, result);
            var q = result.Quality;
            RunManifest.Record(outDir, "import", [recordsPath, stationsPath], new Dictionary<string, string?>
            {
                ["records"] = recordsPath,
                ["stations"] = stationsPath,
                ["season_start"] = calendar.StartText,
                ["min_days"] = options.MinDays.ToString(CultureInfo.InvariantCulture),
                ["unit"] = DepthUnits.Symbol(depthUnit),
                ["columns"] = $"{options.Columns.Station},{options.Columns.Date},{options.Columns.Depth},{options.Columns.Unit},{options.Columns.Flag},{options.Columns.Element}",
                ["element"] = options.Element,
                ["bad_flags"] = string.Join(",", flags),
                ["max_depth_mm"] = options.MaxDepthMm.ToString("R", CultureInfo.InvariantCulture),
                ["spike_mm"] = options.SpikeJumpMm.ToString("R", CultureInfo.InvariantCulture),
                ["flat_days"] = options.FlatlineDays.ToString(CultureInfo.InvariantCulture),
                ["max_unparseable_percent"] = options.MaxUnparseablePercent.ToString("R", CultureInfo.InvariantCulture),
            });

            if (json)
            {
                var counts = JsonNode.Parse(q.ToJson())!["counts"]!.DeepClone();
                var summary = new JsonObject
                {
                    ["verb"] = "import",
                    ["out"] = outDir,
                    ["matrix"] = Path.Combine(outDir, ResultLayout.SeasonMatrix),
                    ["counts"] = counts,
                    ["warnings"] = new JsonArray([.. q.Warnings.Select(w => (JsonNode?)JsonValue.Create(w.ToString()))]),
                };
                env.Out.WriteLine(summary.ToJsonString(new System.Text.Json.JsonSerializerOptions(CliOutput.JsonOptions) { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping }));
            }
            else
            {
                foreach (var w in q.Warnings.Take(10))
                {
                    env.Err.WriteLine($"spatial: warning: {w}");
                }

                env.Out.WriteLine(FormattableString.Invariant(
                    $"imported {q.RowsKept} of {q.RowsRead} rows: {q.Stations} stations, {q.Seasons} station-seasons ({q.SeasonsBelowMinDays} below {options.MinDays} observed days); {q.RemovedTotal} rows removed, {q.DuplicatesMerged} duplicates merged. Details: {Path.Combine(outDir, ResultLayout.QualityText)}"));
            }

            return ExitCodes.Done;
        });
        return cmd;
    }

    private static string OptionMessage(ArgumentOutOfRangeException e) => e.ParamName switch
    {
        nameof(ImportOptions.MinDays) => "--min-days must be 0-365.",
        nameof(ImportOptions.MaxDepthMm) => "--max-depth-mm must be a positive number.",
        nameof(ImportOptions.SpikeJumpMm) => "--spike-mm must be a positive number.",
        nameof(ImportOptions.FlatlineDays) => "--flat-days must be 2 or more.",
        nameof(ImportOptions.MaxUnparseablePercent) => "--max-unparseable-percent must be 0-100.",
        _ => e.Message,
    };
}

using System.CommandLine;
using Spatial.Core.IO;
using Spatial.Output;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial export RESULTS_DIR [--out DIR] [--format geojson,gpkg,csv] [--precision 6] [--coast FILE]</c>.</summary>
internal static class ExportVerb
{
    public static Command Create(CliEnv env)
    {
        var results = new Argument<string>("results") { Description = "Results folder written by import, fit, covariates and regress." };
        var output = new Option<string?>("--out") { Description = "Folder for the layers (default: RESULTS/layers)." };
        var format = new Option<string>("--format") { Description = "Comma-separated formats: geojson, gpkg, csv (default: all three).", DefaultValueFactory = _ => "geojson,gpkg,csv" };
        var precision = new Option<int>("--precision") { Description = "Decimals of GeoJSON coordinates, 0–15 (default 6, about 0.1 m).", DefaultValueFactory = _ => 6 };
        var coast = new Option<string?>("--coast") { Description = "Coastline GeoJSON (WGS 84) to export instead of the one in the results folder." };
        var cmd = new Command("export", "Export results as GIS layers: stations, seasons, coastline and surface footprints as GeoJSON (RFC 7946), one GeoPackage and CSV.");
        cmd.Arguments.Add(results);
        cmd.Options.Add(output);
        cmd.Options.Add(format);
        cmd.Options.Add(precision);
        cmd.Options.Add(coast);
        cmd.SetAction(parseResult =>
        {
            var dir = parseResult.GetValue(results)!;
            var outDir = parseResult.GetValue(output) ?? Path.Combine(dir, ResultLayout.LayersFolder);
            var formats = ParseFormats(parseResult.GetValue(format) ?? string.Empty);
            var digits = parseResult.GetValue(precision);
            if (digits is < 0 or > 15)
            {
                throw new UsageException($"--precision must be 0–15 decimals; got {digits}.");
            }

            var coastPath = parseResult.GetValue(coast);
            if (coastPath is not null && !File.Exists(coastPath))
            {
                throw new Core.SpatialDataException(coastPath, 0, "the coastline file does not exist", "give a GeoJSON file of coastline lines or land polygons");
            }

            var json = parseResult.GetValue(CliApp.Json);
            var folder = ResultsFolder.Open(dir);
            var result = CliOutput.WithProgress(env, json, "export", _ => LayerExport.Write(folder, new ExportOptions(outDir, formats, digits, coastPath)));
            RunManifest.Record(dir, "export", ReadInputs(dir, coastPath), new Dictionary<string, string?>
            {
                ["out"] = outDir,
                ["format"] = parseResult.GetValue(format),
                ["precision"] = digits.ToString(System.Globalization.CultureInfo.InvariantCulture),
                ["coast"] = coastPath,
            });
            if (json)
            {
                CliOutput.WriteJson(env, new ExportSummary(outDir, result.Files, result.FeatureCounts, result.Notes));
            }
            else
            {
                foreach (var (layer, count) in result.FeatureCounts)
                {
                    env.Out.WriteLine($"{layer}: {count} features");
                }

                env.Out.WriteLine($"wrote {result.Files.Count} files to {outDir}");
                foreach (var note in result.Notes)
                {
                    env.Err.WriteLine($"note: {note}");
                }
            }

            return ExitCodes.Done;
        });
        return cmd;
    }

    /// <summary>Parses "geojson,gpkg,csv" (any order, "all" for every format).</summary>
    internal static LayerFormats ParseFormats(string text)
    {
        var formats = LayerFormats.None;
        foreach (var part in text.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
        {
            formats |= part.ToUpperInvariant() switch
            {
                "GEOJSON" => LayerFormats.GeoJson,
                "GPKG" or "GEOPACKAGE" => LayerFormats.GeoPackage,
                "CSV" => LayerFormats.Csv,
                "ALL" => LayerFormats.All,
                _ => throw new UsageException($"--format: unknown format '{part}'; use geojson, gpkg and/or csv, separated by commas."),
            };
        }

        return formats == LayerFormats.None ? throw new UsageException("--format: give at least one of geojson, gpkg, csv.") : formats;
    }

    internal static IEnumerable<string> ReadInputs(string dir, string? extra)
    {
        var names = new[]
        {
            ResultLayout.StationList, ResultLayout.Stations, ResultLayout.Covariates, ResultLayout.Seasons, ResultLayout.Basis,
            ResultLayout.Interpretation, ResultLayout.QualityJson,
            Path.Combine(ResultLayout.RegressionFolder, "regression.json"), Path.Combine(ResultLayout.RegressionFolder, "fitted.csv"), Path.Combine(ResultLayout.RegressionFolder, "local.csv"),
            "coastline.geojson",
        };
        foreach (var n in names)
        {
            yield return Path.Combine(dir, n);
        }

        if (extra is not null)
        {
            yield return extra;
        }
    }

    private sealed record ExportSummary(string Out, IReadOnlyList<string> Files, IReadOnlyDictionary<string, int> FeatureCounts, IReadOnlyList<string> Notes);
}

using System.CommandLine;
using Spatial.Core.IO;
using Spatial.Output;
using Spatial.Output.Report;

namespace Spatial.Cli.Verbs;

/// <summary><c>spatial report RESULTS_DIR [--out report.html] [--title TEXT] [--coast FILE] [--figures DIR]</c>.</summary>
internal static class ReportVerb
{
    public static Command Create(CliEnv env)
    {
        var results = new Argument<string>("results") { Description = "Results folder written by import, fit, covariates and regress." };
        var output = new Option<string?>("--out") { Description = "The HTML file to write (default: RESULTS/report.html)." };
        var title = new Option<string?>("--title") { Description = "Title of the report (default: from the folder name)." };
        var coast = new Option<string?>("--coast") { Description = "Coastline GeoJSON (WGS 84) for the maps instead of the one in the results folder." };
        var figures = new Option<string?>("--figures") { Description = "Also write every map (SVG, PNG) and plot (PNG, SVG) of the report into this folder (e.g. RESULTS/figures)." };
        var cmd = new Command("report", "Write one self-contained HTML report (no network access needed) of a results folder, for screen and print.");
        cmd.Arguments.Add(results);
        cmd.Options.Add(output);
        cmd.Options.Add(title);
        cmd.Options.Add(coast);
        cmd.Options.Add(figures);
        cmd.SetAction(parseResult =>
        {
            var dir = parseResult.GetValue(results)!;
            var outPath = parseResult.GetValue(output) ?? Path.Combine(dir, ResultLayout.Report);
            var coastPath = parseResult.GetValue(coast);
            if (coastPath is not null && !File.Exists(coastPath))
            {
                throw new Core.SpatialDataException(coastPath, 0, "the coastline file does not exist", "give a GeoJSON file of coastline lines or land polygons");
            }

            var json = parseResult.GetValue(CliApp.Json);
            var folder = ResultsFolder.Open(dir);
            var result = CliOutput.WithProgress(env, json, "report", _ => ReportBuilder.Write(folder, outPath, new ReportOptions(parseResult.GetValue(title), CoastPath: coastPath, FiguresDir: parseResult.GetValue(figures))));
            var inputs = ExportVerb.ReadInputs(dir, coastPath).Append(Path.Combine(dir, ResultLayout.Manifest)).ToArray();
            RunManifest.Record(dir, "report", inputs, new Dictionary<string, string?>
            {
                ["out"] = outPath,
                ["title"] = parseResult.GetValue(title),
                ["coast"] = coastPath,
                ["figures"] = parseResult.GetValue(figures),
            });
            if (json)
            {
                CliOutput.WriteJson(env, new ReportSummary(outPath, result.SectionIds, result.Figures, result.Notes, result.FigureFiles));
            }
            else
            {
                env.Out.WriteLine($"wrote {outPath} ({result.Figures} figures, {result.SectionIds.Count} sections)");
                foreach (var note in result.Notes)
                {
                    env.Err.WriteLine($"note: {note}");
                }
            }

            return ExitCodes.Done;
        });
        return cmd;
    }

    private sealed record ReportSummary(string Out, IReadOnlyList<string> Sections, int Figures, IReadOnlyList<string> Notes, IReadOnlyList<string> FigureFiles);
}

using System.Globalization;
using System.Reflection;
using System.Text.Json.Nodes;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Output.Colour;
using Spatial.Output.Internal;
using Spatial.Output.Layers;
using Spatial.Output.Maps;
using Spatial.Output.Plots;
using Spatial.Output.Raster;

namespace Spatial.Output.Report;

/// <summary>The observed daily depths of one station-season, for a step-by-step reconstruction plot.</summary>
/// <param name="Station">Station id.</param>
/// <param name="Season">Season (calendar year in which it starts).</param>
/// <param name="ObservedMm">365 depths in mm, NaN for missing days.</param>
public sealed record SeasonCurve(string Station, int Season, IReadOnlyList<double> ObservedMm);

/// <summary>Options of <see cref="ReportBuilder.Write"/>.</summary>
/// <param name="Title">Report title; null gives a title from the folder name.</param>
/// <param name="Dem">DEM for hillshaded maps; null draws maps without relief.</param>
/// <param name="Surfaces">Predicted surfaces by response; null or empty leaves that section with a note.</param>
/// <param name="Reconstructions">Daily curves of chosen seasons (from the season matrix); null leaves reconstructions out with a note.</param>
/// <param name="CoastPath">Coastline GeoJSON; null uses the one in the results folder.</param>
/// <param name="FiguresDir">When set, every map (SVG and PNG) and plot (PNG and SVG) of the report is also written there, for briefings.</param>
public sealed record ReportOptions(
    string? Title = null,
    RasterGrid? Dem = null,
    IReadOnlyDictionary<string, RasterGrid>? Surfaces = null,
    IReadOnlyList<SeasonCurve>? Reconstructions = null,
    string? CoastPath = null,
    string? FiguresDir = null);

/// <summary>What <see cref="ReportBuilder.Write"/> put in the report.</summary>
/// <param name="SectionIds">Section ids in order.</param>
/// <param name="Figures">Number of maps and plots embedded.</param>
/// <param name="Notes">What was left out and why.</param>
/// <param name="FigureFiles">Files written to <see cref="ReportOptions.FiguresDir"/> (empty when none was given).</param>
public sealed record ReportResult(IReadOnlyList<string> SectionIds, int Figures, IReadOnlyList<string> Notes, IReadOnlyList<string> FigureFiles);

/// <summary>
/// Writes one self-contained HTML report of a results folder: no network requests (maps as inline SVG, plots as
/// data: URIs, styles inline), readable on screen and in print. Sections: cautions, data and quality, the
/// decomposition, best and worst described seasons, stations, maps, regressions, spatial diagnostics, predicted
/// surfaces, provenance and definitions. A missing file leaves its part with a note; nothing is invented.
/// </summary>
public static class ReportBuilder
{
    /// <summary>Section ids in report order (each is an <c>id</c> attribute of a <c>section</c> element).</summary>
    public static IReadOnlyList<string> Sections { get; } =
        ["cautions", "quality", "decomposition", "seasons", "stations", "maps", "regression", "spatial-diagnostics", "surfaces", "provenance", "definitions"];

    private const string Caution =
        "Results support, and do not replace, the judgement of qualified hydrologists and avalanche professionals; defer to local codes and practice.";

    private const string ResidualDefinition =
        "residual_k = √(Σ over observed days of (x − mean − Σ_{i≤k} c_i v_i)²) ÷ √(Σ over observed days of (x − mean)²), where x is the observed depth, mean the mean curve, c_i the season's score on component i and v_i the component; so residual_0 = 1, and residual_K near 0 means the first K components describe the season well.";

    /// <summary>Writes the report to <paramref name="outPath"/> atomically.</summary>
    public static ReportResult Write(ResultsFolder folder, string outPath, ReportOptions options)
    {
        ArgumentException.ThrowIfNullOrEmpty(outPath);
        var (html, result) = Build(folder, options);
        AtomicFile.WriteAllText(outPath, html);
        return result;
    }

    /// <summary>The report's HTML text and what it holds.</summary>
    public static (string Html, ReportResult Result) Build(ResultsFolder folder, ReportOptions options)
    {
        ArgumentNullException.ThrowIfNull(folder);
        ArgumentNullException.ThrowIfNull(options);
        var ctx = new Context(folder, options);
        var h = new Html();
        var title = options.Title ?? $"Snow-season report: {Path.GetFileName(Path.GetFullPath(folder.FolderPath).TrimEnd('/'))}";
        h.Raw("<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\"><head><meta charset=\"utf-8\"/><meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>");
        h.El("title", title).Raw("<style>").Raw(Css).Raw("</style></head><body>");
        h.Raw("<header>").El("h1", title).P($"Made by spatial {ToolVersion} from the results folder's files. Every figure and table below is computed from those files; missing files are named where their part would be.", "lede").Raw("</header>");
        h.Raw("<nav aria-label=\"contents\"><ol>");
        foreach (var (id, name) in Sections.Zip(SectionNames))
        {
            h.Raw($"<li><a href=\"#{id}\">").Text(name).Raw("</a></li>");
        }

        h.Raw("</ol></nav><main>");
        Section(h, 0, () => h.P(Caution, "caution").P("The numbers describe the record as measured at these stations. Gaps, station moves and sensor changes can masquerade as trends; check the quality section and the worst described seasons before relying on a number."));
        Section(h, 1, () => Quality(h, ctx));
        Section(h, 2, () => Decomposition(h, ctx));
        Section(h, 3, () => Seasons(h, ctx));
        Section(h, 4, () => Stations(h, ctx));
        Section(h, 5, () => Maps(h, ctx));
        Section(h, 6, () => Regression(h, ctx));
        Section(h, 7, () => SpatialDiagnostics(h, ctx));
        Section(h, 8, () => Surfaces(h, ctx));
        Section(h, 9, () => Provenance(h, ctx));
        Section(h, 10, () => h.P(ResidualDefinition).P("Scores c_i are in mm: the components are unit vectors over the 365 days, so a score is the depth-weighted size of that shape in the season. Day indices count from the season start (day 0). Trends are Sen slopes per decade with Mann–Kendall tests (mk_s, mk_z, mk_p). Standard errors marked HC3 are heteroskedasticity-consistent (MacKinnon & White 1985).").P(Caution, "caution"));
        h.Raw("</main><footer>").P($"spatial {ToolVersion}. {Caution}").Raw("</footer></body></html>\n");
        return (h.ToString(), new ReportResult(Sections, ctx.Figures, ctx.Notes, ctx.FigureFiles));
    }

    private static readonly string[] LeadColumns = ["station", "name", "elevation_m", "seasons"];
    private static readonly string[] TailColumns = ["coast_km", "slope_deg"];
    private static readonly string[] LocalR2 = ["local_r2"];

    private static readonly string[] SectionNames =
        ["Cautions", "Data and quality", "Decomposition", "Best and worst described seasons", "Stations", "Maps", "Regressions", "Spatial diagnostics", "Predicted surfaces", "Provenance", "Definitions"];

    private static string ToolVersion =>
        typeof(ReportBuilder).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion.Split('+')[0] ?? "0.0.0";

    private static void Section(Html h, int index, Action body)
    {
        h.Raw($"<section id=\"{Sections[index]}\">").El("h2", SectionNames[index]);
        body();
        h.Raw("</section>");
    }

    private static void Missing(Html h, Context ctx, string file, string part)
    {
        var text = $"{part} is not available: {file} is missing from the results folder.";
        h.Note(text);
        ctx.Notes.Add(text);
    }

    private static void Quality(Html h, Context ctx)
    {
        var f = ctx.Folder;
        if (f.Quality is { } q)
        {
            h.P("Counts from the import's quality checks (quality.json):").Json(q);
        }
        else
        {
            Missing(h, ctx, ResultLayout.QualityJson, "The import's quality summary");
        }

        if (f.Seasons is { } s)
        {
            var stations = s.Texts("station").Distinct().Count();
            var seasons = s.Has("season") ? s.Doubles("season").Where(double.IsFinite).ToArray() : [];
            var obs = s.Has("observed_days") ? s.Doubles("observed_days").Where(double.IsFinite).ToArray() : [];
            h.Table(["what", "value"],
            [
                ["station-seasons described", s.Rows.Count.ToString(CultureInfo.InvariantCulture)],
                ["stations", stations.ToString(CultureInfo.InvariantCulture)],
                ["seasons", seasons.Length > 0 ? $"{seasons.Min():0}–{seasons.Max():0}" : null],
                ["median observed days per season", obs.Length > 0 ? Html.Num(Median(obs)) : null],
            ], "Coverage of the described seasons (seasons.csv)");
        }
    }

    private static void Decomposition(Html h, Context ctx)
    {
        if (ctx.Folder.Basis is not { } b)
        {
            Missing(h, ctx, ResultLayout.Basis, "The decomposition");
            return;
        }

        var fraction = Json.Nums(b["variance_fraction"]);
        var eig = Json.Nums(b["eigenvalues"]);
        var north = Json.Nums(b["north_error"]);
        var cumulative = Json.Nums(b["cumulative_fraction"]);
        var labels = Json.Texts(b["labels"]);
        var comps = Json.Matrix(b["components"]);
        var mean = Json.Nums(b["mean"]);
        var errFraction = ErrorFraction(fraction, eig, north);
        h.P($"The seasonal curves (daily depth in {Json.Text(b["units"]) ?? "mm"}, seasons starting {ctx.Folder.SeasonStart}) are described as the mean curve plus a few components, each a fixed shape over the season scaled by a score per station-season. The scores are fitted to the observed days only, so missing days are never filled in.");
        var interp = ctx.Folder.Interpretation?["components"] as JsonArray;
        var rows = new List<string?[]>();
        for (var k = 0; k < fraction.Length; k++)
        {
            var meaning = interp is null ? null : Json.Text(interp.OfType<JsonObject>().FirstOrDefault(o => Json.Text(o["component"]) == $"c{k + 1}" || (int)Json.Num(o["index"]) == k + 1)?["meaning"]);
            rows.Add([$"c{k + 1}", k < labels.Length ? labels[k] : null, Pct(fraction[k]), k < errFraction.Length ? Pct(errFraction[k]) : null, k < cumulative.Length ? Pct(cumulative[k]) : null, meaning ?? DefaultMeaning(k < labels.Length ? labels[k] : "other")]);
        }

        h.Table(["component", "label", "variance explained", "± North error", "cumulative", "what a positive score means"], rows, "Components (basis.json, interpretation.json)", numericFromColumn1: false);
        if (fraction.Length > 0)
        {
            ctx.Img(h, PlotFactory.VarianceExplained(fraction, errFraction));
        }

        if (comps.Length > 0 && mean.Length == SeasonCalendar.DaysPerSeason)
        {
            ctx.Img(h, PlotFactory.Components(mean, comps, labels, ctx.Calendar));
        }

        if (ctx.Folder.Interpretation is { } interpretation)
        {
            h.Raw("<details><summary>Full interpretation (interpretation.json)</summary>").Json(interpretation).Raw("</details>");
        }
        else
        {
            Missing(h, ctx, ResultLayout.Interpretation, "The component interpretation");
        }

        if (options(ctx).Reconstructions is { Count: > 0 } curves && ctx.Folder.Seasons is { } seasons)
        {
            h.El("h3", "Seasons rebuilt step by step");
            foreach (var c in curves)
            {
                var scores = Context.Scores(seasons, c.Station, c.Season, comps.Length);
                if (scores is null)
                {
                    h.Note($"{c.Station} {c.Season}: not in seasons.csv.");
                    continue;
                }

                ctx.Img(h, PlotFactory.Reconstruction($"{c.Station}, season {c.Season}", mean, comps, scores, c.ObservedMm, ctx.Calendar));
            }
        }
        else
        {
            ctx.Notes.Add("no daily curves were given: step-by-step reconstructions are left out");
            h.Note("Step-by-step reconstructions need the daily curves of the chosen seasons (the season matrix); none were given to this report.");
        }
    }

    private static ReportOptions options(Context ctx) => ctx.Options;

    private static void Seasons(Html h, Context ctx)
    {
        if (ctx.Folder.Seasons is not { } s)
        {
            Missing(h, ctx, ResultLayout.Seasons, "The season table");
            return;
        }

        var residualCols = s.Columns.Where(c => c.StartsWith("residual_", StringComparison.Ordinal)).ToArray();
        if (residualCols.Length > 0)
        {
            var last = residualCols.OrderBy(c => int.TryParse(c.AsSpan(9), NumberStyles.None, CultureInfo.InvariantCulture, out var k) ? k : 0).Last();
            var r = s.Doubles(last);
            var order = Enumerable.Range(0, r.Length).Where(i => double.IsFinite(r[i])).OrderBy(i => r[i]).ThenBy(i => i).ToArray();
            var st = s.Texts("station");
            var se = s.Has("season") ? s.Texts("season") : new string[r.Length];
            var obs = s.Has("observed_days") ? s.Texts("observed_days") : new string[r.Length];
            IEnumerable<string?[]> Rows(IEnumerable<int> idx) => idx.Select(i => new string?[] { st[i], se[i], obs[i], Html.Num(r[i]) });
            h.P($"Ranked by {last} (fraction of the season's departure from the mean that the components leave unexplained; see Definitions). The worst described seasons are the first place to look for broken records.");
            h.Table(["station", "season", "observed days", last], Rows(order.Take(5)), "Best described seasons");
            h.Table(["station", "season", "observed days", last], Rows(order.Reverse().Take(5)), "Worst described seasons");
        }

        var comps = s.Columns.Where(c => c.Length > 1 && c[0] == 'c' && c[1..].All(char.IsAsciiDigit)).ToArray();
        var rows = new List<string?[]>();
        foreach (var c in comps)
        {
            var v = s.Doubles(c);
            var idx = Enumerable.Range(0, v.Length).Where(i => double.IsFinite(v[i])).ToArray();
            if (idx.Length == 0)
            {
                continue;
            }

            var lo = idx.OrderBy(i => v[i]).First();
            var hi = idx.OrderByDescending(i => v[i]).First();
            string Where(int i) => $"{s.Rows[i][s.Require("station")]} {(s.Has("season") ? s.Rows[i][s.Require("season")] : string.Empty)}".Trim();
            rows.Add([c, Html.Num(v[lo]), Where(lo), Html.Num(v[hi]), Where(hi)]);
        }

        if (rows.Count > 0)
        {
            h.Table(["component", "lowest score (mm)", "station season", "highest score (mm)", "station season"], rows, "Extremes of each component", numericFromColumn1: false);
        }
    }

    private static void Stations(Html h, Context ctx)
    {
        if (ctx.StationsLayer is not { } layer)
        {
            Missing(h, ctx, ResultLayout.StationList, "The station table");
            return;
        }

        var wanted = LeadColumns
            .Concat(layer.Fields.Select(f => f.Name).Where(n => n.StartsWith("median_", StringComparison.Ordinal) || n.StartsWith("sen_per_decade_", StringComparison.Ordinal)))
            .Concat(TailColumns).Distinct().Where(n => layer.Fields.Any(f => f.Name == n)).ToArray();
        var index = wanted.Select(n => layer.Fields.Select((f, i) => (f, i)).First(p => p.f.Name == n).i).ToArray();
        h.P("Per-station medians and Sen trends per decade; every column of every table is in the exported layers (spatial export).");
        h.Raw("<div class=\"wide\">");
        h.Table(wanted.Select(n => n.Replace('_', ' ')).ToArray(), layer.Features.Select(f => index.Select(i => f.Values[i] switch
        {
            null => null,
            double d => Html.Num(d),
            long l => l.ToString(CultureInfo.InvariantCulture),
            var v => v.ToString(),
        }).ToArray()), "Stations", numericFromColumn1: false);
        h.Raw("</div>");
    }

    private static void Maps(Html h, Context ctx)
    {
        if (ctx.StationsLayer is null)
        {
            Missing(h, ctx, ResultLayout.StationList, "Maps");
            return;
        }

        var names = ctx.StationsLayer.Fields.Select(f => f.Name).ToHashSet(StringComparer.Ordinal);
        var labels = ctx.Folder.Basis is { } b ? Json.Texts(b["labels"]) : [];
        string? Comp(string label) => Array.IndexOf(labels, label) is var i and >= 0 ? $"c{i + 1}" : null;
        var chosen = new List<(string Variable, string What)>();
        void Want(string? variable, string what)
        {
            if (variable is not null && names.Contains(variable) && chosen.All(c => c.Variable != variable))
            {
                chosen.Add((variable, what));
            }
        }

        Want(Comp("amount") is { } a ? $"median_{a}" : null, "amount (median score of the amount component)");
        Want("median_peak_depth_mm", "amount (median peak depth)");
        Want(Comp("timing") is { } t ? $"median_{t}" : null, "timing (median score of the timing component; positive = earlier)");
        Want("median_onset_day", "timing (median onset day)");
        Want(Comp("duration") is { } d ? $"median_{d}" : null, "duration (median score of the duration component; positive = longer)");
        Want("median_longest_cover_days", "duration (median longest cover)");
        Want("median_snow_days", "duration (median snow days)");
        foreach (var n in names.Where(n => n.StartsWith("sen_per_decade_", StringComparison.Ordinal)).Order(StringComparer.Ordinal).Take(4))
        {
            Want(n, "trend (Sen slope per decade)");
        }

        if (chosen.Count == 0)
        {
            h.Note("No per-station summaries to map (stations.csv is missing).");
            ctx.Notes.Add("no per-station summaries to map");
        }

        foreach (var (variable, what) in chosen)
        {
            ctx.Map(h, variable, $"Map of {what}: {variable}.");
        }
    }

    private static void Regression(Html h, Context ctx)
    {
        if (ctx.Folder.Regression?["models"] is not JsonArray models)
        {
            Missing(h, ctx, "regression/regression.json", "The regression results");
            return;
        }

        foreach (var m in models.OfType<JsonObject>())
        {
            var response = Json.Text(m["response"]) ?? "?";
            var predictors = Json.Texts(m["predictors"]);
            h.Raw("<article class=\"model\">").El("h3", $"{response} ~ {string.Join(" + ", predictors)}");
            var coefs = Json.Items(m["coefficients"]).Select(c => new string?[]
            {
                Json.Text(c["name"]), Html.Num(Json.Num(c["estimate"])), Html.Num(Json.Num(c["se"])), Html.Num(Json.Num(c["t"])), Html.P(Json.Num(c["p"])),
                $"{Html.Num(Json.Num(c["ci_low"]))} … {Html.Num(Json.Num(c["ci_high"]))}", Html.Num(Json.Num(c["se_hc3"])), Html.Num(Json.Num(c["standardised"])), Html.Num(Json.Num(c["vif"])),
            });
            h.Table(["term", "estimate", "SE", "t", "p", "95 % CI", "SE (HC3)", "standardised", "VIF"], coefs, $"Coefficients ({Variables.Label(response)})");
            var bp = m["breusch_pagan"];
            h.Table(["statistic", "value"],
            [
                ["n (stations)", Html.Num(Json.Num(m["n"]))], ["residual degrees of freedom", Html.Num(Json.Num(m["df_residual"]))],
                ["residual SE (σ)", Html.Num(Json.Num(m["sigma"]))], ["R²", Html.Num(Json.Num(m["r2"]))], ["adjusted R²", Html.Num(Json.Num(m["adj_r2"]))],
                ["F", Html.Num(Json.Num(m["f"]))], ["p (F)", Html.P(Json.Num(m["f_p"]))], ["AIC", Html.Num(Json.Num(m["aic"]))], ["BIC", Html.Num(Json.Num(m["bic"]))],
                ["condition number", Html.Num(Json.Num(m["condition_number"]))],
                ["Breusch–Pagan statistic (df)", $"{Html.Num(Json.Num(bp?["statistic"]))} ({Html.Num(Json.Num(bp?["df"]))})"], ["Breusch–Pagan p", Html.P(Json.Num(bp?["p"]))],
            ], "Fit and diagnostics");
            var infl = Json.Items(m["influential"]).Select(i => new string?[] { Json.Text(i["station"]), Html.Num(Json.Num(i["leverage"])), Html.Num(Json.Num(i["cooks_distance"])) }).ToArray();
            if (infl.Length > 0)
            {
                h.Table(["station", "leverage", "Cook's distance"], infl, "Influential stations");
            }

            ctx.ModelPlots(h, response, predictors, m);
            h.Raw("</article>");
        }
    }

    private static void SpatialDiagnostics(Html h, Context ctx)
    {
        if (ctx.Folder.Regression?["models"] is not JsonArray models)
        {
            Missing(h, ctx, "regression/regression.json", "Spatial diagnostics");
            return;
        }

        h.P("Moran's I of the residuals tests whether neighbouring stations' residuals are alike (then the model's standard errors are too small). Block cross-validation leaves out whole spatial blocks, so its error shows how well the model predicts away from the stations it was fitted to.");
        var moranRows = models.OfType<JsonObject>().Select(m => m["moran"] is JsonObject mo
            ? new string?[] { Json.Text(m["response"]), Json.Text(mo["weights"]), Html.Num(Json.Num(mo["i"])), Html.Num(Json.Num(mo["expected"])), Html.Num(Json.Num(mo["z_normal"])), Html.Num(Json.Num(mo["z_randomisation"])), Html.P(Json.Num(mo["p_permutation"])), Html.Num(Json.Num(mo["permutations"])) }
            : [Json.Text(m["response"]), null, null, null, null, null, null, null]);
        h.Table(["response", "weights", "I", "E[I]", "z (normal)", "z (randomisation)", "p (permutation)", "permutations"], moranRows, "Moran's I of residuals", numericFromColumn1: false);
        var cvRows = models.OfType<JsonObject>().Select(m => m["block_cv"] is JsonObject cv
            ? new string?[] { Json.Text(m["response"]), Html.Num(Json.Num(cv["block_km"])), Html.Num(Json.Num(cv["rmse_in_sample"])), Html.Num(Json.Num(cv["rmse_out_of_block"])), Html.Num(Json.Num(cv["r2_in_sample"])), Html.Num(Json.Num(cv["r2_out_of_block"])) }
            : [Json.Text(m["response"]), null, null, null, null, null]);
        h.Table(["response", "block (km)", "RMSE in sample", "RMSE out of block", "R² in sample", "R² out of block"], cvRows, "Block cross-validation", numericFromColumn1: false);
        var localRows = models.OfType<JsonObject>().Select(m => m["local"] is JsonObject l
            ? new string?[] { Json.Text(m["response"]), Json.Text(l["kernel"]), Html.Scalar(l["adaptive"]), Html.Num(Json.Num(l["bandwidth"])), Html.Num(Json.Num(l["aicc"])) }
            : [Json.Text(m["response"]), null, null, null, null]);
        h.Table(["response", "kernel", "adaptive", "bandwidth", "AICc"], localRows, "Local (geographically weighted) regression", numericFromColumn1: false);
        if (ctx.Folder.Local is null)
        {
            Missing(h, ctx, "regression/local.csv", "Local-regression maps");
            return;
        }

        var names = ctx.StationsLayer?.Fields.Select(f => f.Name).ToHashSet(StringComparer.Ordinal) ?? [];
        foreach (var m in models.OfType<JsonObject>())
        {
            var response = Json.Text(m["response"]) ?? string.Empty;
            foreach (var p in LocalR2.Concat(Json.Texts(m["predictors"]).Select(p => $"local_{p}")))
            {
                var variable = $"{response}_{p}";
                if (names.Contains(variable))
                {
                    ctx.Map(h, variable, p == "local_r2" ? $"Local R² of {response}." : $"Local coefficient of {p[6..]} for {response}: where the effect is stronger or weaker than the global estimate.");
                }
            }
        }
    }

    private static void Surfaces(Html h, Context ctx)
    {
        if (ctx.Options.Surfaces is not { Count: > 0 } surfaces)
        {
            var files = ctx.Folder.SurfaceFiles.Count > 0 ? $" ({string.Join(", ", ctx.Folder.SurfaceFiles)} present but not read into this report)" : string.Empty;
            h.Note($"No predicted surfaces were given to this report{files}.");
            ctx.Notes.Add("no predicted surfaces were given");
            return;
        }

        foreach (var (response, grid) in surfaces.OrderBy(kv => kv.Key, StringComparer.Ordinal))
        {
            var values = grid.Values.ToArray();
            var known = values.Where(v => !grid.IsNoData(v)).Select(v => (double)v).ToArray();
            if (known.Length == 0)
            {
                h.Note($"{response}: the surface holds no values.");
                continue;
            }

            double min = known.Min(), max = known.Max();
            var scale = Variables.Scale(response, min, max);
            var bounds = RasterImage.Bounds(grid, response);
            var image = RasterImage.Equirectangular(grid, values, bounds, v =>
            {
                var c = scale.At(scale.Position(v, min, max));
                return (c.R, c.G, c.B, 255);
            }, response, 900);
            h.Raw("<figure>").Raw($"<img src=\"data:image/png;base64,{Convert.ToBase64String(image.ToPng())}\" alt=\"{Html.Esc($"predicted {response}")}\" class=\"surface\"/>");
            h.Raw("<figcaption>").Text($"Predicted {Variables.Label(response)}, {Html.Num(min)} to {Html.Num(max)}, scale {scale.Name}{(scale.Diverging ? " (centred on 0)" : string.Empty)}; longitude {Html.Num(bounds.West)} to {Html.Num(bounds.East)}, latitude {Html.Num(bounds.South)} to {Html.Num(bounds.North)} (plate carrée); sea and cells outside the model's support have no value. ");
            h.Raw("</figcaption>").Raw(LegendStrip(scale, min, max)).Raw("</figure>");
            ctx.Figures++;
        }
    }

    private static void Provenance(Html h, Context ctx)
    {
        if (ctx.Folder.Manifest is { } m)
        {
            h.P($"Tool {Json.Text(m["tool"]) ?? "spatial"}, version {Json.Text(m["version"]) ?? "?"} (manifest.json).");
            if (m["runs"] is JsonObject runs)
            {
                foreach (var (verb, run) in runs)
                {
                    h.El("h3", $"{verb} — {Json.Text(run?["time_utc"]) ?? "time unknown"}, version {Json.Text(run?["version"]) ?? "?"}");
                    var inputs = Json.Items(run?["inputs"]).Select(i => new string?[] { Json.Text(i["path"]), Json.Text(i["sha256"]), Html.Num(Json.Num(i["bytes"])) }).ToArray();
                    if (inputs.Length > 0)
                    {
                        h.Table(["input", "SHA-256", "bytes"], inputs, numericFromColumn1: false);
                    }

                    if (run?["parameters"] is JsonObject p && p.Count > 0)
                    {
                        h.Table(["parameter", "value"], p.Select(kv => new string?[] { kv.Key, Html.Scalar(kv.Value) }), numericFromColumn1: false);
                    }
                }
            }
        }
        else
        {
            Missing(h, ctx, ResultLayout.Manifest, "The run manifest");
        }

        var files = Directory.GetFiles(ctx.Folder.FolderPath, "*", SearchOption.TopDirectoryOnly)
            .Concat(Directory.Exists(Path.Combine(ctx.Folder.FolderPath, ResultLayout.RegressionFolder)) ? Directory.GetFiles(Path.Combine(ctx.Folder.FolderPath, ResultLayout.RegressionFolder), "*.*") : [])
            .Where(f => f.EndsWith(".csv", StringComparison.Ordinal) || f.EndsWith(".json", StringComparison.Ordinal) || f.EndsWith(".geojson", StringComparison.Ordinal))
            .Where(f => !Path.GetFileName(f).StartsWith('.'))
            .Select(f => Path.GetRelativePath(ctx.Folder.FolderPath, f).Replace('\\', '/'))
            .Order(StringComparer.Ordinal)
            .Select(rel => new string?[] { rel, Sha256File.Of(Path.Combine(ctx.Folder.FolderPath, rel)), new FileInfo(Path.Combine(ctx.Folder.FolderPath, rel)).Length.ToString(CultureInfo.InvariantCulture) })
            .ToArray();
        h.Table(["result file read by this report", "SHA-256", "bytes"], files, "Files of the results folder", numericFromColumn1: false);
    }

    private static string LegendStrip(ColourScale scale, double min, double max)
    {
        double lo = min, hi = max;
        if (scale.Diverging)
        {
            var m = Math.Max(Math.Abs(min), Math.Abs(max));
            (lo, hi) = (-m, m);
        }

        var d = new Drawing(420, 44, $"colour scale {scale.Name}");
        for (var i = 0; i < 100; i++)
        {
            d.Add(new DrawRect(10 + (i * 4), 4, 4.4, 16, scale.At(i / 99.0).Hex, null, 0));
        }

        d.Add(new DrawText(10, 38, Html.Num(lo), 11, Anchor.Start, false));
        d.Add(new DrawText(210, 38, Html.Num((lo + hi) / 2), 11, Anchor.Middle, false));
        d.Add(new DrawText(410, 38, Html.Num(hi), 11, Anchor.End, false));
        return d.ToSvg();
    }

    /// <summary>
    /// North et al. (1982) errors as a fraction of total variance: δλ·(fraction/λ) when eigenvalues are given
    /// (basis.json's north_error is on the eigenvalue scale), otherwise taken as already a fraction.
    /// </summary>
    internal static double[] ErrorFraction(double[] fraction, double[] eig, double[] north)
    {
        var result = new double[Math.Min(fraction.Length, north.Length)];
        for (var k = 0; k < result.Length; k++)
        {
            result[k] = k < eig.Length && eig[k] > 0 ? north[k] * fraction[k] / eig[k] : north[k];
        }

        return result;
    }

    private static string DefaultMeaning(string label) => label switch
    {
        "amount" => "more snow than the mean curve",
        "timing" => "an earlier season",
        "duration" => "a longer season",
        _ => "a shape not tied to one season metric",
    };

    private static string Pct(double f) => double.IsFinite(f) ? (f * 100).ToString("0.0", CultureInfo.InvariantCulture) + " %" : "–";

    private static double Median(double[] v)
    {
        var s = v.Order().ToArray();
        return s.Length % 2 == 1 ? s[s.Length / 2] : (s[(s.Length / 2) - 1] + s[s.Length / 2]) / 2;
    }

    private const string Css = """
        :root{--ink:#1d232a;--muted:#5b6570;--rule:#d5dbe1;--band:#f3f5f7;--accent:#2b5d8a}
        body{font-family:"DejaVu Sans",Arial,sans-serif;color:var(--ink);max-width:62rem;margin:0 auto;padding:1rem 1.5rem;line-height:1.45}
        h1{font-size:1.7rem;margin:.5rem 0}h2{font-size:1.35rem;border-bottom:2px solid var(--accent);padding-bottom:.2rem;margin-top:2.2rem}h3{font-size:1.1rem;margin-top:1.4rem}
        nav ol{columns:2;font-size:.95rem}a{color:var(--accent)}
        table{border-collapse:collapse;margin:.6rem 0 1rem;font-size:.86rem}caption{text-align:left;font-weight:bold;padding:.2rem 0}
        th,td{border:1px solid var(--rule);padding:.2rem .45rem;vertical-align:top;text-align:left}thead th{background:var(--band)}td.num{text-align:right;font-variant-numeric:tabular-nums}
        table.kv th{background:var(--band);font-weight:normal;white-space:nowrap}
        .wide{overflow-x:auto}.note{color:var(--muted);font-style:italic}.caution{border-left:4px solid #b5651d;background:#fbf4ec;padding:.5rem .8rem}
        figure{margin:1rem 0;break-inside:avoid}figure img,figure svg{max-width:100%;height:auto}figcaption{font-size:.85rem;color:var(--muted)}
        img.surface{image-rendering:pixelated;border:1px solid var(--rule)}article.model{border-top:1px solid var(--rule)}
        footer{margin-top:3rem;font-size:.8rem;color:var(--muted);border-top:1px solid var(--rule)}
        @media print{body{max-width:none;font-size:10pt;padding:0}nav{display:none}h2{break-before:page}section#cautions h2{break-before:avoid}
        table,figure,tr{break-inside:avoid}.wide{overflow:visible}a{color:inherit;text-decoration:none}details>*{display:block}@page{margin:15mm}}
        """;

    /// <summary>Shared state of one report build.</summary>
    private sealed class Context
    {
        public Context(ResultsFolder folder, ReportOptions options)
        {
            Folder = folder;
            Options = options;
            var notes = new List<string>();
            StationsLayer = LayerBuilder.Stations(folder, LayerBuilder.StationPoints(folder, notes), notes);
            Notes.AddRange(notes);
            Calendar = SeasonCalendar.TryParse(folder.SeasonStart) ?? SeasonCalendar.Default;
        }

        public ResultsFolder Folder { get; }

        public ReportOptions Options { get; }

        public Layer? StationsLayer { get; }

        public SeasonCalendar Calendar { get; }

        public List<string> Notes { get; } = [];

        public int Figures { get; set; }

        public List<string> FigureFiles { get; } = [];

        private static string Slug(string text) =>
            new string(text.ToLowerInvariant().Select(c => char.IsAsciiLetterOrDigit(c) ? c : '_').ToArray()).Trim('_') is var s && s.Length > 60 ? s[..60] : s;

        private readonly Dictionary<(RasterGrid Dem, string Frame), RgbaImage> backdrops = [];

        public void Img(Html h, Figure f)
        {
            if (Options.FiguresDir is { } dir)
            {
                var name = $"plot_{Figures + 1:00}_{Slug(f.Title)}";
                AtomicFile.WriteAllBytes(Path.Combine(dir, name + ".png"), f.Png);
                AtomicFile.WriteAllText(Path.Combine(dir, name + ".svg"), f.Svg);
                FigureFiles.Add(name + ".png");
                FigureFiles.Add(name + ".svg");
            }

            h.Raw("<figure>").Raw($"<img src=\"data:image/png;base64,{Convert.ToBase64String(f.Png)}\" alt=\"{Html.Esc(f.Title)}\" width=\"{PlotFactory.Width}\" height=\"{PlotFactory.Height}\"/>");
            h.Raw("<figcaption>").Text(f.Caption).Raw("</figcaption></figure>");
            Figures++;
        }

        public void Map(Html h, string variable, string caption)
        {
            var drawing = MapRenderer.Build(Folder, new MapOptions(variable, Dem: Options.Dem, CoastPath: Options.CoastPath, WidthPx: 860, HeightPx: 600), backdrops);
            var svg = drawing.ToSvg();
            if (Options.FiguresDir is { } dir)
            {
                var name = $"map_{Slug(variable)}";
                AtomicFile.WriteAllText(Path.Combine(dir, name + ".svg"), svg);
                AtomicFile.WriteAllBytes(Path.Combine(dir, name + ".png"), drawing.ToPng(2));
                FigureFiles.Add(name + ".svg");
                FigureFiles.Add(name + ".png");
            }

            h.Raw("<figure>").Raw(svg).Raw("<figcaption>").Text(caption).Raw("</figcaption></figure>");
            Figures++;
        }

        public static double[]? Scores(DataTable seasons, string station, int season, int k)
        {
            var st = seasons.Require("station");
            var se = seasons.Require("season");
            var row = seasons.Rows.FirstOrDefault(r => r[st] == station && DataTable.ToDouble(r[se]) == season);
            if (row is null)
            {
                return null;
            }

            return Enumerable.Range(1, k).Select(i => seasons.IndexOf($"c{i}") is var c and >= 0 ? DataTable.ToDouble(row[c]) : double.NaN).ToArray();
        }

        public void ModelPlots(Html h, string response, string[] predictors, JsonObject model)
        {
            if (Folder.Fitted is not { } fitted)
            {
                Missing(h, this, "regression/fitted.csv", $"Residual plots of {response}");
                return;
            }

            var rows = fitted.Rows.Where(r => r[fitted.Require("response")] == response).ToArray();
            var fit = rows.Select(r => DataTable.ToDouble(r[fitted.Require("fitted")])).ToArray();
            var res = rows.Select(r => DataTable.ToDouble(r[fitted.Require("residual")])).ToArray();
            var ids = rows.Select(r => r[fitted.Require("station")]).ToArray();
            var unit = Variables.Unit(response);
            Img(h, PlotFactory.ResidualVsFitted(fit, res, response, unit));
            Img(h, PlotFactory.Qq(res, response));
            if (StationsLayer is null)
            {
                return;
            }

            foreach (var p in predictors)
            {
                var fi = StationsLayer.Fields.Select((f, i) => (f, i)).FirstOrDefault(q => q.f.Name == p);
                var coef = Json.Items(model["coefficients"]).FirstOrDefault(c => Json.Text(c["name"]) == p);
                if (fi.f is null || coef is null)
                {
                    h.Note($"Partial residuals of {p}: the predictor's values are not in the station tables.");
                    continue;
                }

                var byId = StationsLayer.Features.ToDictionary(f => (string)f.Values[0]!, f => f.Values[fi.i] switch { double d => d, long l => l, _ => double.NaN }, StringComparer.Ordinal);
                var b = Json.Num(coef["estimate"]);
                var x = ids.Select(id => byId.TryGetValue(id, out var v) ? v : double.NaN).ToArray();
                var partial = x.Select((v, i) => res[i] + (b * v)).ToArray();
                Img(h, PlotFactory.PartialResidual(x, partial, b, p, response));
            }
        }
    }
}

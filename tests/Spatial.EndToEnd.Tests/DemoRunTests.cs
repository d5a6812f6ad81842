using System.Globalization;
using System.Text.Json.Nodes;
using Spatial.Cli;
using Spatial.Testing;
using Xunit;

namespace Spatial.EndToEnd.Tests;

/// <summary>
/// Runs <c>spatial demo</c> once (the whole pipeline on the invented region) and checks what a user hands on,
/// against the generator's ground truth in <c>truth.json</c> — the only values here not computed by the code
/// under test are the generator's noise-free effects.
/// </summary>
public sealed class DemoRunFixture : IDisposable
{
    public DemoRunFixture()
    {
        Root = TestData.NewScratchFolder("demo");
        using var output = new StringWriter();
        using var error = new StringWriter();
        ExitCode = CliApp.Run(["demo", "--out", Root, "--json"], CliEnv.ForWriters(output, error));
        StdOut = output.ToString();
        StdErr = error.ToString();
    }

    public string Root { get; }

    public int ExitCode { get; }

    public string StdOut { get; }

    public string StdErr { get; }

    public string Results => Path.Combine(Root, "results");

    public string Region => Path.Combine(Root, "region");

    public JsonNode Truth => JsonNode.Parse(File.ReadAllText(Path.Combine(Region, "truth.json")))!;

    public JsonNode Regression => JsonNode.Parse(File.ReadAllText(Path.Combine(Results, "regression", "regression.json")))!;

    public void Dispose()
    {
        try
        {
            Directory.Delete(Root, recursive: true);
        }
        catch (IOException)
        {
        }
    }
}

public sealed class DemoRunTests(DemoRunFixture demo) : IClassFixture<DemoRunFixture>
{
    [Fact]
    public void The_demo_finishes_and_reports_every_output()
    {
        Assert.True(demo.ExitCode == ExitCodes.Done, $"demo exit {demo.ExitCode}: {demo.StdErr}");
        var summary = JsonNode.Parse(demo.StdOut)!;
        Assert.True(File.Exists(summary["report"]!.GetValue<string>()));
        foreach (var file in new[] { "matrix.parquet", "quality.json", "basis.json", "seasons.csv", "stations.csv", "covariates.csv", "manifest.json", "report.html" })
        {
            Assert.True(File.Exists(Path.Combine(demo.Results, file)), $"missing results/{file}");
        }

        Assert.True(File.Exists(Path.Combine(demo.Results, "layers", "stations.geojson")));
        Assert.True(File.Exists(Path.Combine(demo.Results, "layers", "spatial.gpkg")));
        Assert.NotEmpty(Directory.GetFiles(Path.Combine(demo.Results, "regression"), "predicted_*.tif"));
    }

    [Fact]
    public void Given_the_demo_region_when_fitted_then_amount_timing_and_duration_labels_all_come_out()
    {
        // The generator's seasons vary in amount (winter warmth and snowfall), in timing (truth.json "season_phase": the
        // whole seasonal cycle runs early or late) and in length; the fit must find a component for each.
        var labels = Labels();

        Assert.Equal("amount", labels[0]);
        Assert.Contains("timing", labels);
        Assert.Contains("duration", labels);
    }

    [Fact]
    public void Given_the_demo_region_when_fitted_then_component_1_carries_a_longer_season_with_more_snow()
    {
        // truth.json "effects": duration and peak both rise per km of elevation, so the amount mode is also a length mode:
        // its duration score (partial correlation with the longest continuous cover) must be clearly positive.
        var interpretation = JsonNode.Parse(File.ReadAllText(Path.Combine(demo.Results, "interpretation.json")))!;
        var first = interpretation["components"]!.AsArray()[0]!;

        Assert.Contains("duration", first["aspects"]!.AsArray().Select(x => x!.GetValue<string>()));
        Assert.True(first["scores"]!["duration"]!.GetValue<double>() > 0.3, $"duration score {first["scores"]!["duration"]}");
    }

    [Fact]
    public void Given_the_demo_region_when_fitted_then_a_positive_timing_coefficient_means_the_generator_ran_the_season_early()
    {
        // Reference: truth_seasons.csv phase_days, the generator's own shift of each season's cycle (+ = late). DESIGN.md:
        // timing positive = earlier season, so the timing coefficient must correlate positively with −phase_days. Over
        // ~6 000 seasons a correlation of 0.2 is many standard errors (≈ 0.013) from zero.
        var t = Array.IndexOf(Labels(), "timing") + 1;
        var phase = ReadCsv(Path.Combine(demo.Region, "truth_seasons.csv")).ToDictionary(r => (r["station"], r["season"]), r => double.Parse(r["phase_days"], CultureInfo.InvariantCulture));
        var pairs = ReadCsv(Path.Combine(demo.Results, "seasons.csv"))
            .Where(r => r[$"c{t}"].Length > 0)
            .Select(r => (Coefficient: double.Parse(r[$"c{t}"], CultureInfo.InvariantCulture), Early: -phase[(r["station"], r["season"])]))
            .ToArray();

        var r = Pearson(pairs.Select(p => p.Coefficient).ToArray(), pairs.Select(p => p.Early).ToArray());
        Assert.True(pairs.Length > 5000, $"{pairs.Length} seasons");
        Assert.True(r > 0.2, $"r(c{t}, -phase_days) = {r:F3}");
    }

    [Theory]
    [InlineData("timing", "centroid_day", -1)]
    [InlineData("duration", "longest_cover_days", 1)]
    public void Given_the_demo_region_when_regressed_then_the_labelled_component_moves_with_elevation_as_the_truth_says(string label, string truthMetric, int sign)
    {
        // Reference: truth.json "effects.ols_median", the generator's noise-free station medians regressed on elevation.
        // Higher stations have longer seasons (longest cover rises per km) whose snow lies later (the depth-weighted centroid
        // day rises per km: their snow lasts into spring, although it also starts earlier). Timing positive = earlier, so
        // its elevation effect must have the opposite sign of the centroid's; duration positive = longer, the same sign.
        var k = Array.IndexOf(Labels(), label) + 1;
        var truth = demo.Truth["effects"]!["ols_median"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == truthMetric)!;
        var model = demo.Regression["models"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == $"median_c{k}")!;
        var elevation = model["coefficients"]!.AsArray().Single(c => c!["name"]!.GetValue<string>() == "elevation_km")!;
        var expected = sign * Math.Sign(truth["elevation_km"]!.GetValue<double>());

        Assert.Equal(expected, Math.Sign(elevation["ci_low"]!.GetValue<double>()));
        Assert.Equal(expected, Math.Sign(elevation["ci_high"]!.GetValue<double>()));
    }

    private string[] Labels() =>
        JsonNode.Parse(File.ReadAllText(Path.Combine(demo.Results, "basis.json")))!["labels"]!.AsArray().Select(x => x!.GetValue<string>()).ToArray();

    private static List<Dictionary<string, string>> ReadCsv(string path)
    {
        var lines = File.ReadAllLines(path);
        var header = lines[0].Split(',');
        return lines.Skip(1).Select(l => l.Split(',')).Select(f => header.Select((h, i) => (h, f[i])).ToDictionary(x => x.h, x => x.Item2, StringComparer.Ordinal)).ToList();
    }

    private static double Pearson(double[] a, double[] b)
    {
        var ma = a.Average();
        var mb = b.Average();
        double sab = 0, saa = 0, sbb = 0;
        for (var i = 0; i < a.Length; i++)
        {
            sab += (a[i] - ma) * (b[i] - mb);
            saa += (a[i] - ma) * (a[i] - ma);
            sbb += (b[i] - mb) * (b[i] - mb);
        }

        return sab / Math.Sqrt(saa * sbb);
    }

    [Fact]
    public void Given_the_demo_region_when_regressed_then_component_1_grows_with_elevation_as_the_truth_says()
    {
        // truth.json "effects.ols": peak depth and duration both rise with elevation.
        var truthPeak = demo.Truth["effects"]!["ols"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == "peak_depth_mm")!;
        var truthDuration = demo.Truth["effects"]!["ols"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == "duration_days")!;
        var model = demo.Regression["models"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == "median_c1")!;
        var elevation = model["coefficients"]!.AsArray().Single(c => c!["name"]!.GetValue<string>() == "elevation_km")!;

        Assert.True(truthPeak["elevation_km"]!.GetValue<double>() > 0 && truthDuration["elevation_km"]!.GetValue<double>() > 0);
        Assert.True(elevation["ci_low"]!.GetValue<double>() > 0, $"median_c1 elevation effect interval starts at {elevation["ci_low"]}");
    }

    // The tool regresses station MEDIANS of observed, faulty seasons, so the reference is truth.json "effects.ols_median"
    // (the same regression on the station medians of the noise-free metrics). For skewed metrics (longest cover) faults
    // move observed medians by more than the interval, so the checks use onset, snow-covered days and peak depth.
    [Theory]
    [InlineData("median_onset_day", "onset_day")]
    [InlineData("median_snow_days", "snow_days")]
    [InlineData("median_peak_depth_mm", "peak_depth_mm")]
    public void Given_the_demo_region_when_regressed_then_the_elevation_effect_matches_the_generator_truth(string response, string truthMetric)
    {
        // Reference: truth.json "effects.ols_median" — least squares of the generator's noise-free station medians on
        // [1, elevation_km, coast_10km, latitude], written by the scenario generator (not by the regression stage).
        var truth = demo.Truth["effects"]!["ols_median"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == truthMetric)!;
        var model = demo.Regression["models"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == response)!;
        var elevation = model["coefficients"]!.AsArray().Single(c => c!["name"]!.GetValue<string>() == "elevation_km")!;
        var expected = truth["elevation_km"]!.GetValue<double>();
        var low = elevation["ci_low"]!.GetValue<double>();
        var high = elevation["ci_high"]!.GetValue<double>();

        Assert.True(Math.Sign(expected) == Math.Sign(elevation["estimate"]!.GetValue<double>()), $"{response}: sign differs from truth {expected}");
        Assert.True(low <= expected && expected <= high, $"{response}: truth {expected} outside the 95 % interval [{low}, {high}]");
    }

    [Theory]
    [InlineData("median_snow_days", "snow_days")]
    [InlineData("median_peak_depth_mm", "peak_depth_mm")]
    [InlineData("median_meltout_day", "meltout_day")]
    public void Given_the_demo_region_when_regressed_then_the_coast_effect_agrees_in_sign_with_the_truth(string response, string truthMetric)
    {
        // Reference: truth.json "effects.ols_median" coast_10km (generator's noise-free effect per 10 km inland, on medians).
        var truth = demo.Truth["effects"]!["ols_median"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == truthMetric)!;
        var model = demo.Regression["models"]!.AsArray().Single(m => m!["response"]!.GetValue<string>() == response)!;
        var coast = model["coefficients"]!.AsArray().Single(c => c!["name"]!.GetValue<string>() == "coast_10km")!;
        var expected = truth["coast_10km"]!.GetValue<double>();

        Assert.True(Math.Sign(expected) == Math.Sign(coast["estimate"]!.GetValue<double>()), $"{response}: coast estimate {coast["estimate"]} vs truth {expected}");
        Assert.True(coast["ci_low"]!.GetValue<double>() <= expected && expected <= coast["ci_high"]!.GetValue<double>(), $"{response}: truth {expected} outside [{coast["ci_low"]}, {coast["ci_high"]}]");
    }

    [Fact]
    public async Task The_map_page_serves_the_demo_results_including_the_fit_flags_of_seasons_csv()
    {
        // Regression: the page once refused every real results folder because seasons.csv's below_min_days holds
        // true/false, which its synthetic test folder did not have.
        await using var server = await Spatial.Viewer.ViewerServer.StartAsync(new Spatial.Viewer.ViewerOptions(demo.Results));
        using var http = new HttpClient { BaseAddress = server.Uri };
        var stations = File.ReadAllLines(Path.Combine(demo.Results, "station_list.csv")).Length - 1;

        Assert.Equal(stations, server.StationCount);
        Assert.Equal(System.Net.HttpStatusCode.OK, (await http.GetAsync("api/stations")).StatusCode);
        Assert.Equal(System.Net.HttpStatusCode.OK, (await http.GetAsync("api/stations/MF002/seasons")).StatusCode);
    }

    [Fact]
    public void GDAL_reads_the_demo_layers_and_predicted_surfaces_as_written()
    {
        // Real client: GDAL's ogrinfo and gdalinfo (Debian gdal-bin), as a GIS user would open the files.
        var ogrinfo = ExternalTool.Locate("ogrinfo", out var why);
        var gdalinfo = ExternalTool.Locate("gdalinfo", out var why2);
        if (ogrinfo is null || gdalinfo is null)
        {
            Console.WriteLine($"skipped: {why} {why2}");
            return;
        }

        var stations = File.ReadAllLines(Path.Combine(demo.Results, "station_list.csv")).Length - 1;
        var seasons = File.ReadAllLines(Path.Combine(demo.Results, "seasons.csv")).Length - 1;
        var (code, info, error) = ExternalTool.Run(ogrinfo, "-so", "-al", Path.Combine(demo.Results, "layers", "spatial.gpkg"));
        Assert.True(code == 0, error);
        Assert.Contains($"Layer name: stations", info, StringComparison.Ordinal);
        Assert.Contains($"Feature Count: {stations}", info, StringComparison.Ordinal);
        Assert.Contains($"Feature Count: {seasons}", info, StringComparison.Ordinal);

        var surface = Directory.GetFiles(Path.Combine(demo.Results, "regression"), "predicted_*.tif").Order(StringComparer.Ordinal).First();
        var (gcode, ginfo, gerror) = ExternalTool.Run(gdalinfo, surface);
        Assert.True(gcode == 0, gerror);
        Assert.Contains("ID[\"EPSG\",32625]", ginfo, StringComparison.Ordinal); // the demo DEM's CRS, UTM zone 25N
        Assert.Contains("NoData Value=nan", ginfo, StringComparison.Ordinal);    // sea cells masked
    }

    [Fact]
    public void The_report_is_self_contained_and_carries_the_caution()
    {
        var html = File.ReadAllText(Path.Combine(demo.Results, "report.html"));

        Assert.DoesNotMatch("(src|href)\\s*=\\s*\"https?:", html);
        Assert.Contains("do not replace", html, StringComparison.OrdinalIgnoreCase);
    }
}

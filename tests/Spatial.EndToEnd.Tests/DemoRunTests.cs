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
    public void Given_the_demo_region_when_fitted_then_component_1_is_amount_and_carries_a_longer_season()
    {
        // The generator makes seasons deeper and longer together with elevation (truth.json "effects": duration and peak
        // both rise per km). On Marrowfell the first component carries amount and duration as one mode: its duration
        // score (partial correlation of the two edges moving apart) must be clearly positive, i.e. more snow = longer.
        var basis = JsonNode.Parse(File.ReadAllText(Path.Combine(demo.Results, "basis.json")))!;
        var interpretation = JsonNode.Parse(File.ReadAllText(Path.Combine(demo.Results, "interpretation.json")))!;
        var first = interpretation["components"]!.AsArray()[0]!;

        Assert.Equal("amount", basis["labels"]!.AsArray()[0]!.GetValue<string>());
        Assert.Contains("duration", first["aspects"]!.AsArray().Select(x => x!.GetValue<string>()));
        Assert.True(first["scores"]!["duration"]!.GetValue<double>() > 0.3, $"duration score {first["scores"]!["duration"]}");
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

using System.Text.Json;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

public sealed class ExportVerbTests
{
    /// <summary>A minimal invented results folder (plumbing only): three stations, two seasons each.</summary>
    internal static string SmallResults()
    {
        var dir = TestData.NewScratchFolder("cli-results");
        File.WriteAllText(Path.Combine(dir, "station_list.csv"), "station,name,longitude,latitude,elevation_m\nA1,Alder,-8.2,58.6,400.5\nB2,\"Birch, low\",-8.1,58.7,120\nC3,Cairn,-8.0,58.65,880\n");
        File.WriteAllText(Path.Combine(dir, "stations.csv"), "station,seasons,median_c1,sen_per_decade_c1\nA1,2,150.5,-3.2\nB2,2,40.25,1.5\nC3,2,310,\n");
        File.WriteAllText(Path.Combine(dir, "seasons.csv"), "station,season,observed_days,c1,residual_0,residual_1\nA1,2018,300,140,1,0.3\nA1,2019,280,161,1,0.2\nB2,2018,300,38,1,0.4\nB2,2019,310,42.5,1,0.35\nC3,2018,290,300,1,0.1\nC3,2019,300,320,1,0.15\n");
        return dir;
    }

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    [Fact]
    public void Export_writes_every_format_and_prints_a_JSON_summary_with_feature_counts()
    {
        var dir = SmallResults();
        var outDir = Path.Combine(dir, "layers-out");
        var (code, stdout, stderr) = Run("export", dir, "--out", outDir, "--json");
        Assert.True(code == 0, stderr);
        using var summary = JsonDocument.Parse(stdout);
        Assert.Equal(3, summary.RootElement.GetProperty("FeatureCounts").GetProperty("stations").GetInt32());
        Assert.Equal(6, summary.RootElement.GetProperty("FeatureCounts").GetProperty("seasons").GetInt32());
        foreach (var f in new[] { "stations.geojson", "seasons.geojson", "spatial.gpkg", "stations.csv", "seasons.csv" })
        {
            Assert.True(File.Exists(Path.Combine(outDir, f)), f);
        }

        Assert.Contains("\"export\"", File.ReadAllText(Path.Combine(dir, "manifest.json")), StringComparison.Ordinal);
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Export_defaults_to_the_layers_folder_and_honours_the_format_list()
    {
        var dir = SmallResults();
        var (code, _, stderr) = Run("export", dir, "--format", "geojson");
        Assert.True(code == 0, stderr);
        Assert.True(File.Exists(Path.Combine(dir, "layers", "stations.geojson")));
        Assert.False(File.Exists(Path.Combine(dir, "layers", "spatial.gpkg")));
        Assert.Contains("coastline", stderr, StringComparison.Ordinal);
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Export_rejects_an_unknown_format_as_bad_usage()
    {
        var dir = SmallResults();
        var (code, _, stderr) = Run("export", dir, "--format", "geojson,shp");
        Assert.Equal(2, code);
        Assert.Contains("shp", stderr, StringComparison.Ordinal);
        Assert.False(Directory.Exists(Path.Combine(dir, "layers")));
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Export_of_a_missing_folder_is_a_one_line_data_error()
    {
        var (code, _, stderr) = Run("export", Path.Combine(Path.GetTempPath(), "spatial-no-such-folder-7"));
        Assert.Equal(1, code);
        Assert.Single(stderr.Trim().Split('\n'));
        Assert.Contains("does not exist", stderr, StringComparison.Ordinal);
    }

    [Fact]
    public void Export_rejects_a_precision_beyond_15_decimals()
    {
        var dir = SmallResults();
        var (code, _, _) = Run("export", dir, "--precision", "16");
        Assert.Equal(2, code);
        Directory.Delete(dir, true);
    }
}

using System.Text.Json;
using Spatial.Core.IO;
using Spatial.Scenario;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

public sealed class ScenarioVerbTests : IDisposable
{
    private readonly string folder = TestData.NewScratchFolder("scenario-verb");

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    [Fact]
    public void Given_a_folder_when_scenario_runs_then_it_writes_the_region_the_library_writes_and_a_manifest()
    {
        var outDir = Path.Combine(folder, "region");
        var (code, stdout, stderr) = Run("scenario", "--out", outDir, "--seed", "4", "--stations", "12", "--seasons", "3", "--json");
        Assert.True(code == 0, stderr);

        using var summary = JsonDocument.Parse(stdout);
        Assert.Equal(12, summary.RootElement.GetProperty("Stations").GetInt32());
        Assert.Equal(6, summary.RootElement.GetProperty("Files").GetArrayLength());

        // The verb's files are byte for byte those of the library for the same options.
        var libDir = Path.Combine(folder, "library");
        ScenarioFiles.Write(libDir, MarrowfellScenario.Generate(new ScenarioOptions(Seed: 4, Stations: 12, Seasons: 3)));
        foreach (var name in new[] { ScenarioFiles.Coastline, ScenarioFiles.Dem, ScenarioFiles.StationList, ScenarioFiles.Records, ScenarioFiles.Truth, ScenarioFiles.TruthSeasons })
        {
            Assert.Equal(Sha256File.Of(Path.Combine(libDir, name)), Sha256File.Of(Path.Combine(outDir, name)));
        }

        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(outDir, ResultLayout.Manifest)));
        var p = manifest.RootElement.GetProperty("runs").GetProperty("scenario").GetProperty("parameters");
        Assert.Equal("4", p.GetProperty("seed").GetString());
        Assert.Equal("12", p.GetProperty("stations").GetString());
        Assert.Equal("3", p.GetProperty("seasons").GetString());
    }

    [Theory]
    [InlineData("--stations", "0")]
    [InlineData("--seasons", "1")]
    [InlineData("--threads", "0")]
    public void Given_an_option_out_of_range_when_scenario_runs_then_it_exits_2_with_one_line_and_writes_nothing(string option, string value)
    {
        var outDir = Path.Combine(folder, "bad");
        var (code, _, stderr) = Run("scenario", "--out", outDir, option, value);
        Assert.Equal(ExitCodes.BadUsage, code);
        Assert.Single(stderr.Trim().Split('\n'));
        Assert.Contains(option, stderr, StringComparison.Ordinal);
        Assert.False(Directory.Exists(outDir));
    }

    [Fact]
    public void Given_no_out_option_when_scenario_runs_then_it_is_a_usage_error()
    {
        var (code, _, stderr) = Run("scenario");
        Assert.Equal(ExitCodes.BadUsage, code);
        Assert.Contains("--out", stderr, StringComparison.Ordinal);
    }
}

using Spatial.Cli;
using Spatial.Core;
using Spatial.Records;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

/// <summary>The fit and apply verbs, in process, on a small seeded matrix (plumbing data).</summary>
public sealed class FitVerbTests : IDisposable
{
    private readonly string dir = TestData.NewScratchFolder("fit-verb");

    public void Dispose() => Directory.Delete(dir, true);

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    /// <summary>Seasons of one bump whose size and date vary, 20% of days missing; the last season is flagged below the minimum.</summary>
    private string WriteMatrix(string name, int stations = 6, int seasons = 15, int seed = 5)
    {
        var rng = new Random(seed);
        var keys = new List<SeasonKey>();
        var data = new List<float>();
        for (var s = 0; s < stations; s++)
        {
            for (var y = 0; y < seasons; y++)
            {
                var amount = 300 + (200 * rng.NextDouble()) + (10 * y);
                var centre = 170 + (30 * (rng.NextDouble() - 0.5));
                var observed = 0;
                for (var d = 0; d < 365; d++)
                {
                    var x = amount * Math.Exp(-0.5 * Math.Pow((d - centre) / 40.0, 2));
                    var missing = rng.NextDouble() < 0.2;
                    data.Add(missing ? float.NaN : (float)x);
                    observed += missing ? 0 : 1;
                }

                keys.Add(new SeasonKey(new StationId($"ST{s:00}"), 1990 + y, observed, s == stations - 1 && y == seasons - 1));
            }
        }

        var path = Path.Combine(dir, name);
        SeasonMatrixFile.Write(path, new SeasonMatrix(SeasonCalendar.Default, keys, data.ToArray()));
        return path;
    }

    [Fact]
    public void Fit_writes_the_four_contract_files_with_the_contract_columns_and_a_manifest()
    {
        var matrix = WriteMatrix("matrix.parquet");
        var outDir = Path.Combine(dir, "out");
        var (code, output, error) = Run("fit", matrix, "--out", outDir, "--components", "3");
        Assert.True(code == ExitCodes.Done, error);
        Assert.Contains("component", output, StringComparison.Ordinal);
        foreach (var f in new[] { "basis.json", "seasons.csv", "stations.csv", "interpretation.json", "manifest.json" })
        {
            Assert.True(File.Exists(Path.Combine(outDir, f)), f);
        }

        var header = File.ReadLines(Path.Combine(outDir, "seasons.csv")).First().Split(',');
        string[] expected = ["station", "season", "observed_days", "c1", "c2", "c3", "residual_0", "residual_1", "residual_2", "residual_3", "onset_day", "meltout_day", "longest_cover_days", "snow_days", "peak_depth_mm", "peak_day", "centroid_day"];
        Assert.Equal(expected, header.Take(expected.Length));
        Assert.Equal(["below_min_days", "modelled_bare_days"], header.Skip(expected.Length)); // added columns, after the contract's
        var interpretation = File.ReadAllText(Path.Combine(outDir, "interpretation.json"));
        Assert.Contains("\"partial_correlations\"", interpretation, StringComparison.Ordinal);
        Assert.Contains("\"aspects\"", interpretation, StringComparison.Ordinal);
        Assert.Equal(91, File.ReadLines(Path.Combine(outDir, "seasons.csv")).Count());
        var stations = File.ReadLines(Path.Combine(outDir, "stations.csv")).First().Split(',');
        Assert.Equal(["station", "seasons", "median_c1", "iqr_c1", "mk_s_c1", "mk_z_c1", "mk_p_c1", "sen_per_decade_c1"], stations.Take(8));
        Assert.Contains("sen_per_decade_centroid_day", stations);
        Assert.Contains("\"fit\"", File.ReadAllText(Path.Combine(outDir, "manifest.json")), StringComparison.Ordinal);
    }

    [Fact]
    public void Fit_with_json_prints_a_summary_and_a_second_run_gives_identical_files()
    {
        var matrix = WriteMatrix("matrix.parquet");
        var a = Path.Combine(dir, "a");
        var b = Path.Combine(dir, "b");
        var (code, output, _) = Run("fit", matrix, "--out", a, "--json", "--refine");
        Assert.Equal(ExitCodes.Done, code);
        Assert.Contains("\"variance_fraction\"", output, StringComparison.Ordinal);
        Assert.Equal(ExitCodes.Done, Run("fit", matrix, "--out", b, "--json", "--refine").Code);
        foreach (var f in new[] { "basis.json", "seasons.csv", "stations.csv", "interpretation.json" })
        {
            Assert.Equal(File.ReadAllBytes(Path.Combine(a, f)), File.ReadAllBytes(Path.Combine(b, f)));
        }
    }

    [Fact]
    public void Apply_projects_a_matrix_onto_a_saved_basis_and_writes_anomalies()
    {
        var matrix = WriteMatrix("matrix.parquet");
        var fitDir = Path.Combine(dir, "fit");
        Assert.Equal(ExitCodes.Done, Run("fit", matrix, "--out", fitDir).Code);
        var fresh = WriteMatrix("new.parquet", stations: 2, seasons: 3, seed: 9);
        var applyDir = Path.Combine(dir, "apply");
        var (code, _, error) = Run("apply", Path.Combine(fitDir, "basis.json"), fresh, "--out", applyDir);
        Assert.True(code == ExitCodes.Done, error);
        var lines = File.ReadAllLines(Path.Combine(applyDir, "anomalies.csv"));
        Assert.Equal(7, lines.Length);
        Assert.Contains("z_c1", lines[0].Split(','));
        Assert.Contains("percentile_c4", lines[0].Split(','));
    }

    [Fact]
    public void Apply_with_a_basis_of_another_format_version_is_a_one_line_data_error()
    {
        var matrix = WriteMatrix("matrix.parquet");
        var fitDir = Path.Combine(dir, "fit");
        Assert.Equal(ExitCodes.Done, Run("fit", matrix, "--out", fitDir).Code);
        var basisPath = Path.Combine(fitDir, "basis.json");
        File.WriteAllText(basisPath, File.ReadAllText(basisPath).Replace("\"format_version\": 1", "\"format_version\": 99", StringComparison.Ordinal));
        var (code, _, error) = Run("apply", basisPath, matrix, "--out", Path.Combine(dir, "x"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("format_version 99", error, StringComparison.Ordinal);
        Assert.Single(error.Trim().Split('\n'));
    }

    [Fact]
    public void Fit_lists_the_seasons_a_user_asks_for_and_prints_the_label_scores_and_each_em_iteration()
    {
        var matrix = WriteMatrix("matrix.parquet");
        var outDir = Path.Combine(dir, "sel");
        var (code, output, error) = Run("fit", matrix, "--out", outDir, "--components", "2", "--refine", "--max-iterations", "3", "--select-below", "0.2", "--select-count", "4");
        Assert.True(code == ExitCodes.Done, error);

        var interpretation = System.Text.Json.Nodes.JsonNode.Parse(File.ReadAllText(Path.Combine(outDir, "interpretation.json")))!;
        var selection = interpretation["selections"]!.AsArray()[0]!;
        Assert.Equal(0.2, selection["residual_below"]!.GetValue<double>());
        Assert.Equal(4, selection["highest"]!.AsArray().Count);
        Assert.All(selection["highest"]!.AsArray(), s => Assert.True(s!["residual"]!.GetValue<double>() < 0.2));
        Assert.Contains("EM iteration  1:", output, StringComparison.Ordinal);
        Assert.Contains("amount  timing  duration", output, StringComparison.Ordinal);
        Assert.Contains("\"select_below\": \"0.2\"", File.ReadAllText(Path.Combine(outDir, "manifest.json")), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("--select-below", "0")]
    [InlineData("--select-below", "1.5")]
    [InlineData("--select-count", "0")]
    [InlineData("--max-iterations", "0")]
    [InlineData("--tolerance", "-1")]
    [InlineData("--tolerance", "1e-9")]
    [InlineData("--threads", "0")]
    public void Fit_with_an_option_out_of_range_is_bad_usage_and_writes_nothing(string option, string value)
    {
        var matrix = WriteMatrix("matrix.parquet");
        var outDir = Path.Combine(dir, "bad");
        var (code, _, error) = Run("fit", matrix, "--out", outDir, option, value);
        Assert.Equal(ExitCodes.BadUsage, code);
        Assert.Contains(option, error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(outDir));
    }

    [Fact]
    public void Fit_with_zero_components_is_bad_usage_and_a_missing_matrix_is_bad_input()
    {
        var outDir = Path.Combine(dir, "o");
        Assert.Equal(ExitCodes.BadUsage, Run("fit", "m.parquet", "--out", outDir, "--components", "0").Code);
        var (code, _, error) = Run("fit", Path.Combine(dir, "none.parquet"), "--out", outDir);
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.DoesNotContain("   at ", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(outDir));
    }
}

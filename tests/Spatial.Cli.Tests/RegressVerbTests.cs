using System.Globalization;
using System.Text;
using System.Text.Json;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

/// <summary><c>spatial regress</c> run in-process.</summary>
public sealed class RegressVerbTests : IDisposable
{
    private readonly string folder = TestData.NewScratchFolder("regress-verb");

    public void Dispose() => Directory.Delete(folder, true);

    /// <summary>Plumbing table (invented): 40 stations, y = 5 + 0.02·elevation − 0.1·coast + a small seeded wobble.</summary>
    private string WriteTable()
    {
        var rng = new Random(3);
        var sb = new StringBuilder("station,longitude,latitude,elevation_m,coast_km,duration\n");
        for (var i = 0; i < 40; i++)
        {
            var lon = 6 + rng.NextDouble();
            var lat = 61 + rng.NextDouble();
            var elev = 1000 * rng.NextDouble();
            var coast = 50 * rng.NextDouble();
            var y = 5 + (0.02 * elev) - (0.1 * coast) + (rng.NextDouble() - 0.5);
            sb.Append(CultureInfo.InvariantCulture, $"S{i:D2},{lon:R},{lat:R},{elev:R},{coast:R},{y:R}\n");
        }

        var path = Path.Combine(folder, "table.csv");
        File.WriteAllText(path, sb.ToString());
        return path;
    }

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    [Fact]
    public void Given_a_table_When_regress_runs_with_out_Then_it_prints_the_coefficient_table_and_writes_the_results_folder()
    {
        var table = WriteTable();
        var results = Path.Combine(folder, "results");

        var (code, output, err) = Run("regress", "--table", table, "--response", "duration", "--predictors", "elevation_m,coast_km", "--out", results, "--block-km", "20", "--permutations", "99");

        Assert.True(code == 0, err);
        Assert.Contains("elevation_m", output, StringComparison.Ordinal);
        Assert.Contains("Moran's I", output, StringComparison.Ordinal);
        Assert.Contains("block cross-validation", output, StringComparison.Ordinal);
        Assert.True(File.Exists(Path.Combine(results, "regression", "regression.json")));
        Assert.True(File.Exists(Path.Combine(results, "regression", "fitted.csv")));
        Assert.True(File.Exists(Path.Combine(results, "manifest.json")));
    }

    [Fact]
    public void Given_json_When_regress_runs_with_a_local_model_Then_the_summary_parses_and_holds_the_coefficients()
    {
        var table = WriteTable();

        var (code, output, err) = Run("regress", "--table", table, "--response", "duration", "--predictors", "elevation_m,coast_km", "--local", "bisquare", "--adaptive", "--json", "--permutations", "0");

        Assert.True(code == 0, err);
        var model = JsonDocument.Parse(output).RootElement.GetProperty("models")[0];
        Assert.Equal(3, model.GetProperty("coefficients").GetArrayLength());
        Assert.Equal("bisquare", model.GetProperty("local").GetProperty("kernel").GetString());
        var slope = model.GetProperty("coefficients")[1].GetProperty("estimate").GetDouble();
        Assert.InRange(slope, 0.019, 0.021);
    }

    [Fact]
    public void Given_a_non_numeric_cell_When_regress_runs_Then_it_exits_1_with_one_located_line()
    {
        var path = Path.Combine(folder, "bad.csv");
        File.WriteAllText(path, "station,y,x\nA,1,2\nB,2,x7\nC,3,4\nD,5,5\n");

        var (code, _, err) = Run("regress", "--table", path, "--response", "y", "--predictors", "x");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Single(err.Trim().Split('\n'));
        Assert.Contains("bad.csv:3:3", err, StringComparison.Ordinal);
    }

    [Fact]
    public void Given_adaptive_without_local_When_regress_runs_Then_it_is_a_usage_error()
    {
        var table = WriteTable();

        var (code, _, err) = Run("regress", "--table", table, "--response", "duration", "--predictors", "elevation_m", "--adaptive");

        Assert.Equal(ExitCodes.BadUsage, code);
        Assert.Contains("--local", err, StringComparison.Ordinal);
    }
}

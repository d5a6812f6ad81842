using System.Globalization;
using System.Text;
using System.Text.Json;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>The stage entry (table → report) and the result files.</summary>
public sealed class RegressionRunTests
{
    private static Table NetworkTable(int n, int seed)
    {
        var (lon, lat, elev, coast, y, _) = SpatialFixtures.Network(n, seed, varying: false);
        var sb = new StringBuilder("station,longitude,latitude,elevation_m,coast_km,duration\n");
        for (var i = 0; i < n; i++)
        {
            sb.Append(CultureInfo.InvariantCulture, $"ST{i:D3},{lon[i]:R},{lat[i]:R},{elev[i]:R},{coast[i]:R},{y[i]:R}\n");
        }

        return Table.ParseCsv(sb.ToString(), "network.csv");
    }

    [Fact]
    public void Given_a_cell_that_is_not_a_number_When_fitted_Then_the_error_names_file_line_and_column()
    {
        var t = Table.ParseCsv("station,y,x\nA,1,2\nB,2,3\nC,3,abc\nD,5,6\n", "t.csv");

        var e = Assert.Throws<SpatialDataException>(() => RegressionRun.Fit(t, new ModelSpec("y", ["x"]), new RegressionOptions()));

        Assert.Equal("t.csv", e.Diagnostic.File);
        Assert.Equal(4, e.Diagnostic.Line);
        Assert.Equal(3, e.Diagnostic.Column);
        Assert.Contains("'x'", e.Diagnostic.Message, StringComparison.Ordinal);
        Assert.Contains("abc", e.Diagnostic.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Given_empty_cells_in_used_columns_When_fitted_Then_those_rows_are_dropped_and_counted()
    {
        // Plumbing: y = 1 + 2x exactly on the complete rows; the unused column 'note' may be empty.
        var t = Table.ParseCsv("station,y,x,note\nA,3,1,\nB,5,2,k\nC,,3,\nD,9,4,\nE,11,,\nF,13,6,\n", "t.csv");

        var r = RegressionRun.Fit(t, new ModelSpec("y", ["x"]), new RegressionOptions());

        Assert.Equal(6, r.RowsRead);
        Assert.Equal(2, r.RowsDropped);
        Assert.Equal(["A", "B", "D", "F"], r.RowIds);
        Tolerance.Near(2.0, r.Fit.Coefficients[1].Estimate, 1e-14, "slope");
    }

    [Fact]
    public void Given_a_missing_column_When_fitted_Then_the_error_lists_the_columns()
    {
        var t = Table.ParseCsv("y,x\n1,2\n2,3\n3,5\n", "t.csv");

        var e = Assert.Throws<SpatialDataException>(() => RegressionRun.Fit(t, new ModelSpec("y", ["elevation_m"]), new RegressionOptions()));

        Assert.Contains("elevation_m", e.Message, StringComparison.Ordinal);
        Assert.Contains("columns: y, x", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Given_a_table_with_coordinates_When_fitted_with_all_diagnostics_Then_every_part_is_present_and_effects_are_recovered()
    {
        var t = NetworkTable(200, 21);
        var options = new RegressionOptions { BlockKm = 25, Local = new GwrSpec(GwrKernel.Bisquare, true), Permutations = 99 };

        var r = RegressionRun.Fit(t, new ModelSpec("duration", ["elevation_m", "coast_km"]), options);

        // Truth of the synthetic network: 0.01 per m of elevation, −0.05 per km from the coast.
        var elev = r.Fit.Coefficients[1];
        var coast = r.Fit.Coefficients[2];
        Assert.InRange(0.01, elev.CiLow, elev.CiHigh);
        Assert.InRange(-0.05, coast.CiLow, coast.CiHigh);
        Assert.NotNull(r.Moran);
        Assert.NotNull(r.BlockCv);
        Assert.NotNull(r.Local);
        Assert.Equal(5, r.Influential.Count);
        Assert.True(r.Influential[0].CooksDistance >= r.Influential[1].CooksDistance);
        Assert.True(r.Moran!.PPermutation > 0.01, "independent noise should show no residual autocorrelation at 1 %");
    }

    [Fact]
    public void Given_the_same_reports_When_written_twice_Then_the_files_are_byte_identical_and_follow_the_contract()
    {
        var t = NetworkTable(80, 4);
        var options = new RegressionOptions { BlockKm = 30, Local = new GwrSpec(GwrKernel.Gaussian, false), Permutations = 49 };
        var reports = new[] { RegressionRun.Fit(t, new ModelSpec("duration", ["elevation_m", "coast_km"]), options) };
        var a = TestData.NewScratchFolder("regress-a");
        var b = TestData.NewScratchFolder("regress-b");
        try
        {
            ResultFiles.Write(a, reports);
            ResultFiles.Write(b, [RegressionRun.Fit(t, new ModelSpec("duration", ["elevation_m", "coast_km"]), options)]);

            foreach (var f in new[] { ResultFiles.RegressionJson, ResultFiles.FittedCsv, ResultFiles.LocalCsv })
            {
                Assert.Equal(File.ReadAllBytes(Path.Combine(a, f)), File.ReadAllBytes(Path.Combine(b, f)));
            }

            // DEVELOPERS.md "regress → regression/" column and key names.
            Assert.StartsWith("station,response,observed,fitted,residual,leverage,cooks_distance", File.ReadAllLines(Path.Combine(a, ResultFiles.FittedCsv))[0], StringComparison.Ordinal);
            Assert.Equal("station,response,local_r2,local_intercept,local_se_intercept,local_elevation_m,local_se_elevation_m,local_coast_km,local_se_coast_km", File.ReadAllLines(Path.Combine(a, ResultFiles.LocalCsv))[0]);
            Assert.Equal(81, File.ReadAllLines(Path.Combine(a, ResultFiles.FittedCsv)).Length);
            var model = JsonDocument.Parse(File.ReadAllBytes(Path.Combine(a, ResultFiles.RegressionJson))).RootElement.GetProperty("models")[0];
            foreach (var key in new[] { "response", "predictors", "n", "df_residual", "coefficients", "sigma", "r2", "adj_r2", "f", "f_p", "aic", "bic", "condition_number", "breusch_pagan", "influential", "moran", "block_cv", "local" })
            {
                Assert.True(model.TryGetProperty(key, out _), $"regression.json lacks '{key}'");
            }

            foreach (var key in new[] { "name", "estimate", "se", "t", "p", "ci_low", "ci_high", "se_hc3", "standardised", "vif" })
            {
                Assert.True(model.GetProperty("coefficients")[1].TryGetProperty(key, out _), $"coefficient lacks '{key}'");
            }

            foreach (var key in new[] { "weights", "i", "expected", "variance_normal", "z_normal", "variance_randomisation", "z_randomisation", "p_permutation", "permutations" })
            {
                Assert.True(model.GetProperty("moran").TryGetProperty(key, out _), $"moran lacks '{key}'");
            }

            foreach (var key in new[] { "block_km", "rmse_in_sample", "r2_in_sample", "rmse_out_of_block", "r2_out_of_block" })
            {
                Assert.True(model.GetProperty("block_cv").TryGetProperty(key, out _), $"block_cv lacks '{key}'");
            }

            foreach (var key in new[] { "kernel", "adaptive", "bandwidth", "aicc" })
            {
                Assert.True(model.GetProperty("local").TryGetProperty(key, out _), $"local lacks '{key}'");
            }

            Assert.Equal(JsonValueKind.Null, model.GetProperty("coefficients")[0].GetProperty("vif").ValueKind);
        }
        finally
        {
            Directory.Delete(a, true);
            Directory.Delete(b, true);
        }
    }
}

/// <summary>Tables built from cells by a caller (the lead's join of station summaries and covariates).</summary>
public sealed class TableFromCellsTests
{
    [Fact]
    public void Given_joined_cells_When_fitted_Then_the_decimal_text_is_used_and_rows_are_numbered_from_line_2()
    {
        // Plumbing: y = 2 + 3x exactly.
        var t = Table.FromCells("joined", ["station", "x", "y"], [["A", "0.1", "2.3"], ["B", "0.2", "2.6"], ["C", "0.3", "2.9"], ["D", "x", "3.2"]]);

        var e = Assert.Throws<SpatialDataException>(() => RegressionRun.Fit(t, new ModelSpec("y", ["x"]), new RegressionOptions()));

        Assert.Equal(5, e.Diagnostic.Line);
        var ok = Table.FromCells("joined", ["station", "x", "y"], [["A", "0.1", "2.3"], ["B", "0.2", "2.6"], ["C", "0.3", "2.9"], ["D", "0.4", "3.2"]]);
        var r = RegressionRun.Fit(ok, new ModelSpec("y", ["x"]), new RegressionOptions());
        Tolerance.Near(3.0, r.Fit.Coefficients[1].Estimate, 1e-13, "slope");
    }

    [Fact]
    public void Given_a_duplicated_column_name_When_a_table_is_built_from_cells_Then_it_is_a_located_error() =>
        Assert.Throws<SpatialDataException>(() => Table.FromCells("joined", ["station", "x", "x"], []));
}

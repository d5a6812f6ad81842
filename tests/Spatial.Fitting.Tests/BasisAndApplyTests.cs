using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

public sealed class BasisAndApplyTests : IDisposable
{
    private readonly string dir = TestData.NewScratchFolder("basis");

    public void Dispose() => Directory.Delete(dir, true);

    private static FitResult SmallFit(int seed = 81)
    {
        var basis = Synthetic.OrthonormalBasis(3, seed);
        var (matrix, _) = Synthetic.LowRank(Synthetic.MeanCurve(), basis, [300, 100, 50], rows: 300, missing: 0.25, seed: seed + 1, noiseMm: 2);
        return SeasonalFit.Fit(matrix, new FitOptions(Components: 3));
    }

    [Fact]
    public void A_written_basis_reads_back_equal_to_the_last_bit()
    {
        var fit = SmallFit();
        var path = Path.Combine(dir, "basis.json");
        BasisFile.Write(path, fit.Basis);
        var back = BasisFile.Read(path);
        Assert.Equal(fit.Basis.Mean, back.Mean);
        Assert.Equal(fit.Basis.Components[2], back.Components[2]);
        Assert.Equal(fit.Basis.Eigenvalues, back.Eigenvalues);
        Assert.Equal(fit.Basis.Labels, back.Labels);
        Assert.Equal(fit.Basis.Training[0].Quantiles, back.Training[0].Quantiles);
        Assert.Equal(fit.Basis.Metrics, back.Metrics);
        BasisFile.Write(Path.Combine(dir, "again.json"), back);
        Assert.Equal(File.ReadAllBytes(path), File.ReadAllBytes(Path.Combine(dir, "again.json")));
    }

    [Fact]
    public void A_basis_of_another_format_version_is_a_clear_data_error()
    {
        var path = Path.Combine(dir, "basis.json");
        BasisFile.Write(path, SmallFit().Basis);
        File.WriteAllText(path, File.ReadAllText(path).Replace("\"format_version\": 1", "\"format_version\": 2", StringComparison.Ordinal));
        var e = Assert.Throws<SpatialDataException>(() => BasisFile.Read(path));
        Assert.Contains("format_version 2", e.Message, StringComparison.Ordinal);
        File.WriteAllText(path, "{\"mean\": []}");
        Assert.Throws<SpatialDataException>(() => BasisFile.Read(path));
        File.WriteAllText(path, "not json");
        Assert.Throws<SpatialDataException>(() => BasisFile.Read(path));
    }

    [Fact]
    public void Applying_the_basis_to_its_own_training_matrix_gives_the_fitted_coefficients_and_central_percentiles()
    {
        var basisCurves = Synthetic.OrthonormalBasis(3, 91);
        var (matrix, _) = Synthetic.LowRank(Synthetic.MeanCurve(), basisCurves, [300, 100, 50], rows: 400, missing: 0.25, seed: 92, noiseMm: 2);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 3));
        var applied = SeasonalFit.Apply(fit.Basis, matrix, new ApplyOptions());
        for (var r = 0; r < matrix.Rows; r++)
        {
            for (var c = 0; c < 3; c++)
            {
                Assert.Equal(fit.Seasons.Coefficient(r, c), applied.Seasons.Coefficient(r, c));
            }
        }

        // z-scores of the training seasons have mean 0 and sd 1; percentiles spread over 0…100 with median near 50.
        var z = Enumerable.Range(0, matrix.Rows).Select(r => applied.ZScores[r * 3]).ToArray();
        Tolerance.Near(0, z.Average(), 1e-9, "mean z");
        Tolerance.Near(1, Math.Sqrt(z.Sum(v => v * v) / (z.Length - 1)), 1e-9, "sd z");
        var pct = Enumerable.Range(0, matrix.Rows).Select(r => applied.Percentiles[r * 3]).OrderBy(v => v).ToArray();
        Tolerance.Near(50, pct[pct.Length / 2], 1.0, "median percentile");
        Assert.Equal(0, pct[0]);
        Assert.Equal(100, pct[^1]);
    }

    [Fact]
    public void Applying_to_a_matrix_with_another_season_start_is_a_data_error()
    {
        var fit = SmallFit();
        var m = new SeasonMatrix(new SeasonCalendar(3, 1), [new SeasonKey(new StationId("A"), 2000, 365, false)], new float[365]);
        Assert.Throws<SpatialDataException>(() => SeasonalFit.Apply(fit.Basis, m, new ApplyOptions()));
    }

    [Fact]
    public void Fit_files_carry_the_contract_columns_and_unknown_metrics_as_empty_fields()
    {
        var fit = SmallFit();
        FitFiles.Write(dir, fit);
        var lines = File.ReadAllLines(Path.Combine(dir, "seasons.csv"));
        Assert.StartsWith("station,season,observed_days,c1,c2,c3,residual_0,residual_1,residual_2,residual_3,onset_day,meltout_day,longest_cover_days,snow_days,peak_depth_mm,peak_day,centroid_day", lines[0], StringComparison.Ordinal);
        Assert.Equal(301, lines.Length);
        Assert.Contains(",,", string.Join('\n', lines.Skip(1)), StringComparison.Ordinal); // 25% random gaps leave some metrics unknown
        var interp = File.ReadAllText(Path.Combine(dir, "interpretation.json"));
        Assert.Contains("\"worst_described\"", interp, StringComparison.Ordinal);
        Assert.Contains("\"cause\"", interp, StringComparison.Ordinal);
    }
}

using System.Globalization;
using System.Text.Json;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>Principal components of Fisher's iris data against numpy 1.24.2 / LAPACK syevd (data/pca/iris_pca_numpy.json, see data/pca/SOURCES.md).</summary>
public sealed class IrisPcaTests
{
    // The matrix stores float32; iris values have 2–3 significant digits, so float rounding limits agreement to ~1e-6 relative.
    private const double RelativeTolerance = 2e-6;
    private const double LoadingTolerance = 1e-5;

    // Eigenvalue errors from float32 products are bounded relative to the largest eigenvalue (‖C‖), not to each one.
    private const double EigenvalueToleranceOfLargest = 1e-6;

    [Theory]
    [InlineData("iris_all_cov", 150)]
    [InlineData("iris_setosa_cov", 50)]
    public void Given_iris_measurements_as_four_observed_days_When_fitted_Then_mean_eigenvalues_and_components_match_LAPACK(string caseId, int flowers)
    {
        var rows = File.ReadAllLines(TestData.Path("pca", "iris.csv")).Skip(1).Take(flowers)
            .Select(l => l.Split(',').Skip(1).Take(4).Select(s => double.Parse(s, CultureInfo.InvariantCulture)).ToArray()).ToArray();
        var data = new float[flowers * 365];
        Array.Fill(data, float.NaN);
        var keys = new List<SeasonKey>();
        for (var r = 0; r < flowers; r++)
        {
            for (var v = 0; v < 4; v++)
            {
                data[(r * 365) + v] = (float)rows[r][v];
            }

            keys.Add(new SeasonKey(new StationId($"flower{r + 1:000}"), 2000, 4, false));
        }

        var matrix = new SeasonMatrix(SeasonCalendar.Default, keys, data);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 4));

        using var doc = JsonDocument.Parse(File.ReadAllText(TestData.Path("pca", "iris_pca_numpy.json")));
        var c = doc.RootElement.GetProperty("cases").EnumerateArray().Single(e => e.GetProperty("id").GetString() == caseId);
        var means = c.GetProperty("column_means").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        var eig = c.GetProperty("eigenvalues").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        var ratio = c.GetProperty("explained_variance_ratio").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        var vectors = c.GetProperty("eigenvectors_columns").EnumerateArray().Select(r => r.EnumerateArray().Select(e => e.GetDouble()).ToArray()).ToArray();
        for (var v = 0; v < 4; v++)
        {
            // numpy mean of the columns
            Tolerance.Relative(means[v], fit.Basis.Mean[v], RelativeTolerance, $"mean[{v}]");
            // numpy.linalg.eigh of the covariance (denominator n − 1), descending
            Tolerance.Near(eig[v], fit.Basis.Eigenvalues[v], EigenvalueToleranceOfLargest * eig[0], $"eigenvalue {v + 1}");
            Tolerance.Near(ratio[v], fit.Basis.VarianceFraction[v], EigenvalueToleranceOfLargest, $"explained variance ratio {v + 1}");
        }

        Assert.True(double.IsNaN(fit.Basis.Mean[10]), "a day never observed has an unknown mean");
        for (var k = 0; k < 4; k++)
        {
            var sign = Math.Sign(Enumerable.Range(0, 4).Sum(i => vectors[i][k] * fit.Basis.Components[k][i]));
            for (var i = 0; i < 4; i++)
            {
                // Components compared up to sign (LAPACK eigenvectors, columns).
                Tolerance.Near(vectors[i][k], sign * fit.Basis.Components[k][i], LoadingTolerance, $"loading {i} on component {k + 1}");
            }
        }
    }
}

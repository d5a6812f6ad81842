using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>Block cross-validation, local regression and gridded prediction on seeded synthetic networks.</summary>
public sealed class SpatialMethodTests
{
    [Fact]
    public void Given_a_very_large_Gaussian_bandwidth_When_GWR_is_fitted_Then_it_reproduces_the_global_fit()
    {
        var (lon, lat, elev, coast, y, _) = SpatialFixtures.Network(120, 7, varying: false);
        var ols = LeastSquares.Fit(["elev", "coast"], [elev, coast], y, true, null, "synthetic");

        // 1e7 km against a 200 km network: kernel weights differ from 1 by < 1e-9.
        var gwr = Gwr.Fit(["elev", "coast"], [elev, coast], y, true, lon, lat, new GwrSpec(GwrKernel.Gaussian, false, 1e7));

        for (var i = 0; i < y.Length; i++)
        {
            for (var j = 0; j < 3; j++)
            {
                Tolerance.Relative(ols.Coefficients[j].Estimate, gwr.Coefficients[i][j], 1e-7, $"row {i} coefficient {j}");
                Tolerance.Relative(ols.Coefficients[j].StandardError, gwr.StandardErrors[i][j], 1e-6, $"row {i} SE {j}");
            }

            Tolerance.Near(ols.RSquared, gwr.LocalR2[i], 1e-7, $"row {i} local R²");
            Tolerance.Near(ols.Fitted[i], gwr.Fitted[i], 1e-7, $"row {i} fitted");
        }

        Tolerance.Near(3.0, gwr.TraceS, 1e-6, "tr S equals p for the global fit");
        Tolerance.Relative(ols.Sigma, gwr.Sigma, 1e-6, "sigma");
    }

    [Fact]
    public void Given_a_slope_that_grows_eastwards_When_GWR_chooses_its_bandwidth_Then_local_slopes_follow_the_truth()
    {
        var (lon, lat, elev, coast, y, truth) = SpatialFixtures.Network(300, 11, varying: true);

        var gwr = Gwr.Fit(["elev", "coast"], [elev, coast], y, true, lon, lat, new GwrSpec(GwrKernel.Bisquare, true));

        Assert.InRange(gwr.Bandwidth, 3, 299);
        Assert.True(gwr.Bandwidth < 299, "a spatially varying slope should not choose the global fit");
        var local = gwr.Coefficients.Select(c => c[1]).ToArray();
        var corr = MathNet.Numerics.Statistics.Correlation.Pearson(truth, local);
        Assert.True(corr > 0.9, $"local elevation slopes should track the true slope (r = {corr:F3})");
        var ols = LeastSquares.Fit(["elev", "coast"], [elev, coast], y, true, null, "synthetic");
        var olsAicc = (2 * 300 * Math.Log(Math.Sqrt(ols.ResidualSumOfSquares / 300))) + (300 * Math.Log(2 * Math.PI)) + (300.0 * (300 + 3) / (300 - 2 - 3));
        Assert.True(gwr.Aicc < olsAicc, "the chosen local model should beat the global one on AICc");
    }

    [Fact]
    public void GWR_gives_identical_results_on_repeated_runs()
    {
        var (lon, lat, elev, coast, y, _) = SpatialFixtures.Network(150, 3, varying: true);
        var spec = new GwrSpec(GwrKernel.Gaussian, false);

        var a = Gwr.Fit(["elev", "coast"], [elev, coast], y, true, lon, lat, spec);
        var b = Gwr.Fit(["elev", "coast"], [elev, coast], y, true, lon, lat, spec);

        Assert.Equal(a.Bandwidth, b.Bandwidth);
        Assert.Equal(a.Aicc, b.Aicc);
        Assert.Equal(a.Coefficients.SelectMany(r => r), b.Coefficients.SelectMany(r => r));
    }

    [Fact]
    public void Given_independent_noise_When_block_cross_validated_Then_out_of_block_error_is_close_to_and_not_below_in_sample()
    {
        var (lon, lat, elev, coast, y, _) = SpatialFixtures.Network(400, 5, varying: false);
        var fit = LeastSquares.Fit(["elev", "coast"], [elev, coast], y, true, null, "synthetic");

        var cv = BlockCrossValidation.Run(["elev", "coast"], [elev, coast], y, true, null, lon, lat, 30, fit);

        Assert.True(cv.Blocks > 10, $"about 110 × 170 km in 30 km blocks gives many blocks, got {cv.Blocks}");
        Assert.Equal(0, cv.BlocksNotPredicted);
        Assert.True(cv.RmseOutOfBlock >= cv.RmseInSample, "out-of-sample error cannot beat the in-sample least-squares error here");
        Assert.InRange(cv.RmseOutOfBlock / cv.RmseInSample, 1.0, 1.1); // noise sd 1, 3 parameters, 400 rows
        Assert.True(cv.R2OutOfBlock <= cv.R2InSample);
    }

    [Fact]
    public void Given_a_spatially_varying_truth_When_block_cross_validated_Then_the_global_model_flatters_itself_more()
    {
        var (lon, lat, elev, coast, y, _) = SpatialFixtures.Network(400, 5, varying: true);
        var fit = LeastSquares.Fit(["elev", "coast"], [elev, coast], y, true, null, "synthetic");

        var cv = BlockCrossValidation.Run(["elev", "coast"], [elev, coast], y, true, null, lon, lat, 40, fit);

        Assert.True(cv.RmseOutOfBlock > cv.RmseInSample * 1.02, $"in {cv.RmseInSample}, out {cv.RmseOutOfBlock}");
    }

    [Fact]
    public void Given_a_fit_When_predicting_at_its_own_rows_Then_prediction_is_the_fitted_value_and_the_interval_uses_the_leverage()
    {
        var (_, _, elev, coast, y, _) = SpatialFixtures.Network(60, 9, varying: false);
        var fit = LeastSquares.Fit(["elev", "coast"], [elev, coast], y, true, null, "synthetic");
        float[] e = [.. elev.Select(v => (float)v), float.NaN];
        float[] c = [.. coast.Select(v => (float)v), 10f];
        var t = MathNet.Numerics.Distributions.StudentT.InvCDF(0, 1, fit.DfResidual, 0.975);

        var pred = SurfacePrediction.Predict(fit, [e, c]);

        for (var i = 0; i < y.Length; i++)
        {
            // x0 = x_i: x0ᵀ(XᵀX)⁻¹x0 is the leverage h_i; inputs rounded to float change the fit by < 1e-4.
            var half = t * fit.Sigma * Math.Sqrt(1 + fit.Leverage[i]);
            var x0 = new double[] { 1, e[i], c[i] };
            Tolerance.Near(fit.Predict(x0), pred.Prediction[i], 1e-9, $"prediction {i}");
            Tolerance.Near(half, pred.Upper95[i] - pred.Prediction[i], 1e-4, $"upper half-width {i}");
            Tolerance.Near(half, pred.Prediction[i] - pred.Lower95[i], 1e-4, $"lower half-width {i}");
        }

        Assert.True(double.IsNaN(pred.Prediction[^1]), "a NaN predictor (sea) gives no prediction");
        Assert.True(double.IsNaN(pred.Lower95[^1]) && double.IsNaN(pred.Upper95[^1]));
    }
}

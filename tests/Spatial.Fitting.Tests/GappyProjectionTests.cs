using Spatial.Fitting.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

public sealed class GappyProjectionTests
{
    // Rows are stored as float32 (depths up to ~1000 mm, rounding ≤ 6e-5 mm per day); coefficients are recovered to that order.
    private const double CoefficientToleranceMm = 2e-3;
    private const double ResidualTolerance = 1e-5;

    [Fact]
    public void Given_curves_in_the_span_of_a_known_basis_with_40_percent_of_days_removed_When_projected_Then_coefficients_are_recovered_and_residuals_are_zero()
    {
        // Everson & Sirovich (1995): least squares on the observed days recovers exact coefficients of a curve in the span.
        var basis = Synthetic.OrthonormalBasis(3, seed: 11);
        var mean = Synthetic.MeanCurve();
        var (matrix, truth) = Synthetic.LowRank(mean, basis, [300, 150, 60], rows: 200, missing: 0.4, seed: 12);
        var projector = new GappyProjector(mean, basis, ridge: 0);
        var c = new double[3];
        var res = new double[4];
        var scratch = new double[projector.ScratchLength];
        for (var r = 0; r < matrix.Rows; r++)
        {
            projector.Project(matrix.Row(r), c, res, scratch);
            for (var k = 0; k < 3; k++)
            {
                Tolerance.Near(truth[(r * 3) + k], c[k], CoefficientToleranceMm, $"row {r} c{k + 1}");
            }

            Assert.Equal(1.0, res[0], 12);
            Tolerance.Near(0, res[3], ResidualTolerance, $"row {r} residual_3");
            Assert.True(res[1] >= res[3] - ResidualTolerance && res[2] >= res[3] - ResidualTolerance);
        }
    }

    [Fact]
    public void Given_curves_in_the_span_of_seven_components_When_projected_Then_coefficients_are_recovered_and_residuals_fall_to_zero_at_the_last()
    {
        // More than four components: the normal equations are summed one entry at a time (not in registers).
        var basis = Synthetic.OrthonormalBasis(7, seed: 21);
        var mean = Synthetic.MeanCurve();
        var (matrix, truth) = Synthetic.LowRank(mean, basis, [300, 200, 150, 100, 80, 60, 40], rows: 100, missing: 0.3, seed: 22);
        var projector = new GappyProjector(mean, basis, ridge: 0);
        var c = new double[7];
        var res = new double[8];
        var scratch = new double[projector.ScratchLength];
        for (var r = 0; r < matrix.Rows; r++)
        {
            projector.Project(matrix.Row(r), c, res, scratch);
            for (var k = 0; k < 7; k++)
            {
                Tolerance.Near(truth[(r * 7) + k], c[k], CoefficientToleranceMm, $"row {r} c{k + 1}");
            }

            Assert.Equal(1.0, res[0], 12);
            Tolerance.Near(0, res[7], ResidualTolerance, $"row {r} residual_7");
            for (var k = 1; k < 7; k++)
            {
                Assert.True(res[k] >= res[7] - ResidualTolerance, $"row {r} residual_{k} below residual_7");
            }
        }
    }

    [Fact]
    public void A_curve_off_the_span_has_residual_equal_to_the_share_of_the_orthogonal_part()
    {
        // x − m = 3 v1 + 4 w with w ⟂ span: residual_0 = 1, residual_1 = 4/5 (complete curve), by Pythagoras.
        var basis = Synthetic.OrthonormalBasis(2, seed: 3);
        var mean = new double[365];
        var w = basis[1];
        var row = new float[365];
        for (var d = 0; d < 365; d++)
        {
            row[d] = (float)((3 * basis[0][d]) + (4 * w[d]));
        }

        var projector = new GappyProjector(mean, [basis[0]], ridge: 0);
        var c = new double[1];
        var res = new double[2];
        projector.Project(row, c, res, new double[projector.ScratchLength]);
        Tolerance.Near(3, c[0], 1e-5, "c1");
        Tolerance.Near(0.8, res[1], 1e-6, "residual_1");
        // RMS misfit: the part off the span is 4 w with ‖w‖ = 1 over 365 days → √(16/365) mm.
        projector.Project(row, c, res, new double[projector.ScratchLength], out var misfit);
        Tolerance.Near(Math.Sqrt(16.0 / 365), misfit, 1e-6, "RMS misfit, mm");
    }

    [Fact]
    public void A_season_without_observed_days_gets_unknown_coefficients()
    {
        var basis = Synthetic.OrthonormalBasis(2, seed: 5);
        var projector = new GappyProjector(new double[365], basis, ridge: 0);
        var row = Enumerable.Repeat(float.NaN, 365).ToArray();
        var c = new double[2];
        var res = new double[3];
        projector.Project(row, c, res, new double[projector.ScratchLength]);
        Assert.True(double.IsNaN(c[0]) && double.IsNaN(res[0]));
    }

    [Fact]
    public void Ridge_shrinks_coefficients_towards_zero()
    {
        var basis = Synthetic.OrthonormalBasis(2, seed: 5);
        var row = new float[365];
        for (var d = 0; d < 365; d++)
        {
            row[d] = d < 30 ? (float)(100 * basis[0][d]) : float.NaN;
        }

        var plain = new double[2];
        var ridged = new double[2];
        var res = new double[3];
        var p0 = new GappyProjector(new double[365], basis, 0);
        var p1 = new GappyProjector(new double[365], basis, 0.5);
        p0.Project(row, plain, res, new double[p0.ScratchLength]);
        p1.Project(row, ridged, res, new double[p1.ScratchLength]);
        Assert.True(Math.Abs(ridged[0]) < Math.Abs(plain[0]));
    }
}

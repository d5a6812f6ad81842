using Spatial.Core;
using Spatial.Fitting.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

public sealed class SeasonalFitTests
{
    private const double OrthonormalTolerance = 1e-10;

    /// <summary>Largest principal angle's sine between span(a) and span(b) (both orthonormal): √(1 − σ_min²) of aᵀb.</summary>
    private static double SubspaceDistance(double[][] a, double[][] b)
    {
        var k = a.Length;
        var m = new double[k * k];
        for (var i = 0; i < k; i++)
        {
            for (var j = 0; j < k; j++)
            {
                m[(i * k) + j] = a[i].Zip(b[j]).Sum(t => t.First * t.Second);
            }
        }

        var mtm = new double[k * k];
        for (var i = 0; i < k; i++)
        {
            for (var j = 0; j < k; j++)
            {
                for (var t = 0; t < k; t++)
                {
                    mtm[(i * k) + j] += m[(t * k) + i] * m[(t * k) + j];
                }
            }
        }

        var (values, _) = SymmetricEigen.Decompose(mtm, k);
        return Math.Sqrt(Math.Max(0, 1 - values[^1]));
    }

    [Fact]
    public void Given_exact_rank_3_curves_with_30_percent_gaps_When_fitted_with_refinement_Then_span_variances_and_residuals_are_recovered()
    {
        var basis = Synthetic.OrthonormalBasis(3, seed: 21);
        var mean = Synthetic.MeanCurve();
        double[] sd = [400, 200, 80];
        var (matrix, _) = Synthetic.LowRank(mean, basis, sd, rows: 600, missing: 0.3, seed: 22);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 3, Refine: true, RefineMaxIterations: 200, RefineTolerance: 1e-7));
        Assert.True(fit.Converged, $"EM converged ({fit.Refinement.Length} iterations)");
        Assert.True(fit.Refinement.Length >= 1);
        Assert.True(SubspaceDistance(basis, fit.Basis.Components) < 1e-4, $"subspace distance {SubspaceDistance(basis, fit.Basis.Components):G3}");
        for (var r = 0; r < matrix.Rows; r++)
        {
            Assert.Equal(1.0, fit.Seasons.Residual(r, 0), 12);
            Tolerance.Near(0, fit.Seasons.Residual(r, 3), 1e-4, $"row {r} residual_3 of an exact rank-3 curve");
        }

        // Only 3 directions carry variance: the rest of the spectrum is ~0 against the leading eigenvalue.
        Assert.True(fit.AllEigenvalues[3] < 1e-6 * fit.AllEigenvalues[0]);
        Tolerance.Near(1.0, fit.Basis.CumulativeFraction[2], 1e-6, "3 components explain everything");
    }

    [Fact]
    public void Given_exact_rank_3_curves_with_30_percent_gaps_When_fitted_pairwise_Then_the_span_is_close_and_residuals_small()
    {
        var basis = Synthetic.OrthonormalBasis(3, seed: 31);
        var mean = Synthetic.MeanCurve();
        var (matrix, _) = Synthetic.LowRank(mean, basis, [400, 200, 80], rows: 800, missing: 0.3, seed: 32);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 3));
        var distance = SubspaceDistance(basis, fit.Basis.Components);
        Assert.True(distance < 0.3, $"subspace distance {distance:G3}");
        var first = Math.Abs(basis[0].Zip(fit.Basis.Components[0]).Sum(t => t.First * t.Second));
        Assert.True(first > 0.99, $"|cos| between leading components {first:G6}");
        Assert.Empty(fit.Refinement);
    }

    [Fact]
    public void Components_are_orthonormal_and_all_eigenvalues_sum_to_the_total_variance_for_seeded_matrices()
    {
        // Property over fixed seeds: orthonormal components, Σ all eigenvalues = trace, fractions cumulate.
        foreach (var seed in new[] { 101, 202, 303, 404, 505 })
        {
            var basis = Synthetic.OrthonormalBasis(4, seed);
            var (matrix, _) = Synthetic.LowRank(Synthetic.MeanCurve(), basis, [300, 100, 50, 20], rows: 120, missing: 0.2, seed: seed + 1, noiseMm: 5);
            var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 6));
            var v = fit.Basis.Components;
            for (var i = 0; i < v.Length; i++)
            {
                for (var j = 0; j < v.Length; j++)
                {
                    var dot = v[i].Zip(v[j]).Sum(t => t.First * t.Second);
                    Tolerance.Near(i == j ? 1 : 0, dot, OrthonormalTolerance, $"v{i}·v{j}");
                }
            }

            Tolerance.Relative(fit.Basis.TotalVariance, fit.AllEigenvalues.Sum(), 1e-9, "Σλ = trace");
            for (var c = 1; c < v.Length; c++)
            {
                Assert.True(fit.Basis.Eigenvalues[c] <= fit.Basis.Eigenvalues[c - 1]);
                Tolerance.Near(fit.Basis.CumulativeFraction[c - 1] + fit.Basis.VarianceFraction[c], fit.Basis.CumulativeFraction[c], 1e-12, "cumulative");
            }
        }
    }

    [Fact]
    public void Results_do_not_depend_on_the_thread_count()
    {
        var basis = Synthetic.OrthonormalBasis(3, seed: 41);
        var (matrix, _) = Synthetic.LowRank(Synthetic.MeanCurve(), basis, [300, 100, 50], rows: 9000, missing: 0.3, seed: 42, noiseMm: 3);
        var one = SeasonalFit.Fit(matrix, new FitOptions(Components: 3, MaxThreads: 1));
        var two = SeasonalFit.Fit(matrix, new FitOptions(Components: 3, MaxThreads: 2));
        var dirA = TestData.NewScratchFolder("fit-threads-1");
        var dirB = TestData.NewScratchFolder("fit-threads-2");
        try
        {
            FitFiles.Write(dirA, one);
            FitFiles.Write(dirB, two);
            foreach (var name in new[] { "basis.json", "seasons.csv", "stations.csv", "interpretation.json" })
            {
                Assert.Equal(File.ReadAllBytes(Path.Combine(dirA, name)), File.ReadAllBytes(Path.Combine(dirB, name)));
            }
        }
        finally
        {
            Directory.Delete(dirA, true);
            Directory.Delete(dirB, true);
        }
    }

    [Fact]
    public void Seasons_below_the_minimum_are_reported_but_not_used_for_the_basis()
    {
        var basis = Synthetic.OrthonormalBasis(2, seed: 51);
        var (m, _) = Synthetic.LowRank(Synthetic.MeanCurve(), basis, [300, 100], rows: 60, missing: 0.1, seed: 52);
        var data = m.Depths.ToArray();
        // Row 0 becomes a wild season flagged below the minimum.
        for (var d = 0; d < 365; d++)
        {
            data[d] = float.IsNaN(data[d]) ? float.NaN : 5000f;
        }

        var keys = m.Keys.Select((k, i) => i == 0 ? k with { BelowMinDays = true } : k).ToList();
        var flagged = new SeasonMatrix(m.Calendar, keys, data);
        var withFlag = SeasonalFit.Fit(flagged, new FitOptions(Components: 2));
        var without = SeasonalFit.Fit(new SeasonMatrix(m.Calendar, keys.Skip(1).ToList(), data.AsSpan(365).ToArray()), new FitOptions(Components: 2));
        Assert.Equal(without.Basis.Mean, withFlag.Basis.Mean);
        Assert.Equal(59, withFlag.Basis.TrainingSeasons);
        Assert.Equal(60, withFlag.Seasons.Count);
        Assert.False(double.IsNaN(withFlag.Seasons.Coefficient(0, 0)));
    }

    [Fact]
    public void Fewer_than_two_usable_seasons_is_a_data_error()
    {
        var m = Synthetic.OneRow(new float[365]);
        Assert.Throws<SpatialDataException>(() => SeasonalFit.Fit(m, new FitOptions()));
    }

    [Theory]
    [InlineData(5e-5, double.NaN, 1e-4, true)]    // first iteration: no rate yet, the change alone decides
    [InlineData(5e-5, 1.7e-4, 1e-4, true)]        // rate 0.29: still to come ≈ 0.41 × the change
    [InlineData(5e-5, 5.3e-5, 1e-4, false)]       // rate 0.94: still to come ≈ 16 × the change = 8e-4
    [InlineData(5e-6, 5.3e-6, 1e-4, true)]        // rate 0.94 but the change is small enough: ≈ 8e-5
    [InlineData(2e-4, 1e-3, 1e-4, false)]         // the change itself is above the tolerance
    [InlineData(1e-10, 1e-10, 1e-8, true)]        // stalled (rate 1, taken as 0.99): 99 × 1e-10 < 1e-8
    [InlineData(1e-9, 1e-9, 1e-8, false)]         // stalled: 99 × 1e-9 is not below 1e-8, so the limit is reached unconverged
    public void The_em_stopping_rule_waits_for_the_change_still_to_come_when_convergence_is_slow(double change, double previous, double tolerance, bool settled)
    {
        // Our rule (SeasonalFit.Settled): geometric tail change × ρ/(1 − ρ) with ρ = change ÷ previous change, ρ ≤ 0.99.
        Assert.Equal(settled, SeasonalFit.Settled(change, previous, tolerance));
    }

    [Fact]
    public void Varimax_keeps_components_orthonormal_and_raises_the_criterion()
    {
        var basis = Synthetic.OrthonormalBasis(3, seed: 61);
        var rotated = Varimax.Rotate(basis);
        Assert.True(Varimax.Criterion(rotated) >= Varimax.Criterion(basis) - 1e-15);
        for (var i = 0; i < 3; i++)
        {
            for (var j = 0; j < 3; j++)
            {
                Tolerance.Near(i == j ? 1 : 0, rotated[i].Zip(rotated[j]).Sum(t => t.First * t.Second), 1e-12, "orthonormal");
            }
        }

        // A rotation of the same span: projections onto the original basis keep unit length.
        foreach (var r in rotated)
        {
            var inSpan = basis.Sum(b => Math.Pow(b.Zip(r).Sum(t => t.First * t.Second), 2));
            Tolerance.Near(1, inSpan, 1e-12, "rotated vector in the original span");
        }

        var (matrix, _) = Synthetic.LowRank(Synthetic.MeanCurve(), basis, [300, 100, 50], rows: 200, missing: 0.2, seed: 62);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 3, Varimax: true));
        Assert.True(fit.Basis.Rotated);
    }

    [Fact]
    public void Covariance_kernel_matches_a_plain_double_sum_of_products()
    {
        var rng = new Random(71);
        const int rows = 200;
        var block = new float[Layout.BlockRows * Layout.PaddedDays];
        for (var r = 0; r < rows; r++)
        {
            for (var d = 0; d < 365; d++)
            {
                block[(r * Layout.PaddedDays) + d] = (float)(rng.NextDouble() - 0.5);
            }
        }

        var sums = new double[Layout.PaddedDays * Layout.PaddedDays];
        CovarianceKernel.AddProducts(block, rows, sums);
        foreach (var (i, j) in new[] { (0, 0), (0, 364), (3, 17), (100, 101), (364, 364), (200, 363) })
        {
            double expected = 0;
            for (var r = 0; r < rows; r++)
            {
                expected += (double)block[(r * Layout.PaddedDays) + i] * block[(r * Layout.PaddedDays) + j];
            }

            Tolerance.Near(expected, sums[(i * Layout.PaddedDays) + j], 1e-4, $"S[{i},{j}] (float accumulation over {rows} rows)");
        }
    }

    [Fact]
    public void Pairwise_covariance_uses_only_seasons_observed_on_both_days_with_denominator_n_minus_1()
    {
        // Three seasons, days 0 and 1; season 3 misses day 1. m0 = (1+2+3)/3 = 2, m1 = (10+30)/2 = 20.
        // C01 = ((1−2)(10−20) + (2−2)(30−20)) / (2 − 1) = 10; C00 = (1+0+1)/(3−1) = 1; C11 = (100+100)/(2−1) = 200.
        var data = Enumerable.Repeat(float.NaN, 3 * 365).ToArray();
        data[0] = 1; data[1] = 10;
        data[365] = 2; data[366] = 30;
        data[730] = 3;
        var keys = new List<SeasonKey>
        {
            new(new StationId("A"), 2000, 2, false), new(new StationId("A"), 2001, 2, false), new(new StationId("A"), 2002, 1, false),
        };
        var m = new SeasonMatrix(SeasonCalendar.Default, keys, data);
        var po = Layout.Parallel(1);
        var mean = Covariance.Mean(m, [0, 1, 2], null, po, out _);
        var cov = Covariance.Estimate(m, [0, 1, 2], mean, null, po, null, out var n);
        Assert.Equal(2.0, mean[0]);
        Assert.Equal(20.0, mean[1]);
        Assert.Equal(10.0, cov[1], 12);
        Assert.Equal(10.0, cov[365], 12);
        Assert.Equal(1.0, cov[0], 12);
        Assert.Equal(200.0, cov[366], 12);
        Assert.Equal(2, n[1]);
        Assert.Equal(3, n[0]);
    }
}

using System.Globalization;
using System.IO.Compression;
using System.Text.Json;
using Spatial.Core;
using Spatial.Fitting.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>
/// The fitting stage against an independent numpy implementation of the same arithmetic, on season matrices with
/// gaps (data/gappy, see data/gappy/SOURCES.md): numpy 1.24.2 on reference LAPACK 3.11.0, <c>eigh</c> (dsyevd) and
/// <c>lstsq</c> (dgelsd), computed in float64 from the float32 depths in the files.
/// </summary>
/// <remarks>
/// <para>Where the two can differ. The depths are the same float32 numbers on both sides, so the data are not a source
/// of difference; our covariance is: the kernel rounds each centred depth to float32 and sums up to
/// <see cref="Layout.BlockRows"/> products in float before adding into double (CovarianceKernel remarks). Rounding
/// errors of a float sum of n terms grow like √n·u (u = 2⁻²⁴; the statistical estimate, Higham 2002, §2.8), so
/// ‖C_ours − C_numpy‖₂ ≲ η‖C‖₂ = η·λ₁ with η = √BlockRows·u ≈ 9.5e-7.</para>
/// <para>From η: eigenvalues within η·λ₁ (Weyl); the trace within η·trace; variance fractions within 2η; component k
/// within √2·η·λ₁/gap_k in every element (Davis–Kahan sin θ, gap_k = distance from λ_k to the nearest other eigenvalue,
/// from numpy). Coefficients and residuals are carried from the component and mean differences actually measured,
/// through the first-order perturbation of the gappy least squares, with ‖G⁻¹‖₂ and ‖y‖ of each season from numpy
/// (G = V_obsᵀV_obs, y = x − m on the observed days), times 2 for second-order terms.</para>
/// <para>EM: a perturbation of each step moves the fixed point by at most perturbation/(1 − ρ), ρ the contraction per
/// iteration that numpy measured; our run also stops at a finite relative change (<see cref="EmTolerance"/>), leaving
/// the fill up to tolerance·ρ/(1 − ρ) (relative to the RMS observed anomaly) from the fixed point.</para>
/// </remarks>
public sealed class GappyReferenceTests(GappyReferenceTests.Fits fits) : IClassFixture<GappyReferenceTests.Fits>
{
    /// <summary>EM stopping tolerance of our runs. Below ~3e-9 the per-iteration change of our fill sits on the
    /// float32 rounding floor of the covariance (it wanders between 1e-9 and 3e-9), so 1e-8 is the tightest tolerance
    /// that means convergence.</summary>
    public const double EmTolerance = 1e-8;

    /// <summary>float32 unit roundoff.</summary>
    private const double FloatRoundoff = 1.0 / (1 << 24);

    /// <summary>The pairwise mean is a double sum of at most 240 float32 depths below 3000 mm on both sides (only the
    /// order of addition differs): ≤ 240 × 3000 mm × 2⁻⁵³ ≈ 8e-11 mm.</summary>
    private const double PairwiseMeanToleranceMm = 1e-10;

    /// <summary>Elements of unit eigenvectors that are 0 in exact arithmetic: a few hundred double roundings of numbers ≤ 1.</summary>
    private const double EigensolverRounding = 1e-12;

    /// <summary>Double rounding in the K×K least squares (condition number of G a few units), relative to ‖y‖.</summary>
    private const double LeastSquaresRounding = 1e-12;

    /// <summary>η: relative error of our float32-accumulated covariance (see remarks).</summary>
    private static readonly double CovarianceRelativeError = Math.Sqrt(Layout.BlockRows) * FloatRoundoff;

    public static TheoryData<string, string> Fitted => new()
    {
        { "exact_rank3", Method.Pairwise },
        { "noisy_rank3", Method.Pairwise },
        { "outages_rank3", Method.Pairwise },
        { "exact_rank3", Method.Em },
        { "noisy_rank3", Method.Em },
    };

    [Theory]
    [MemberData(nameof(Fitted))]
    public void Given_a_gappy_season_matrix_When_fitted_Then_the_mean_curve_matches_numpy_and_days_never_observed_are_unknown(string name, string method)
    {
        // Given: data/gappy/NAME.csv.gz; When: fitted with K = 3, pairwise (the default) or refined by EM (the class fixture)
        var c = fits.Case(name);
        var fit = fits.Fit(name, method);
        var reference = c.Reference.GetProperty(method);

        // Then: pairwise, numpy nanmean of the observed depths per day; EM, numpy mean of the filled seasons at the fixed point.
        var expected = GappyCase.Vector(reference.GetProperty("mean"));
        var tolerance = method == Method.Pairwise
            ? Enumerable.Repeat(PairwiseMeanToleranceMm, Layout.Days).ToArray()
            : FilledMeanTolerancesMm(c, fit, GappyCase.Rows(reference.GetProperty("components")), GappyCase.Rows(reference.GetProperty("coefficients")), depthsDiffer: false);
        foreach (var day in GappyCase.Ints(c.Reference.GetProperty("never_observed_days")))
        {
            Assert.True(double.IsNaN(expected[day]), $"numpy: day {day} never observed has no mean");
        }

        for (var d = 0; d < Layout.Days; d++)
        {
            Assert.Equal(double.IsNaN(expected[d]), double.IsNaN(fit.Basis.Mean[d]));
            Tolerance.Near(expected[d], fit.Basis.Mean[d], tolerance[d], $"{name} {method} mean day {d}, mm");
        }
    }

    [Theory]
    [MemberData(nameof(Fitted))]
    public void Given_a_gappy_season_matrix_When_fitted_Then_eigenvalues_trace_and_variance_fractions_match_numpy_eigh(string name, string method)
    {
        // Given: data/gappy/NAME.csv.gz; When: fitted with K = 3, pairwise (the default) or refined by EM (the class fixture)
        var c = fits.Case(name);
        var fit = fits.Fit(name, method);
        var reference = c.Reference.GetProperty(method);
        var eta = Eta(c, method);

        // Then: numpy.linalg.eigh (dsyevd) of the pairwise-complete covariance (or, for EM, of the filled data's covariance at the fixed point)
        var lambda = GappyCase.Vector(reference.GetProperty("eigenvalues"));
        var fraction = GappyCase.Vector(reference.GetProperty("variance_fraction"));
        var trace = reference.GetProperty("trace").GetDouble();
        Tolerance.Near(trace, fit.Basis.TotalVariance, eta * trace, $"{name} {method} trace, mm²");
        for (var k = 0; k < lambda.Length; k++)
        {
            Tolerance.Near(lambda[k], fit.Basis.Eigenvalues[k], eta * lambda[0], $"{name} {method} eigenvalue {k + 1}, mm²");
            Tolerance.Near(fraction[k], fit.Basis.VarianceFraction[k], 2 * eta, $"{name} {method} variance fraction {k + 1}");
        }

        // The first eigenvalue left out, which decides how well component K is separated (numpy, same matrix).
        Tolerance.Near(reference.GetProperty("eigenvalue_next").GetDouble(), fit.AllEigenvalues[lambda.Length], eta * lambda[0], $"{name} {method} eigenvalue {lambda.Length + 1}, mm²");
    }

    [Theory]
    [MemberData(nameof(Fitted))]
    public void Given_a_gappy_season_matrix_When_fitted_Then_components_match_numpy_eigenvectors_up_to_sign(string name, string method)
    {
        // Given: data/gappy/NAME.csv.gz; When: fitted with K = 3, pairwise (the default) or refined by EM (the class fixture)
        var c = fits.Case(name);
        var fit = fits.Fit(name, method);
        var reference = c.Reference.GetProperty(method);
        var eta = Eta(c, method);

        // Then: numpy eigenvectors (zeroed on days never observed), compared after aligning each sign
        var expected = GappyCase.Rows(reference.GetProperty("components"));
        var gaps = GappyCase.Vector(reference.GetProperty("eigengap"));
        var lambda1 = GappyCase.Vector(reference.GetProperty("eigenvalues"))[0];
        var ours = Aligned(fit.Basis.Components, expected);
        for (var k = 0; k < expected.Length; k++)
        {
            var tolerance = Math.Sqrt(2) * eta * lambda1 / gaps[k];
            for (var d = 0; d < Layout.Days; d++)
            {
                Tolerance.Near(expected[k][d], ours[k][d], tolerance, $"{name} {method} component {k + 1} day {d}");
            }
        }
    }

    [Theory]
    [MemberData(nameof(Fitted))]
    public void Given_a_gappy_season_matrix_When_fitted_Then_coefficients_and_residuals_match_numpy_lstsq_on_the_observed_days(string name, string method)
    {
        // Given: data/gappy/NAME.csv.gz; When: fitted with K = 3, pairwise (the default) or refined by EM (the class fixture)
        var c = fits.Case(name);
        var fit = fits.Fit(name, method);
        var reference = c.Reference.GetProperty(method);

        // Then: numpy.linalg.lstsq (dgelsd) on the observed days of each season, residual_0…K as README defines them
        var expectedComponents = GappyCase.Rows(reference.GetProperty("components"));
        var coefficients = GappyCase.Rows(reference.GetProperty("coefficients"));
        var residuals = GappyCase.Rows(reference.GetProperty("residuals"));
        var anomalyNorm = GappyCase.Vector(reference.GetProperty("anomaly_norm"));
        var inverseGram = GappyCase.Vector(reference.GetProperty("inverse_gram_norm"));
        var signs = Signs(fit.Basis.Components, expectedComponents);
        var componentError = FrobeniusDifference(Aligned(fit.Basis.Components, expectedComponents), expectedComponents);
        var meanError = MaxDifference(GappyCase.Vector(reference.GetProperty("mean")), fit.Basis.Mean);
        var k = expectedComponents.Length;
        for (var r = 0; r < c.Matrix.Rows; r++)
        {
            var (coefficientTolerance, residualTolerance) = ProjectionTolerances(anomalyNorm[r], inverseGram[r], c.Matrix.Keys[r].ObservedDays, componentError, meanError);
            for (var j = 0; j < k; j++)
            {
                Tolerance.Near(coefficients[r][j], signs[j] * fit.Seasons.Coefficient(r, j), coefficientTolerance, $"{name} {method} season {r} c{j + 1}, mm");
            }

            for (var j = 0; j <= k; j++)
            {
                Tolerance.Near(residuals[r][j], fit.Seasons.Residual(r, j), residualTolerance, $"{name} {method} season {r} residual_{j}");
            }
        }
    }

    [Fact]
    public void Given_exact_rank_3_curves_with_30_percent_of_days_missing_When_refined_by_EM_Then_the_generating_span_variances_and_scores_are_recovered_and_residual_K_vanishes()
    {
        // Given: the noise-free case; "truth" is numpy's PCA of the same seasons with no day missing (float64 depths
        // before float32 rounding) over the days ever observed — its span is the generating span on those days
        // (the script asserts a principal-angle sine below 1e-7; it records that sine in the file).
        // When: refined by EM to EmTolerance (the class fixture).
        var c = fits.Case("exact_rank3");
        var fit = fits.Fit("exact_rank3", Method.Em);
        var truth = c.Reference.GetProperty("truth");
        var em = c.Reference.GetProperty(Method.Em);
        var lambda = GappyCase.Vector(truth.GetProperty("eigenvalues"));
        var next = truth.GetProperty("eigenvalue_next").GetDouble();
        var components = GappyCase.Rows(truth.GetProperty("components"));
        var scores = GappyCase.Rows(truth.GetProperty("coefficients"));
        var mean = GappyCase.Vector(truth.GetProperty("mean"));
        var k = lambda.Length;

        // The float32 depths differ from the float64 curves by ≤ u|x|; through the covariance that is a relative
        // perturbation ≤ 2u‖X‖_F/√(λ₁(n − 1)), carried to the fixed point like η.
        var rho = em.GetProperty("contraction_rate").GetDouble();
        var storage = 2 * FloatRoundoff * ObservedNorm(c.Matrix) / Math.Sqrt(lambda[0] * (c.Matrix.Rows - 1)) / (1 - rho);
        var eta = Eta(c, Method.Em) + storage;

        // Then: the span, by its largest principal angle (Davis–Kahan for the K-dimensional subspace, gap λ_K − λ_{K+1}).
        Assert.True(fit.Converged, $"EM converged ({fit.Refinement.Length} iterations)");
        var sine = SubspaceSine(fit.Basis.Components, components);
        Assert.True(sine <= eta * lambda[0] / (lambda[k - 1] - next), $"sine of the largest angle to the generating span {sine:G3}");

        // Then: each variance and component (numpy truth: eigh of the complete data's covariance).
        var aligned = Aligned(fit.Basis.Components, components);
        for (var j = 0; j < k; j++)
        {
            Tolerance.Near(lambda[j], fit.Basis.Eigenvalues[j], eta * lambda[0], $"eigenvalue {j + 1} against the complete data, mm²");
            var above = j > 0 ? lambda[j - 1] - lambda[j] : double.PositiveInfinity;
            var below = lambda[j] - (j + 1 < k ? lambda[j + 1] : next);
            var gap = Math.Min(above, below);
            for (var d = 0; d < Layout.Days; d++)
            {
                Tolerance.Near(components[j][d], aligned[j][d], Math.Sqrt(2) * eta * lambda[0] / gap, $"component {j + 1} day {d} against the complete data");
            }
        }

        // Then: the mean is the complete data's mean (numpy), within what the measured component and score differences
        // and the float32 storage of the observed depths allow.
        var meanTolerance = FilledMeanTolerancesMm(c, fit, components, scores, depthsDiffer: true);
        for (var d = 0; d < Layout.Days; d++)
        {
            Tolerance.Near(mean[d], fit.Basis.Mean[d], meanTolerance[d], $"mean day {d} against the complete data, mm");
        }

        // Then: each season's coefficients are its complete-data scores, and nothing is left over. By the least-squares
        // minimum, ‖y − V c‖ ≤ ‖y − V c*‖ ≤ u‖x_obs‖ + ‖δm_obs‖ + Σ_j |c*_j|‖δv_j‖ (c* the true scores, δ ours − truth).
        var signs = Signs(fit.Basis.Components, components);
        var componentErrors = Enumerable.Range(0, k).Select(j => Norm(aligned[j].Zip(components[j], (a, b) => a - b))).ToArray();
        var componentError = Math.Sqrt(componentErrors.Sum(e => e * e));
        var meanError = MaxDifference(mean, fit.Basis.Mean);
        var anomalyNorm = GappyCase.Vector(em.GetProperty("anomaly_norm"));
        var inverseGram = GappyCase.Vector(em.GetProperty("inverse_gram_norm"));
        for (var r = 0; r < c.Matrix.Rows; r++)
        {
            var observed = c.Matrix.Keys[r].ObservedDays;
            var rounding = FloatRoundoff * ObservedNorm(c.Matrix, r);
            var meanPart = Math.Sqrt(observed) * meanError;
            var (coefficientTolerance, _) = ProjectionTolerances(anomalyNorm[r], inverseGram[r], observed, componentError, meanError);
            coefficientTolerance += 2 * inverseGram[r] * rounding;
            for (var j = 0; j < k; j++)
            {
                Tolerance.Near(scores[r][j], signs[j] * fit.Seasons.Coefficient(r, j), coefficientTolerance, $"season {r} c{j + 1} against its complete-data score, mm");
            }

            var left = rounding + meanPart + Enumerable.Range(0, k).Sum(j => Math.Abs(scores[r][j]) * componentErrors[j]);
            Tolerance.Near(0, fit.Seasons.Residual(r, k), left / anomalyNorm[r], $"season {r} residual_{k} of an exact rank-{k} curve");
        }
    }

    [Fact]
    public void Given_exact_rank_3_curves_with_30_percent_of_days_missing_When_fitted_pairwise_Then_the_span_is_as_far_from_the_generating_span_as_numpy_finds()
    {
        // Given: the noise-free case; numpy's principal-angle sine between its pairwise components and the truth.
        var c = fits.Case("exact_rank3");
        var fit = fits.Fit("exact_rank3", Method.Pairwise);
        var reference = c.Reference.GetProperty(Method.Pairwise);
        var expected = c.Reference.GetProperty("figures").GetProperty("pairwise_vs_truth").GetProperty("subspace_sine").GetDouble();
        var lambda = GappyCase.Vector(reference.GetProperty("eigenvalues"));
        var next = reference.GetProperty("eigenvalue_next").GetDouble();

        // When: the sine of our components against the same truth
        var sine = SubspaceSine(fit.Basis.Components, GappyCase.Rows(c.Reference.GetProperty("truth").GetProperty("components")));

        // Then: equal within how far our span may sit from numpy's (Davis–Kahan, gap λ₃ − λ₄ of the pairwise covariance).
        Tolerance.Near(expected, sine, CovarianceRelativeError * lambda[0] / (lambda[^1] - next), "sine of the largest angle to the generating span, pairwise");
    }

    [Fact]
    public void Given_a_day_observed_in_one_season_only_When_fitted_pairwise_Then_its_mean_is_that_depth_and_no_component_loads_on_it()
    {
        // Given: outages_rank3, where day 130 is observed in season 17 only (numpy: n_ij < 2 on that day's row → covariance 0)
        // When: fitted pairwise (the class fixture)
        var c = fits.Case("outages_rank3");
        var fit = fits.Fit("outages_rank3", Method.Pairwise);
        const int day = 130;
        var rows = Enumerable.Range(0, c.Matrix.Rows).Where(r => !float.IsNaN(c.Matrix.Row(r)[day])).ToArray();
        Assert.Equal(new[] { 17 }, rows);

        // Then: the depth in the file (a mean of one value is exact), and numpy's component values on that day. A zero row
        // and column of C leave the eigenvectors of the other eigenvalues with exact zeros there, up to the rounding of
        // the two eigensolvers (~1e-16 per element).
        Assert.Equal((double)c.Matrix.Row(17)[day], fit.Basis.Mean[day]);
        var expected = GappyCase.Rows(c.Reference.GetProperty(Method.Pairwise).GetProperty("components"));
        var aligned = Aligned(fit.Basis.Components, expected);
        for (var k = 0; k < expected.Length; k++)
        {
            Tolerance.Near(expected[k][day], aligned[k][day], EigensolverRounding, $"component {k + 1} on a day with no covariance");
        }
    }

    /// <summary>η of a fit: the covariance error for pairwise; for EM carried to the fixed point, with the stopping remainder.</summary>
    private static double Eta(GappyCase c, string method)
    {
        if (method == Method.Pairwise)
        {
            return CovarianceRelativeError;
        }

        var em = c.Reference.GetProperty(Method.Em);
        var rho = em.GetProperty("contraction_rate").GetDouble();
        var lambda1 = GappyCase.Vector(em.GetProperty("eigenvalues"))[0];
        return (CovarianceRelativeError + StoppingPerturbation(c, lambda1, rho)) / (1 - rho);
    }

    /// <summary>
    /// Relative covariance error from stopping EM early: the fill is within δ = tolerance·ρ/(1 − ρ)·RMS(observed anomaly)
    /// of the fixed point (geometric remainder), and a fill error Δ (‖Δ‖_F ≤ δ√missing) moves the covariance by
    /// ≤ (2‖A‖₂‖Δ‖_F + ‖Δ‖²_F)/(n − 1), ‖A‖₂ = √(λ₁(n − 1)).
    /// </summary>
    private static double StoppingPerturbation(GappyCase c, double lambda1, double rho)
    {
        var em = c.Reference.GetProperty(Method.Em);
        var rms = em.GetProperty("observed_anomaly_rms").GetDouble();
        var usable = GappyCase.Vector(em.GetProperty("mean")).Count(m => !double.IsNaN(m));
        var missing = (c.Matrix.Rows * (double)usable) - c.Matrix.Keys.Sum(k => k.ObservedDays);
        var delta = EmTolerance * rho / (1 - rho) * rms * Math.Sqrt(missing);
        var n = c.Matrix.Rows;
        return ((2 * Math.Sqrt(lambda1 * (n - 1)) * delta) + (delta * delta)) / (n - 1) / lambda1;
    }

    /// <summary>
    /// EM mean per day, mm. At the fixed point m_d is the mean of the filled seasons, observed depths plus
    /// m_d + Σ_k v_kd c_sk on the M_d seasons missing day d, so against a reference (v, c, m)
    /// (n − M_d)·δm_d = Σ_{s missing d} Σ_k (δv_kd c_sk + v_kd δc_sk) + Σ_{s observed d} δx_sd + Σ_{s missing d} e_sd:
    /// the measured component and coefficient differences (doubled for second-order terms), the float32 storage of the
    /// depths when the reference holds the float64 curves (|δx| ≤ u|x|), and the stopping remainder e, whose RMS over
    /// the M missing cells is at most tolerance·ρ/(1 − ρ)·RMS(observed anomaly), so |Σ e_sd| ≤ √M_d·√M·that.
    /// </summary>
    private static double[] FilledMeanTolerancesMm(GappyCase c, FitResult fit, double[][] v, double[][] coefficients, bool depthsDiffer)
    {
        var em = c.Reference.GetProperty(Method.Em);
        var rho = em.GetProperty("contraction_rate").GetDouble();
        var remainder = EmTolerance * rho / (1 - rho) * em.GetProperty("observed_anomaly_rms").GetDouble();
        var signs = Signs(fit.Basis.Components, v);
        var k = v.Length;
        var n = c.Matrix.Rows;
        var usable = fit.Basis.Mean.Select(m => !double.IsNaN(m)).ToArray();
        var missingTotal = (n * (double)usable.Count(u => u)) - c.Matrix.Keys.Sum(key => key.ObservedDays);
        var result = new double[Layout.Days];
        for (var d = 0; d < Layout.Days; d++)
        {
            if (!usable[d])
            {
                continue;
            }

            double sum = 0, storage = 0;
            var missing = 0;
            for (var r = 0; r < n; r++)
            {
                var x = c.Matrix.Row(r)[d];
                if (!float.IsNaN(x))
                {
                    storage += depthsDiffer ? FloatRoundoff * Math.Abs(x) : 0;
                    continue;
                }

                missing++;
                for (var j = 0; j < k; j++)
                {
                    var dv = Math.Abs((signs[j] * fit.Basis.Components[j][d]) - v[j][d]);
                    var dc = Math.Abs((signs[j] * fit.Seasons.Coefficient(r, j)) - coefficients[r][j]);
                    sum += (dv * Math.Abs(coefficients[r][j])) + (Math.Abs(v[j][d]) * dc);
                }
            }

            result[d] = ((2 * sum) + storage + (Math.Sqrt(missing * missingTotal) * remainder)) / (n - missing);
        }

        return result;
    }

    /// <summary>
    /// First-order bounds for one season, given the measured component difference ‖δV‖_F and mean difference max|δm|:
    /// ‖δc‖ ≤ ‖G⁻¹‖(‖δV‖‖y‖(1 + ‖G⁻¹‖^½) + ‖δy‖), ‖δy‖ ≤ √n_obs·max|δm|; and
    /// |δ residual_k| ≤ (2‖δy‖ + ‖δV‖‖G⁻¹‖^½‖y‖ + ‖δc‖)/‖y‖; each doubled for second-order terms, plus double rounding.
    /// </summary>
    private static (double Coefficient, double Residual) ProjectionTolerances(double anomalyNorm, double inverseGram, int observedDays, double componentError, double meanError)
    {
        var dy = Math.Sqrt(observedDays) * meanError;
        var dc = inverseGram * ((componentError * anomalyNorm * (1 + Math.Sqrt(inverseGram))) + dy);
        var dr = ((2 * dy) + (componentError * Math.Sqrt(inverseGram) * anomalyNorm) + dc) / anomalyNorm;
        return ((2 * dc) + (LeastSquaresRounding * anomalyNorm), (2 * dr) + LeastSquaresRounding);
    }

    /// <summary>Sign (±1) that aligns each of <paramref name="ours"/> with the matching reference vector.</summary>
    private static int[] Signs(double[][] ours, double[][] reference) =>
        ours.Select((v, k) => Dot(v, reference[k]) >= 0 ? 1 : -1).ToArray();

    private static double[][] Aligned(double[][] ours, double[][] reference)
    {
        var signs = Signs(ours, reference);
        return ours.Select((v, k) => v.Select(x => signs[k] * x).ToArray()).ToArray();
    }

    private static double Dot(double[] a, double[] b) => a.Zip(b, (x, y) => x * y).Sum();

    private static double Norm(IEnumerable<double> v) => Math.Sqrt(v.Sum(x => x * x));

    private static double FrobeniusDifference(double[][] a, double[][] b) =>
        Math.Sqrt(a.Zip(b, (x, y) => x.Zip(y, (p, q) => (p - q) * (p - q)).Sum()).Sum());

    /// <summary>Largest |a − b| over days where both are known.</summary>
    private static double MaxDifference(double[] a, double[] b) =>
        a.Zip(b, (x, y) => double.IsNaN(x) || double.IsNaN(y) ? 0 : Math.Abs(x - y)).Max();

    /// <summary>Sine of the largest principal angle between two K-dimensional spans with orthonormal bases: √(1 − σ_min²(AᵀB)).</summary>
    private static double SubspaceSine(double[][] a, double[][] b)
    {
        var k = a.Length;
        var m = new double[k * k];
        for (var i = 0; i < k; i++)
        {
            for (var j = 0; j < k; j++)
            {
                for (var t = 0; t < k; t++)
                {
                    m[(i * k) + j] += Dot(a[t], b[i]) * Dot(a[t], b[j]);
                }
            }
        }

        var (values, _) = SymmetricEigen.Decompose(m, k);
        return Math.Sqrt(Math.Max(0, 1 - values[^1]));
    }

    private static double ObservedNorm(SeasonMatrix matrix) =>
        Math.Sqrt(Enumerable.Range(0, matrix.Rows).Sum(r => Math.Pow(ObservedNorm(matrix, r), 2)));

    private static double ObservedNorm(SeasonMatrix matrix, int row)
    {
        var s = 0.0;
        foreach (var x in matrix.Row(row))
        {
            s += float.IsNaN(x) ? 0 : (double)x * x;
        }

        return Math.Sqrt(s);
    }

    /// <summary>The two fits compared, named as in the reference files.</summary>
    public static class Method
    {
        public const string Pairwise = "pairwise";
        public const string Em = "em";
    }

    /// <summary>Loads each case once and fits it once per method, the EM runs side by side (each takes ~3 s of eigen-decompositions).</summary>
    public sealed class Fits
    {
        private static readonly string[] Names = ["exact_rank3", "noisy_rank3", "outages_rank3"];
        private static readonly string[] Refined = ["exact_rank3", "noisy_rank3"];
        private readonly Dictionary<string, GappyCase> cases;
        private readonly Dictionary<(string, string), FitResult> results = [];

        public Fits()
        {
            cases = Names.ToDictionary(n => n, GappyCase.Load, StringComparer.Ordinal);
            var jobs = Names.Select(n => (n, Method.Pairwise)).Concat(Refined.Select(n => (n, Method.Em))).ToArray();
            var fitted = new FitResult[jobs.Length];
            Parallel.For(0, jobs.Length, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, i =>
            {
                var (name, method) = jobs[i];
                var options = method == Method.Em
                    ? new FitOptions(Components: 3, Refine: true, RefineMaxIterations: 200, RefineTolerance: EmTolerance)
                    : new FitOptions(Components: 3);
                fitted[i] = SeasonalFit.Fit(cases[name].Matrix, options);
            });
            for (var i = 0; i < jobs.Length; i++)
            {
                results[jobs[i]] = fitted[i];
            }
        }

        internal GappyCase Case(string name) => cases[name];

        internal FitResult Fit(string name, string method)
        {
            var fit = results[(name, method)];
            Assert.True(method != Method.Em || fit.Converged, $"{name}: EM converged to {EmTolerance} ({fit.Refinement.Length} iterations)");
            return fit;
        }
    }
}

/// <summary>A season matrix read from data/gappy/NAME.csv.gz and the numpy reference from NAME_numpy.json.gz.</summary>
internal sealed class GappyCase
{
    private GappyCase(SeasonMatrix matrix, JsonElement reference)
    {
        Matrix = matrix;
        Reference = reference;
    }

    public SeasonMatrix Matrix { get; }

    public JsonElement Reference { get; }

    /// <summary>Reads the CSV (station, season, d000…d364; an empty field is a missing day) with every season a training season.</summary>
    public static GappyCase Load(string name)
    {
        const int days = SeasonCalendar.DaysPerSeason;
        var keys = new List<SeasonKey>();
        var data = new List<float>();
        using (var reader = new StreamReader(new GZipStream(File.OpenRead(TestData.Path("gappy", name + ".csv.gz")), CompressionMode.Decompress)))
        {
            Assert.Equal(2 + days, reader.ReadLine()!.Split(',').Length);
            while (reader.ReadLine() is { } line)
            {
                var fields = line.Split(',');
                Assert.Equal(2 + days, fields.Length);
                var observed = 0;
                for (var d = 0; d < days; d++)
                {
                    var f = fields[2 + d];
                    var v = f.Length == 0 ? float.NaN : float.Parse(f, NumberStyles.Float, CultureInfo.InvariantCulture);
                    observed += float.IsNaN(v) ? 0 : 1;
                    data.Add(v);
                }

                keys.Add(new SeasonKey(new StationId(fields[0]), int.Parse(fields[1], CultureInfo.InvariantCulture), observed, BelowMinDays: false));
            }
        }

        using var json = new StreamReader(new GZipStream(File.OpenRead(TestData.Path("gappy", name + "_numpy.json.gz")), CompressionMode.Decompress));
        using var doc = JsonDocument.Parse(json.ReadToEnd());
        return new GappyCase(new SeasonMatrix(SeasonCalendar.Default, keys, data.ToArray()), doc.RootElement.Clone());
    }

    /// <summary>A number from the reference; null (NaN in numpy) → NaN.</summary>
    public static double Number(JsonElement e) => e.ValueKind == JsonValueKind.Null ? double.NaN : e.GetDouble();

    public static double[] Vector(JsonElement e) => e.EnumerateArray().Select(Number).ToArray();

    public static double[][] Rows(JsonElement e) => e.EnumerateArray().Select(Vector).ToArray();

    public static int[] Ints(JsonElement e) => e.EnumerateArray().Select(x => x.GetInt32()).ToArray();
}

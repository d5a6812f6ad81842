using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>Labels, sign orientation, sampling errors and selections on seasons built with a known amount and timing (invented data).</summary>
public sealed class InterpretationTests
{
    /// <summary>Gaussian snowpacks: depth a·exp(−½((d − t)/30)²) with amount a and centre t drawn independently; complete records.</summary>
    private static (SeasonMatrix Matrix, double[] Amount, double[] Centre) AmountAndTiming(int rows, int seed)
    {
        var rng = new Random(seed);
        var data = new float[rows * 365];
        var amount = new double[rows];
        var centre = new double[rows];
        var keys = new List<SeasonKey>();
        for (var r = 0; r < rows; r++)
        {
            amount[r] = 500 + (150 * Synthetic.Gauss(rng));
            centre[r] = 180 + (12 * Synthetic.Gauss(rng));
            for (var d = 0; d < 365; d++)
            {
                data[(r * 365) + d] = (float)(amount[r] * Math.Exp(-0.5 * Math.Pow((d - centre[r]) / 30.0, 2)));
            }

            keys.Add(new SeasonKey(new StationId($"S{r / 10:00}"), 2000 + (r % 10), 365, false));
        }

        return (new SeasonMatrix(SeasonCalendar.Default, keys, data), amount, centre);
    }

    private static double Correlation(double[] a, Func<int, double> b)
    {
        var n = a.Length;
        var ma = a.Average();
        var mb = Enumerable.Range(0, n).Average(b);
        double sab = 0, saa = 0, sbb = 0;
        for (var i = 0; i < n; i++)
        {
            sab += (a[i] - ma) * (b(i) - mb);
            saa += (a[i] - ma) * (a[i] - ma);
            sbb += (b(i) - mb) * (b(i) - mb);
        }

        return sab / Math.Sqrt(saa * sbb);
    }

    [Fact]
    public void Amount_and_timing_components_are_labelled_and_oriented_more_snow_and_earlier_positive()
    {
        var (matrix, amount, centre) = AmountAndTiming(300, seed: 5);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 3));
        Assert.Equal("amount", fit.Basis.Labels[0]);
        Assert.Contains("timing", fit.Basis.Labels);
        var t = Array.IndexOf(fit.Basis.Labels, "timing");
        // DESIGN.md sign convention: component 1 positive = more snow; timing positive = earlier season.
        Assert.True(fit.Basis.Components[0].Sum() > 0);
        Assert.True(Correlation(amount, r => fit.Seasons.Coefficient(r, 0)) > 0.9);
        Assert.True(Correlation(centre, r => fit.Seasons.Coefficient(r, t)) < -0.9);
        var label = fit.Interpretation.Labels[t];
        Assert.True(label.Correlations["centroid_day"] < 0);
        Assert.Equal("centroid_day", label.Basis);
        Assert.True(label.Scores["timing"] > 0); // −p_centroid > 0 after orientation: earlier
        Assert.Contains("timing", label.Aspects);
    }

    /// <summary>
    /// Seasons from one template snowpack, scaled, shifted and stretched independently: depth a·T((d − o)/L) for
    /// o ≤ d ≤ o + L, T(u) = (27/4)·u²(1 − u) (slow build-up, peak 1 at u = 2/3, quicker melt), with amount a = 800·e^(0.25 g₁) mm,
    /// length L = 150·e^(0.20 g₃) days and middle o + L/2 = 165 + 12 g₂ days (g independent standard normal), so a shift moves
    /// both edges together and a stretch moves them apart; 10 % of days removed at random. By construction amount, timing and
    /// duration vary independently.
    /// </summary>
    internal static (SeasonMatrix Matrix, double[] Amount, double[] Shift, double[] Stretch) Templates(int rows, int seed)
    {
        var rng = new Random(seed);
        var data = new float[rows * 365];
        var amount = new double[rows];
        var shift = new double[rows];
        var stretch = new double[rows];
        var keys = new List<SeasonKey>();
        for (var r = 0; r < rows; r++)
        {
            amount[r] = 800 * Math.Exp(0.25 * Synthetic.Gauss(rng));
            shift[r] = 12 * Synthetic.Gauss(rng);
            stretch[r] = Math.Exp(0.20 * Synthetic.Gauss(rng));
            var length = 150 * stretch[r];
            var onset = 165 + shift[r] - (length / 2);
            var observed = 0;
            for (var d = 0; d < 365; d++)
            {
                var u = (d - onset) / length;
                var depth = u is >= 0 and <= 1 ? amount[r] * 6.75 * u * u * (1 - u) : 0;
                var missing = rng.NextDouble() < 0.10;
                data[(r * 365) + d] = missing ? float.NaN : (float)depth;
                observed += missing ? 0 : 1;
            }

            keys.Add(new SeasonKey(new StationId($"S{r / 20:00}"), 1980 + (r % 20), observed, false));
        }

        return (new SeasonMatrix(SeasonCalendar.Default, keys, data), amount, shift, stretch);
    }

    [Theory]
    [InlineData(11)]
    [InlineData(12)]
    [InlineData(13)]
    [InlineData(14)]
    [InlineData(15)]
    [InlineData(16)]
    public void Independent_amount_timing_and_duration_get_their_own_labels_with_the_design_signs(int seed)
    {
        var (matrix, amount, shift, stretch) = Templates(600, seed);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 4));
        var labels = fit.Basis.Labels;
        var a = Array.IndexOf(labels, "amount");
        var t = Array.IndexOf(labels, "timing");
        var d = Array.IndexOf(labels, "duration");
        var scores = string.Join("; ", fit.Interpretation.Labels.Select(l => $"c{l.Component} {l.Label}: " + string.Join(" ", l.Scores.Select(kv => $"{kv.Key} {kv.Value:F2}"))));
        Assert.True(a >= 0 && t >= 0 && d >= 0, scores);
        // DESIGN.md signs: amount positive = more snow, timing positive = earlier (smaller shift), duration positive = longer.
        var ra = Correlation(amount, r => fit.Seasons.Coefficient(r, a));
        var rt = Correlation(shift, r => fit.Seasons.Coefficient(r, t));
        var rd = Correlation(stretch, r => fit.Seasons.Coefficient(r, d));
        Assert.True(ra > 0.5, $"r(amount, c{a + 1}) = {ra}; {scores}");
        Assert.True(rt < -0.5, $"r(shift, c{t + 1}) = {rt}; {scores}");
        Assert.True(rd > 0.5, $"r(stretch, c{d + 1}) = {rd}; {scores}");
        Assert.True(fit.Interpretation.Labels[t].Scores["timing"] > 0);
        Assert.True(fit.Interpretation.Labels[d].Scores["duration"] > 0);
        Assert.True(fit.Interpretation.Labels[a].Scores["amount"] > 0);
    }

    [Fact]
    public void Component_1_is_amount_when_it_carries_amount_even_if_its_duration_score_is_a_little_higher()
    {
        // Our rule (Interpreter remarks): component 1 scales the mean curve; partial correlations in metric order
        // onset, meltout, longest_cover, snow_days, peak_depth, peak_day, centroid.
        double[][] partials =
        [
            [-0.1, 0.7, 0.63, 0.6, 0.60, 0.5, 0.2],   // amount 0.60, timing −0.2, duration 0.63
            [-0.3, -0.6, 0.0, 0.0, 0.1, -0.8, -0.85], // timing 0.85
            [-0.7, 0.6, 0.72, 0.7, -0.2, 0.0, 0.1],   // duration 0.72
        ];
        var components = Enumerable.Range(0, 3).Select(_ => Enumerable.Repeat(1.0 / Math.Sqrt(365), 365).ToArray()).ToArray();

        var labels = Spatial.Fitting.Internal.Interpreter.Label(components, partials, 0.3);

        Assert.Equal(["amount", "timing", "duration"], labels.Select(l => l.Label).ToArray());
        Assert.Equal(["peak_depth_mm", "centroid_day", "longest_cover_days"], labels.Select(l => l.Metric).ToArray());
    }

    [Fact]
    public void A_late_component_is_not_labelled_amount_when_component_1_already_is()
    {
        double[][] partials =
        [
            [-0.6, 0.8, 0.8, 0.8, 0.95, 0.5, 0.5],
            [0.1, 0.1, 0.1, 0.1, 0.9, 0.0, 0.05], // amount again (taken), nothing else reaches 0.3
        ];
        var components = Enumerable.Range(0, 2).Select(_ => Enumerable.Repeat(1.0 / Math.Sqrt(365), 365).ToArray()).ToArray();

        var labels = Spatial.Fitting.Internal.Interpreter.Label(components, partials, 0.3);

        Assert.Equal(["amount", "other"], labels.Select(l => l.Label).ToArray());
    }

    [Fact]
    public void Partial_correlations_match_the_closed_form_for_one_control()
    {
        // With one control z: p(x, y | z) = (r_xy − r_xz r_yz) / √((1 − r_xz²)(1 − r_yz²)) (textbook identity).
        var rng = new Random(4);
        var n = 500;
        var z = Enumerable.Range(0, n).Select(_ => Synthetic.Gauss(rng)).ToArray();
        var x = z.Select(v => (0.6 * v) + Synthetic.Gauss(rng)).ToArray();
        var y = Enumerable.Range(0, n).Select(i => (0.8 * z[i]) + (0.3 * x[i]) + Synthetic.Gauss(rng)).ToArray();
        var coefficient = (int r, int c) => c == 0 ? z[r] : x[r];
        var p = Spatial.Fitting.Internal.Interpreter.PartialCorrelations(coefficient, (r, _) => y[r], 2, 1, Enumerable.Range(0, n).ToArray());
        double rxy = Correlation(x, r => y[r]), rxz = Correlation(x, r => z[r]), ryz = Correlation(y, r => z[r]);
        Tolerance.Near(ryz, p[0][0], 1e-12, "component 1: plain r");
        Tolerance.Near((rxy - (rxz * ryz)) / Math.Sqrt((1 - (rxz * rxz)) * (1 - (ryz * ryz))), p[1][0], 1e-12, "partial r given component 1");
    }

    [Fact]
    public void North_errors_are_lambda_times_root_2_over_N_star_and_equal_eigenvalues_are_not_separable()
    {
        var (matrix, _, _) = AmountAndTiming(200, seed: 6);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 4));
        var b = fit.Basis;
        Assert.InRange(b.EffectiveSeasons, 2, 200);
        for (var c = 0; c < 4; c++)
        {
            // North et al. (1982), eq. 24: δλ ≈ λ (2/N)^½.
            Tolerance.Relative(b.Eigenvalues[c] * Math.Sqrt(2 / b.EffectiveSeasons), b.NorthError[c], 1e-12, $"δλ_{c + 1}");
            var next = c + 1 < 4 ? b.Eigenvalues[c + 1] : fit.AllEigenvalues[4];
            Assert.Equal(b.Eigenvalues[c] - next > b.NorthError[c], b.SeparableFromNext[c]);
        }
    }

    [Fact]
    public void Selections_only_admit_well_described_seasons_and_sort_them_by_the_component()
    {
        var (matrix, _, _) = AmountAndTiming(300, seed: 7);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 2, SelectionResidual: 0.5, SelectionCount: 5));
        var sel = fit.Interpretation.Selections[0];
        Assert.Equal(5, sel.Highest.Length);
        Assert.True(sel.Highest.Zip(sel.Highest.Skip(1)).All(p => p.First.Value >= p.Second.Value));
        Assert.True(sel.Lowest.Zip(sel.Lowest.Skip(1)).All(p => p.First.Value <= p.Second.Value));
        Assert.All(sel.Highest, s => Assert.True(s.Residual < 0.5));
        Assert.True(fit.Interpretation.WorstDescribed[0].Residual >= fit.Interpretation.BestDescribed[^1].Residual);
        Assert.All(fit.Interpretation.WorstDescribed, s => Assert.Contains(s.Cause, new[] { "coverage", "spikes", "flat-line", "shape" }));
    }

    [Fact]
    public void Poorly_described_seasons_get_their_likely_cause_flat_line_coverage_spikes_or_shape()
    {
        var mean = Synthetic.MeanCurve();
        var basis = Synthetic.OrthonormalBasis(1, seed: 9);
        double[] c = [0.0];
        var stuck = mean.Select(x => (float)x).ToArray();
        for (var d = 100; d < 200; d++)
        {
            stuck[d] = 777f; // a sensor reading a constant for 100 days
        }

        Assert.Equal("flat-line", Spatial.Fitting.Internal.Interpreter.Diagnose(stuck, mean, basis, c).Cause);
        var sparse = mean.Select((x, d) => d % 3 == 0 ? (float)x : float.NaN).ToArray();
        Assert.Equal("coverage", Spatial.Fitting.Internal.Interpreter.Diagnose(sparse, mean, basis, c).Cause);
        var spiky = mean.Select(x => (float)(x + 1)).ToArray();
        spiky[150] += 2000f;
        Assert.Equal("spikes", Spatial.Fitting.Internal.Interpreter.Diagnose(spiky, mean, basis, c).Cause);
        var shifted = Enumerable.Range(0, 365).Select(d => (float)mean[(d + 40) % 365]).ToArray();
        Assert.Equal("shape", Spatial.Fitting.Internal.Interpreter.Diagnose(shifted, mean, basis, c).Cause);
    }
}

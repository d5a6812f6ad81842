using Spatial.Fitting.Internal;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>Season metrics on hand-made curves (plumbing data; the expected values follow from the definitions by hand).</summary>
public sealed class SeasonMetricsTests
{
    private static SeasonMetrics Metrics(float[] curve, MetricOptions? options = null) =>
        MetricCalculator.Compute(curve, options ?? MetricOptions.Default);

    /// <summary>Zero depth, with snow of <paramref name="depth"/> mm on days [from, to].</summary>
    private static float[] Block(int from, int to, float depth = 100f)
    {
        var c = new float[365];
        for (var d = from; d <= to; d++)
        {
            c[d] = depth;
        }

        return c;
    }

    [Fact]
    public void A_complete_season_with_one_cover_block_has_exact_onset_meltout_cover_and_snow_days()
    {
        var c = Block(60, 199);
        c[120] = 300f;
        var m = Metrics(c);
        Assert.Equal(60, m.OnsetDay);
        Assert.Equal(199, m.MeltoutDay);
        Assert.Equal(140, m.LongestCoverDays);
        Assert.Equal(140, m.SnowDays);
        Assert.Equal(300, m.PeakDepthMm);
        Assert.Equal(120, m.PeakDay);
        // Centroid = Σ d·x / Σ x = (100·Σ_{60..199} d + 200·120) / (100·140 + 200).
        var expected = ((100.0 * Enumerable.Range(60, 140).Sum()) + (200.0 * 120)) / ((100.0 * 140) + 200);
        Assert.Equal(expected, m.CentroidDay, 10);
    }

    [Fact]
    public void A_depth_exactly_at_the_threshold_counts_as_cover()
    {
        var m = Metrics(Block(10, 19, 25f));
        Assert.Equal(10, m.OnsetDay);
        Assert.Equal(10, m.SnowDays);
    }

    [Fact]
    public void A_short_gap_inside_the_cover_is_bridged_and_counted_in_snow_days()
    {
        var c = Block(60, 199);
        c[100] = c[101] = c[102] = float.NaN;
        var m = Metrics(c);
        Assert.Equal(140, m.SnowDays);
        Assert.Equal(140, m.LongestCoverDays);
        Assert.Equal(60, m.OnsetDay);
    }

    [Fact]
    public void A_gap_longer_than_the_bridge_makes_snow_days_and_cover_unknown_but_keeps_onset_and_meltout()
    {
        var c = Block(60, 199);
        for (var d = 100; d < 104; d++)
        {
            c[d] = float.NaN;
        }

        var m = Metrics(c);
        Assert.True(double.IsNaN(m.SnowDays));
        Assert.True(double.IsNaN(m.LongestCoverDays));
        Assert.Equal(60, m.OnsetDay);
        Assert.Equal(199, m.MeltoutDay);
        Assert.True(double.IsNaN(m.PeakDepthMm));
    }

    [Fact]
    public void A_gap_at_the_season_start_is_never_bridged_so_an_onset_right_after_it_is_unknown()
    {
        var c = Block(2, 100);
        c[0] = c[1] = float.NaN;
        var m = Metrics(c);
        Assert.True(double.IsNaN(m.OnsetDay));
        Assert.Equal(100, m.MeltoutDay);
    }

    [Fact]
    public void A_gap_between_bare_and_snow_days_is_not_bridged_so_onset_is_unknown()
    {
        var c = Block(60, 199);
        c[59] = c[58] = float.NaN; // bare on day 57, snow on day 60: the edge lies somewhere in the gap
        var m = Metrics(c);
        Assert.True(double.IsNaN(m.OnsetDay));
        Assert.Equal(199, m.MeltoutDay);
    }

    [Fact]
    public void A_season_without_snow_has_zero_cover_and_no_onset()
    {
        var m = Metrics(new float[365]);
        Assert.Equal(0, m.SnowDays);
        Assert.Equal(0, m.LongestCoverDays);
        Assert.True(double.IsNaN(m.OnsetDay));
        Assert.True(double.IsNaN(m.PeakDay));
    }

    [Fact]
    public void The_bridge_length_is_an_option()
    {
        var c = Block(60, 199);
        for (var d = 100; d < 104; d++)
        {
            c[d] = float.NaN;
        }

        var m = Metrics(c, new MetricOptions(25, 5));
        Assert.Equal(140, m.SnowDays);
    }

    /// <summary>Metrics with a model whose reconstruction is <paramref name="reconstruction"/> (K = 1, coefficient 0, so the reconstruction is the mean).</summary>
    private static SeasonMetrics Modelled(float[] curve, double[] reconstruction) =>
        MetricCalculator.Compute(curve, MetricOptions.Default, reconstruction, new double[365], [0.0]);

    private static double[] Flat(double mm) => Enumerable.Repeat(mm, 365).ToArray();

    /// <summary>Cover of 100 mm on days 60…199 with 300 mm on day 120, zero elsewhere, and days 250…364 not reported (a station without summers).</summary>
    private static float[] NoSummer()
    {
        var c = Block(60, 199);
        c[120] = 300f;
        for (var d = 250; d < 365; d++)
        {
            c[d] = float.NaN;
        }

        return c;
    }

    [Fact]
    public void A_season_end_gap_after_bare_ground_is_modelled_bare_when_the_reconstruction_stays_below_the_threshold()
    {
        var m = Modelled(NoSummer(), Flat(24.9));
        Assert.Equal(115, m.ModelledBareDays); // days 250…364
        Assert.Equal(60, m.OnsetDay);
        Assert.Equal(199, m.MeltoutDay);
        Assert.Equal(140, m.SnowDays);
        Assert.Equal(140, m.LongestCoverDays);
        Assert.Equal(300, m.PeakDepthMm);
        Assert.Equal(120, m.PeakDay);
        // Centroid range with 0 ≤ y < 25 mm on the 115 modelled days: from W/T = 129.55… up to (W + 25·Σ_{250..364} d)/(T + 25·115)
        // ≈ 159.7, i.e. 30 days wide > 1 day: unknown.
        Assert.True(double.IsNaN(m.CentroidDay));
    }

    [Fact]
    public void Without_a_model_the_same_season_end_gap_stays_unknown()
    {
        var m = Metrics(NoSummer());
        Assert.Equal(0, m.ModelledBareDays);
        Assert.True(double.IsNaN(m.MeltoutDay));
        Assert.True(double.IsNaN(m.SnowDays));
        Assert.True(double.IsNaN(m.PeakDepthMm)); // a bare-flanked gap with no model could hold anything
        Assert.Equal(60, m.OnsetDay);
    }

    [Fact]
    public void A_reconstruction_reaching_the_threshold_keeps_the_gap_unknown_but_the_peak_stays_known_below_the_observed_maximum()
    {
        var rec = Flat(0);
        rec[300] = 25; // equal to the threshold: not below it
        var m = Modelled(NoSummer(), rec);
        Assert.Equal(0, m.ModelledBareDays);
        Assert.True(double.IsNaN(m.MeltoutDay));
        Assert.True(double.IsNaN(m.SnowDays));
        Assert.True(double.IsNaN(m.CentroidDay));
        Assert.Equal(300, m.PeakDepthMm); // the season's curve in the gap (25 mm) stays below 300 mm minus 2 RMS misfits (2 × 76.9 mm: the flat-zero fit misses the block; √((139·100² + 300²)/250))
        rec[300] = 300;
        Assert.True(double.IsNaN(Modelled(NoSummer(), rec).PeakDepthMm)); // now the gap could hold the maximum
    }

    [Fact]
    public void A_gap_touching_cover_stays_unknown_whatever_the_reconstruction()
    {
        var c = Block(60, 199);
        for (var d = 150; d < 365; d++)
        {
            c[d] = float.NaN; // the record stops in mid-winter, on a snow day
        }

        var m = Modelled(c, Flat(0));
        Assert.Equal(0, m.ModelledBareDays);
        Assert.True(double.IsNaN(m.MeltoutDay));
        Assert.True(double.IsNaN(m.SnowDays));
        Assert.True(double.IsNaN(m.LongestCoverDays));
        Assert.Equal(60, m.OnsetDay);
    }

    /// <summary>The reconstruction equals <paramref name="curve"/> on observed days plus <paramref name="offsetMm"/> (so the RMS misfit is |offset|), and <paramref name="gapMm"/> on missing days.</summary>
    private static double[] Fitted(float[] curve, double gapMm, double offsetMm = 0) =>
        curve.Select(x => float.IsNaN(x) ? gapMm : x + offsetMm).ToArray();

    [Fact]
    public void A_short_gap_at_the_melt_out_edge_keeps_the_edge_unknown_but_not_a_peak_the_curve_puts_far_higher()
    {
        var c = Block(60, 199);
        c[120] = 300f;
        c[200] = c[201] = float.NaN; // snow on 199, bare on 202: the melt-out lies in the gap
        var m = Modelled(c, Fitted(c, gapMm: 50));
        Assert.True(double.IsNaN(m.MeltoutDay));
        Assert.True(double.IsNaN(m.SnowDays));
        Assert.Equal(300, m.PeakDepthMm); // exact fit (misfit 0) and 50 mm in the gap < 300 mm
        Assert.Equal(120, m.PeakDay);
    }

    [Fact]
    public void A_record_stopping_in_cover_hides_the_peak_only_when_the_seasons_curve_comes_within_two_misfits_of_the_observed_maximum()
    {
        var c = Block(60, 199);
        c[120] = 300f;
        for (var d = 150; d < 365; d++)
        {
            c[d] = float.NaN;
        }

        Assert.Equal(300, Modelled(c, Fitted(c, gapMm: 100)).PeakDepthMm);
        Assert.True(double.IsNaN(Modelled(c, Fitted(c, gapMm: 400)).PeakDepthMm)); // the curve says the season went deeper later
        // RMS misfit 10 mm → margin 2 × 10 = 20 mm: 285 mm is within 20 mm of 300 mm, 275 mm is not.
        Assert.True(double.IsNaN(Modelled(c, Fitted(c, gapMm: 285, offsetMm: 10)).PeakDepthMm));
        Assert.Equal(300, Modelled(c, Fitted(c, gapMm: 275, offsetMm: 10)).PeakDepthMm);
        Assert.True(double.IsNaN(Metrics(c).PeakDepthMm)); // without a model any unknown gap could hold it
    }

    [Fact]
    public void A_maximum_next_to_a_missing_day_is_unknown_even_when_the_gap_is_bridged()
    {
        var c = Block(60, 199);
        c[120] = 300f;
        c[121] = float.NaN; // bridged (snow on both sides), but day 121 could have been deeper
        Assert.True(double.IsNaN(Modelled(c, Fitted(c, gapMm: 0)).PeakDepthMm));
        Assert.Equal(140, Modelled(c, Fitted(c, gapMm: 0)).SnowDays);
    }

    [Fact]
    public void A_season_start_gap_before_bare_ground_is_modelled_bare_so_the_onset_is_known()
    {
        var c = Block(60, 199);
        for (var d = 0; d < 30; d++)
        {
            c[d] = float.NaN; // day 30…59 observed bare
        }

        var m = Modelled(c, Flat(3));
        Assert.Equal(30, m.ModelledBareDays);
        Assert.Equal(60, m.OnsetDay);
        Assert.Equal(140, m.SnowDays);
        Assert.Equal(100, m.PeakDepthMm);
    }

    [Fact]
    public void A_short_modelled_gap_gives_the_middle_of_the_exact_centroid_range_when_it_is_within_a_day()
    {
        var c = Block(60, 199);
        for (var d = 205; d <= 208; d++)
        {
            c[d] = float.NaN; // 4 days (> the 3-day bridge) between observed bare days 204 and 209
        }

        var m = Modelled(c, Flat(0));
        Assert.Equal(4, m.ModelledBareDays);
        // By hand: W = Σ 100·d over 60…199 = 1 813 000 mm·day, T = 14 000 mm. All 4 days lie after W/T = 129.5, so the
        // lowest centroid puts 0 mm on them (129.5) and the highest 25 mm: (W + 25·(205+206+207+208)) / (T + 100) = 1 833 650 / 14 100.
        const double low = 1813000.0 / 14000.0;
        const double high = 1833650.0 / 14100.0;
        Assert.True(high - low <= MetricCalculator.CentroidToleranceDays);
        Assert.Equal((low + high) / 2, m.CentroidDay, 9);
        Assert.Equal(140, m.SnowDays);
    }

    [Fact]
    public void The_reconstruction_is_the_mean_plus_the_coefficients_times_the_components()
    {
        // K = 1: v = 1 on days 250…364, mean 0 → reconstruction = c there.
        var v = new double[365];
        for (var d = 250; d < 365; d++)
        {
            v[d] = 1;
        }

        var below = MetricCalculator.Compute(NoSummer(), MetricOptions.Default, new double[365], v, [20.0]);
        var above = MetricCalculator.Compute(NoSummer(), MetricOptions.Default, new double[365], v, [30.0]);
        var noFit = MetricCalculator.Compute(NoSummer(), MetricOptions.Default, new double[365], v, [double.NaN]);
        Assert.Equal(199, below.MeltoutDay);
        Assert.True(double.IsNaN(above.MeltoutDay));
        Assert.True(double.IsNaN(noFit.MeltoutDay)); // no coefficients (singular projection): no model
    }

    [Fact]
    public void A_day_never_observed_in_training_has_no_reconstruction_so_its_gap_stays_unknown()
    {
        var rec = Flat(0);
        rec[364] = double.NaN;
        Assert.True(double.IsNaN(Modelled(NoSummer(), rec).MeltoutDay));
    }
}

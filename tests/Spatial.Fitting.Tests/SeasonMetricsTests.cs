using Spatial.Fitting.Internal;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>Season metrics on hand-made curves (plumbing data; the expected values follow from the definitions by hand).</summary>
public sealed class SeasonMetricsTests
{
    private static SeasonMetrics Metrics(float[] curve, MetricOptions? options = null) =>
        MetricCalculator.Compute(curve, options ?? MetricOptions.Default, new byte[365], new bool[365]);

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
}

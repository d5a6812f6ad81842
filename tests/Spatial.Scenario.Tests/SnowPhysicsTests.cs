using Spatial.Scenario.Internal;
using Xunit;

namespace Spatial.Scenario.Tests;

/// <summary>Physical sanity of the generator, asserted against its own inputs (Climate constants and standards they cite).</summary>
public sealed class SnowPhysicsTests
{
    private static readonly RegionalWeather Weather = RegionalWeather.Generate(1990, 20, 5);

    private static readonly RegionalWeather LongWeather = RegionalWeather.Generate(1870, 150, 11);

    private static readonly RegionalWeather DefaultLengthWeather = RegionalWeather.Generate(1980, 45, 12);

    private static double Sd(double[] x)
    {
        var m = x.Average();
        return Math.Sqrt(x.Sum(v => (v - m) * (v - m)) / (x.Length - 1));
    }

    private static double Correlation(double[] x, double[] y)
    {
        var mx = x.Average();
        var my = y.Average();
        var sxy = x.Zip(y).Sum(p => (p.First - mx) * (p.Second - my));
        return sxy / Math.Sqrt(x.Sum(v => (v - mx) * (v - mx)) * y.Sum(v => (v - my) * (v - my)));
    }

    private static double MeanOf(PlaceInputs place, Func<SeasonValues, double> metric, double offsetC = 0) =>
        SeasonMetricsCalc.Compute(SnowSimulator.Simulate(Weather, place, 99, offsetC), Weather).Average(metric);

    [Fact]
    public void The_lapse_rate_is_that_of_the_standard_atmosphere()
    {
        // ISO 2533:1975 (ICAO standard atmosphere): −6.5 K per km in the troposphere.
        Assert.Equal(-6.5, Climate.AnnualMeanC(1000, 47) - Climate.AnnualMeanC(0, 47), 12);
    }

    [Fact]
    public void There_is_no_snow_at_sea_level_in_early_autumn()
    {
        // September to mid-October at sea level sits 9–13 °C above the rain/snow threshold in the generator's climate.
        foreach (var coast in new[] { 0.5, 10.0, 35.0 })
        {
            var depth = SnowSimulator.Simulate(Weather, new PlaceInputs(0, coast, 47, 0.5), 3);
            for (var t = 0; t < Weather.Days; t++)
            {
                if (Weather.SeasonDay[t] is >= 0 and <= 45)
                {
                    Assert.True(depth[t] == 0, $"{Weather.Dates[t]}: {depth[t]} mm at sea level, {coast} km inland");
                }
            }
        }
    }

    [Fact]
    public void Mean_duration_rises_with_elevation()
    {
        var previous = -1.0;
        foreach (var z in new[] { 0.0, 400, 800, 1200, 1600, 2000 })
        {
            var duration = MeanOf(new PlaceInputs(z, 20, 47, 0), v => v.Duration);
            Assert.True(duration > previous, $"duration at {z} m ({duration:F1} d) should exceed that 400 m lower ({previous:F1} d)");
            previous = duration;
        }
    }

    [Fact]
    public void Seasons_are_shorter_near_the_coast_at_equal_elevation()
    {
        foreach (var z in new[] { 500.0, 900, 1300 })
        {
            var nearCoast = MeanOf(new PlaceInputs(z, 1, 47, 0), v => v.SnowDays);
            var inland = MeanOf(new PlaceInputs(z, 30, 47, 0), v => v.SnowDays);
            Assert.True(nearCoast < inland, $"at {z} m: {nearCoast:F1} snow days 1 km from the sea, {inland:F1} at 30 km");
        }
    }

    [Fact]
    public void The_windward_side_gets_deeper_snow_than_the_lee()
    {
        var windward = MeanOf(new PlaceInputs(1200, 20, 47, 1), v => v.Peak);
        var lee = MeanOf(new PlaceInputs(1200, 20, 47, -1), v => v.Peak);
        Assert.True(windward > lee, $"peak {windward:F0} mm windward vs {lee:F0} mm lee");
    }

    [Fact]
    public void Warming_shortens_the_season()
    {
        var place = new PlaceInputs(1000, 20, 47, 0);
        Assert.True(MeanOf(place, v => v.Duration, 1.0) < MeanOf(place, v => v.Duration, 0.0));
    }

    [Fact]
    public void The_slow_anomaly_has_the_size_and_persistence_of_its_regime_and_ocean_parts()
    {
        // Sum of two independent AR(1) processes at daily step: variance σr² + σo², autocorrelation at lag L
        // (σr² e^(−L/τr) + σo² e^(−L/τo)) / (σr² + σo²) — the generator's own inputs (Climate), "from memory" figures.
        var regime = LongWeather.RegimeC;
        var vr = Climate.RegimeSdC * Climate.RegimeSdC;
        var vo = Climate.OceanSdC * Climate.OceanSdC;
        const double sdRelativeTolerance = 0.12;
        const double autocorrelationTolerance = 0.08;
        var mean = regime.Average();
        var variance = regime.Average(v => (v - mean) * (v - mean));
        Assert.InRange(Math.Sqrt(variance) / Math.Sqrt(vr + vo), 1 - sdRelativeTolerance, 1 + sdRelativeTolerance);
        foreach (var lag in new[] { 10, 30, 90 })
        {
            var expected = ((vr * Math.Exp(-lag / Climate.RegimeEFoldingDays)) + (vo * Math.Exp(-lag / Climate.OceanEFoldingDays))) / (vr + vo);
            var sum = 0.0;
            for (var t = lag; t < regime.Length; t++)
            {
                sum += (regime[t] - mean) * (regime[t - lag] - mean);
            }

            var observed = sum / (regime.Length - lag) / variance;
            Assert.True(Math.Abs(expected - observed) <= autocorrelationTolerance, $"lag {lag} d: autocorrelation {observed:F3}, expected {expected:F3}");
        }
    }

    [Fact]
    public void Mild_regimes_are_wetter_than_cold_ones()
    {
        // Climate.RegimeWetCorrelation > 0 (from memory: in westerly maritime climates mild spells tend to be wet).
        var order = Enumerable.Range(0, LongWeather.Days).OrderBy(t => LongWeather.RegimeC[t]).ToArray();
        var third = order.Length / 3;
        var coldWet = order.Take(third).Average(t => LongWeather.Wet[t] ? 1.0 : 0.0);
        var mildWet = order.Skip(order.Length - third).Average(t => LongWeather.Wet[t] ? 1.0 : 0.0);
        Assert.True(mildWet > coldWet, $"wet-day share {mildWet:F3} in the mildest third of days, {coldWet:F3} in the coldest");
    }

    [Fact]
    public void Onset_and_melt_out_vary_by_weeks_from_season_to_season_at_mid_elevation()
    {
        // From memory: at a mid-elevation station the year-to-year sd of snow onset and melt-out is about 2–3 weeks;
        // the bounds allow 10–30 days. The regimes move them independently: |r(onset, melt-out)| stays small.
        var values = SeasonMetricsCalc.Compute(SnowSimulator.Simulate(DefaultLengthWeather, new PlaceInputs(1000, 15, 47, 0), 21), DefaultLengthWeather);
        Assert.All(values, v => Assert.True(v.Onset.HasValue, "a 1,000 m station has cover every season"));
        var onset = values.Select(v => (double)v.Onset!.Value).ToArray();
        var melt = values.Select(v => (double)v.Meltout!.Value).ToArray();
        Assert.InRange(Sd(onset), 10, 30);
        Assert.InRange(Sd(melt), 10, 30);
        Assert.InRange(Correlation(onset, melt), -0.5, 0.5);
    }

    [Fact]
    public void A_season_whose_cycle_runs_late_has_its_onset_centroid_and_melt_out_late_together_but_not_a_longer_season()
    {
        // The generator's own input: SeasonPhaseSdDays, normal truncated at ±2.5 sd. A phase of φ days shifts the seasonal
        // cycle by φ, so at a 1,000 m station onset, centroid and melt-out each move with φ (positive correlations), while
        // the length of the season (melt-out − onset) does not follow φ.
        var phase = LongWeather.SeasonPhaseDays.ToArray();
        Assert.All(phase, p => Assert.InRange(p, -2.5 * Climate.SeasonPhaseSdDays, 2.5 * Climate.SeasonPhaseSdDays));
        Assert.InRange(Sd(phase), 0.8 * Climate.SeasonPhaseSdDays, 1.1 * Climate.SeasonPhaseSdDays);

        var values = SeasonMetricsCalc.Compute(SnowSimulator.Simulate(LongWeather, new PlaceInputs(1000, 15, 47, 0), 21), LongWeather);
        var onset = values.Select(v => (double)v.Onset!.Value).ToArray();
        var melt = values.Select(v => (double)v.Meltout!.Value).ToArray();
        var centroid = values.Select(v => v.Centroid!.Value).ToArray();
        var length = values.Select(v => (double)(v.Meltout!.Value - v.Onset!.Value)).ToArray();

        Assert.True(Correlation(phase, onset) > 0.3, $"r(phase, onset) {Correlation(phase, onset):F2}");
        Assert.True(Correlation(phase, melt) > 0.3, $"r(phase, melt-out) {Correlation(phase, melt):F2}");
        Assert.True(Correlation(phase, centroid) > 0.5, $"r(phase, centroid) {Correlation(phase, centroid):F2}");
        Assert.InRange(Correlation(phase, length), -0.25, 0.25);
    }

    [Fact]
    public void Fresh_snow_is_light_and_the_pack_settles_towards_the_settled_density()
    {
        // Depth / SWE = 1000 / density: a first snowfall is near 100 kg/m³ (10 mm of depth per mm SWE); an old pack near
        // 350 kg/m³ (about 2.9 mm per mm) — both "common practice" figures cited in Climate.
        Assert.Equal(10.0, Climate.WaterDensity / Climate.FreshDensity, 12);
        Assert.InRange(Climate.WaterDensity / Climate.SettledDensity, 2.85, 2.86);
        var depth = SnowSimulator.Simulate(Weather, new PlaceInputs(2100, 25, 47, 0), 8);
        Assert.True(depth.Max() > 1000, "a high station builds a pack of over a metre");
        Assert.True(depth.Max() < 8000, "but not an implausible one");
    }

    [Fact]
    public void The_same_inputs_and_seed_give_the_same_depths()
    {
        var place = new PlaceInputs(800, 12, 47.1, 0.3);
        Assert.Equal(SnowSimulator.Simulate(Weather, place, 17), SnowSimulator.Simulate(Weather, place, 17));
    }

    [Fact]
    public void Twenty_nine_february_is_simulated_but_has_no_season_day()
    {
        var leap = Array.FindIndex(Weather.Dates, d => d.Month == 2 && d.Day == 29);
        Assert.True(leap > 0);
        Assert.Equal(-1, Weather.SeasonDay[leap]);
        Assert.Equal(Weather.SeasonDay[leap - 1] + 1, Weather.SeasonDay[leap + 1]);
    }
}

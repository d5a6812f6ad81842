using System.Globalization;
using System.Text.Json;

namespace Spatial.Scenario.Internal;

/// <summary>Writes truth.json (indented UTF-8, numbers rounded to 4 decimals, null where unknown).</summary>
internal static class TruthJson
{
    /// <summary>Version of the truth.json layout.</summary>
    public const int FormatVersion = 1;

    private static readonly (string Name, double Value, string Unit, string Source)[] Constants =
    [
        ("sea_level_mean_c", Climate.SeaLevelMeanC, "degC", "invented"),
        ("latitude_gradient_c_per_deg", Climate.LatitudeGradientCPerDeg, "degC/deg", "from memory"),
        ("lapse_rate_c_per_km", Climate.LapseRateCPerKm, "degC/km", "ISO 2533 (ICAO standard atmosphere)"),
        ("coastal_amplitude_c", Climate.CoastalAmplitudeC, "degC", "invented"),
        ("inland_extra_amplitude_c", Climate.InlandExtraAmplitudeC, "degC", "invented"),
        ("continentality_scale_km", Climate.ContinentalityScaleKm, "km", "invented"),
        ("inland_coldest_doy", Climate.InlandColdestDoy, "day of year (0-based)", "from memory"),
        ("coastal_extra_lag_days", Climate.CoastalExtraLagDays, "days", "from memory"),
        ("year_anomaly_ar", Climate.YearAnomalyAr, "1", "invented"),
        ("year_anomaly_sd_c", Climate.YearAnomalySdC, "degC", "from memory"),
        ("daily_anomaly_ar", Climate.DailyAnomalyAr, "1", "from memory"),
        ("daily_anomaly_sd_c", Climate.DailyAnomalySdC, "degC", "invented"),
        ("regime_e_folding_days", Climate.RegimeEFoldingDays, "days", "from memory"),
        ("regime_sd_c", Climate.RegimeSdC, "degC", "from memory"),
        ("ocean_e_folding_days", Climate.OceanEFoldingDays, "days", "from memory"),
        ("ocean_sd_c", Climate.OceanSdC, "degC", "from memory"),
        ("season_phase_sd_days", Climate.SeasonPhaseSdDays, "days", "invented"),
        ("season_phase_ramp_days", Climate.SeasonPhaseRampDays, "days", "invented"),
        ("regime_wet_correlation", Climate.RegimeWetCorrelation, "1", "from memory"),
        ("regime_wet_chance_log", Climate.RegimeWetChanceLog, "1", "invented"),
        ("regime_amount_log", Climate.RegimeAmountLog, "1", "invented"),
        ("local_noise_sd_c", Climate.LocalNoiseSdC, "degC", "invented"),
        ("warming_c_per_decade", Climate.WarmingCPerDecade, "degC/decade", "invented"),
        ("wet_after_dry", Climate.WetAfterDry, "probability", "from memory"),
        ("wet_after_wet", Climate.WetAfterWet, "probability", "from memory"),
        ("wet_seasonality", Climate.WetSeasonality, "1", "invented"),
        ("amount_gamma_shape", Climate.AmountShape, "1", "from memory"),
        ("mean_wet_day_mm", Climate.MeanWetDayMm, "mm", "invented"),
        ("amount_seasonality", Climate.AmountSeasonality, "1", "invented"),
        ("orographic_per_km", Climate.OrographicPerKm, "1/km", "common practice"),
        ("windward_effect", Climate.WindwardEffect, "1", "invented"),
        ("local_dry_chance", Climate.LocalDryChance, "probability", "invented"),
        ("local_amount_log_sd", Climate.LocalAmountLogSd, "1", "invented"),
        ("snow_threshold_c", Climate.SnowThresholdC, "degC", "common practice"),
        ("melt_base_c", Climate.MeltBaseC, "degC", "common practice"),
        ("degree_day_factor_mm_per_c_day", Climate.DegreeDayFactor, "mm/(degC day)", "from memory"),
        ("fresh_density_kg_m3", Climate.FreshDensity, "kg/m3", "common practice"),
        ("settled_density_kg_m3", Climate.SettledDensity, "kg/m3", "common practice"),
        ("settling_days", Climate.SettlingDays, "days", "from memory"),
        ("cover_threshold_mm", Climate.CoverThresholdMm, "mm", "common practice"),
    ];

    private static readonly (string Name, double Value)[] Rates =
    [
        ("missing_day", FaultRates.MissingDay),
        ("summers_unreported_stations", FaultRates.SummersUnreportedStations),
        ("outage_season", FaultRates.OutageSeason),
        ("outage_min_days", FaultRates.OutageMinDays),
        ("outage_max_days", FaultRates.OutageMaxDays),
        ("spike_day", FaultRates.SpikeDay),
        ("spike_min_mm", FaultRates.SpikeMinMm),
        ("spike_max_mm", FaultRates.SpikeMaxMm),
        ("flat_line_stations", FaultRates.FlatLineStations),
        ("flat_line_min_days", FaultRates.FlatLineMinDays),
        ("flat_line_max_days", FaultRates.FlatLineMaxDays),
        ("centimetre_station_seasons", FaultRates.CentimetreSeasons),
        ("sparse_stations", FaultRates.SparseStations),
        ("sparse_report_day", FaultRates.SparseReportDay),
        ("gross_elevation_stations", FaultRates.GrossElevationStations),
        ("gross_elevation_min_m", FaultRates.GrossMinM),
        ("gross_elevation_max_m", FaultRates.GrossMaxM),
        ("survey_error_sd_m", FaultRates.SurveySdM),
    ];

    private static readonly (string Name, string Text)[] Definitions =
    [
        ("calendar", "Seasons start on 1 September (day 0) and have 365 days; 29 February is dropped. A season is named by the calendar year in which it starts."),
        ("noise_free", "The generator's true daily snow depth (whole mm) before any observation fault: weather variability is included, faults and listed-elevation errors are not."),
        ("covered_day", "A day whose true depth is at least cover_threshold_mm (25 mm)."),
        ("onset_day", "First covered day of a season; unknown in a season without cover."),
        ("meltout_day", "Last covered day of a season; unknown in a season without cover."),
        ("duration_days", "meltout_day - onset_day + 1; 0 in a season without cover."),
        ("longest_cover_days", "Longest run of consecutive covered days."),
        ("snow_days", "Number of covered days."),
        ("peak_depth_mm", "Greatest true depth of the season, mm."),
        ("centroid_day", "Depth-weighted mean day of the season, sum(d * depth_d) / sum(depth_d) over its 365 days; unknown in a season without snow. Where the season's snow lies in time: it comes later at higher stations, whose snow lasts into spring, even though their onset is earlier."),
        ("phase_days", "The region's season phase anomaly (truth_seasons.csv and season_phase): the days by which the whole seasonal cycle of temperature and precipitation runs late (+) or early (-) in that season, the same at every station; it moves onset, melt-out and centroid together (an earlier or later season, not a longer one)."),
        ("mean", "Mean over seasons of a station's season values; onset_day and meltout_day over the seasons with cover only (null when none has)."),
        ("median", "Median over the same seasons as mean."),
        ("elevation_true_m", "DEM interpolated bilinearly between cell centres at the station (the containing cell's value next to the sea); the elevation the generator uses."),
        ("coast_km", "Planar distance in UTM zone 25N from the station to the nearest land-polygon boundary (coastline and islets), km; within 0.05 % of the geodesic distance."),
        ("finite_difference", "For each station, a central difference of its season-mean metric when one generator input moves and everything else, including every random number, stays: elevation +-100 m (per km), coast distance +-1 km (per 10 km), latitude +-0.05 deg (per degree), a uniform temperature offset +-0.15 degC (per 0.3 degC = per decade of the trend); a step that would go below 0 is moved up to start at 0. onset/meltout differences average the seasons with cover in both runs and need such cover in at least half the seasons; the region value is the mean over the stations where it is defined (timing_stations for onset/meltout)."),
        ("ols", "Ordinary least squares over the stations of the station-mean metric on [1, elevation_true_m/1000, coast_km/10, latitude]: what a regression with exactly these predictors estimates from perfect data. Stations with cover in fewer than half the seasons are left out of the onset_day, meltout_day and centroid_day fits."),
        ("ols_median", "As ols, with the station-median metric as the response (same stations, same predictors): what a regression of station medians estimates from perfect data. Means and medians part where a metric's season values are skewed (onset_day: a few very early first snowfalls)."),
        ("realised_trend_per_decade", "Mean over stations of the least-squares slope of each season value on the season year, times 10 (onset/meltout over seasons with cover, stations with cover in at least half the seasons)."),
        ("per_decade_warming", "The expected change per decade of the 0.3 degC/decade warming: the finite difference for a uniform +-0.15 degC offset."),
    ];

    public static void Write(Stream stream, Scenario scenario)
    {
        using var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true });
        var o = scenario.Options;
        w.WriteStartObject();
        w.WriteNumber("format_version", FormatVersion);
        w.WriteString("region", "Marrowfell");
        w.WriteString("note", "Everything here is invented: the island, its terrain, stations, weather and records.");
        w.WriteNumber("seed", o.Seed);
        w.WriteNumber("stations", scenario.Stations.Count);
        w.WriteNumber("first_season", o.FirstSeason);
        w.WriteNumber("last_season", o.LastSeason);
        w.WriteString("season_start", "09-01");
        w.WriteNumber("cover_threshold_mm", Climate.CoverThresholdMm);
        w.WriteString("dem_crs", "EPSG:32625");

        w.WriteStartObject("definitions");
        foreach (var (name, text) in Definitions)
        {
            w.WriteString(name, text);
        }

        w.WriteEndObject();

        w.WriteStartArray("generator");
        foreach (var (name, value, unit, source) in Constants)
        {
            w.WriteStartObject();
            w.WriteString("name", name);
            Num(w, "value", value);
            w.WriteString("unit", unit);
            w.WriteString("source", source);
            w.WriteEndObject();
        }

        w.WriteEndArray();

        w.WriteStartObject("fault_rates");
        foreach (var (name, value) in Rates)
        {
            Num(w, name, value);
        }

        w.WriteEndObject();

        if (scenario.Truth.Effects is { } e)
        {
            w.WriteStartObject("effects");
            w.WriteNumber("stations", e.Stations);
            w.WriteNumber("timing_stations", e.TimingStations);
            w.WriteStartObject("finite_difference");
            Metrics(w, "per_km_elevation", e.PerKmElevation);
            Metrics(w, "per_10km_coast", e.Per10KmCoast);
            Metrics(w, "per_degree_latitude", e.PerDegreeLatitude);
            Metrics(w, "per_decade_warming", e.PerDecadeWarming);
            w.WriteEndObject();
            Metrics(w, "realised_trend_per_decade", e.PerDecadeRealised);
            Ols(w, "ols", e.Ols);
            Ols(w, "ols_median", e.OlsMedian);
            w.WriteEndObject();
        }

        w.WriteStartArray("season_phase");
        foreach (var season in scenario.Truth.Stations.Count > 0 ? scenario.Truth.Stations[0].Seasons : [])
        {
            w.WriteStartObject();
            w.WriteNumber("season", season.Season);
            Num(w, "phase_days", season.PhaseDays, 3);
            w.WriteEndObject();
        }

        w.WriteEndArray();

        w.WriteStartArray("station_truth");
        for (var i = 0; i < scenario.Stations.Count; i++)
        {
            var s = scenario.Stations[i];
            var t = scenario.Truth.Stations[i];
            var f = s.Faults;
            w.WriteStartObject();
            w.WriteString("station", s.Station.Id.Value);
            w.WriteString("name", s.Station.Name);
            Num(w, "longitude", s.Station.Longitude, 6);
            Num(w, "latitude", s.Station.Latitude, 6);
            Num(w, "easting_m", s.EastingM, 1);
            Num(w, "northing_m", s.NorthingM, 1);
            Num(w, "elevation_true_m", s.ElevationTrueM, 1);
            Num(w, "elevation_listed_m", s.Station.ElevationListedM ?? double.NaN, 1);
            Num(w, "coast_km", s.CoastKm, 3);
            Num(w, "windward_index", s.WindwardIndex, 3);
            Num(w, "cover_season_fraction", t.CoverSeasonFraction);
            Metrics(w, "mean", t.Mean);
            Metrics(w, "median", t.Median);
            w.WriteStartObject("faults");
            Num(w, "elevation_listed_error_m", f.ListedElevationErrorM, 1);
            w.WriteBoolean("elevation_gross_error", f.GrossElevationError);
            w.WriteBoolean("summers_unreported", f.SummersUnreported);
            w.WriteBoolean("sparse", f.Sparse);
            if (f.FlatLine is { } fl)
            {
                Span(w, "flat_line", fl);
            }
            else
            {
                w.WriteNull("flat_line");
            }

            w.WriteStartArray("centimetre_seasons");
            foreach (var season in f.CentimetreSeasons)
            {
                w.WriteNumberValue(season);
            }

            w.WriteEndArray();
            w.WriteStartArray("outages");
            foreach (var span in f.Outages)
            {
                w.WriteStartObject();
                w.WriteString("first", Date(span.First));
                w.WriteString("last", Date(span.Last));
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteStartArray("spike_days");
            foreach (var d in f.SpikeDays)
            {
                w.WriteStringValue(Date(d));
            }

            w.WriteEndArray();
            w.WriteNumber("missing_days", f.MissingDays);
            w.WriteEndObject();
            w.WriteEndObject();
        }

        w.WriteEndArray();
        w.WriteEndObject();
        w.Flush();
        stream.Write("\n"u8);
    }

    private static string Date(DateOnly d) => d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    private static void Span(Utf8JsonWriter w, string name, DaySpan span)
    {
        w.WriteStartObject(name);
        w.WriteString("first", Date(span.First));
        w.WriteString("last", Date(span.Last));
        w.WriteEndObject();
    }

    private static void Ols(Utf8JsonWriter w, string name, IReadOnlyList<OlsEffect> models)
    {
        w.WriteStartArray(name);
        foreach (var m in models)
        {
            w.WriteStartObject();
            w.WriteString("response", m.Response);
            w.WriteNumber("stations", m.Stations);
            Num(w, "intercept", m.Intercept);
            Num(w, "elevation_km", m.ElevationKm);
            Num(w, "coast_10km", m.Coast10Km);
            Num(w, "latitude_deg", m.LatitudeDeg);
            Num(w, "r2", m.R2);
            w.WriteEndObject();
        }

        w.WriteEndArray();
    }

    private static void Metrics(Utf8JsonWriter w, string name, SnowMetrics m)
    {
        w.WriteStartObject(name);
        var values = m.ToArray();
        for (var k = 0; k < values.Length; k++)
        {
            Num(w, SnowMetrics.Names[k], values[k]);
        }

        w.WriteEndObject();
    }

    private static void Num(Utf8JsonWriter w, string name, double value, int decimals = 4)
    {
        if (double.IsNaN(value) || double.IsInfinity(value))
        {
            w.WriteNull(name);
        }
        else
        {
            w.WriteNumber(name, Math.Round(value, decimals));
        }
    }
}

namespace Spatial.Scenario.Internal;

/// <summary>
/// Every constant of the Marrowfell weather and snow generator, with its source label. "Invented" values shape the
/// fictional island's climate; "common practice" values are rules of thumb of the field; "from memory" values are
/// recalled typical figures from the literature, not checked against a source here.
/// </summary>
internal static class Climate
{
    // ---- Air temperature (daily mean, °C) ----

    /// <summary>Annual mean sea-level air temperature at 47° N on the island, °C (invented; a cool maritime climate).</summary>
    public const double SeaLevelMeanC = 11.0;

    /// <summary>Reference latitude of <see cref="SeaLevelMeanC"/>, degrees north.</summary>
    public const double ReferenceLatitude = 47.0;

    /// <summary>Change of annual mean temperature per degree of latitude northwards, °C/° (from memory: mid-latitude meridional gradient about 0.5–0.7 °C per degree).</summary>
    public const double LatitudeGradientCPerDeg = -0.6;

    /// <summary>Temperature lapse rate, °C per km of elevation (ICAO standard atmosphere, ISO 2533:1975: 6.5 K/km in the troposphere).</summary>
    public const double LapseRateCPerKm = 6.5;

    /// <summary>Half-range of the seasonal cycle at the coast, °C (invented; maritime).</summary>
    public const double CoastalAmplitudeC = 4.0;

    /// <summary>Extra half-range reached far inland, °C (invented; continentality).</summary>
    public const double InlandExtraAmplitudeC = 5.5;

    /// <summary>Coast distance over which continentality grows (e-folding), km (invented).</summary>
    public const double ContinentalityScaleKm = 15.0;

    /// <summary>Coldest day of the year far inland, 0-based day of a 365-day year (24 January; from memory: about 3–4 weeks after the solstice on land).</summary>
    public const double InlandColdestDoy = 23;

    /// <summary>Extra lag of the coldest day at the coast, days (from memory: oceanic climates lag later, into February).</summary>
    public const double CoastalExtraLagDays = 14;

    /// <summary>AR(1) coefficient of the regional year-to-year temperature anomaly (invented).</summary>
    public const double YearAnomalyAr = 0.4;

    /// <summary>Standard deviation of the regional year-to-year anomaly, °C (from memory: interannual winter-mean sd about 0.5–1 °C in maritime climates).</summary>
    public const double YearAnomalySdC = 0.7;

    /// <summary>AR(1) coefficient of the regional day-to-day anomaly (from memory: daily temperature lag-1 autocorrelation about 0.6–0.8).</summary>
    public const double DailyAnomalyAr = 0.75;

    /// <summary>
    /// Standard deviation of the regional day-to-day anomaly, °C (invented; maritime). Together with the weather-regime
    /// anomaly (<see cref="RegimeSdC"/>) the regional daily anomaly has an sd of about 2.7 °C (√(2.0² + 1.8²); before the regimes were added, 2.5 °C from the day-to-day part alone) and a lag-1 autocorrelation of about 0.85.
    /// </summary>
    public const double DailyAnomalySdC = 2.0;

    /// <summary>
    /// E-folding time of the weather-regime temperature anomaly, days: an AR(1) at daily step with coefficient
    /// exp(−1/τ) (from memory: synoptic weather regimes — blocked or zonal spells — persist for weeks, so that a whole
    /// month can run cold or mild).
    /// </summary>
    public const double RegimeEFoldingDays = 30;

    /// <summary>
    /// Standard deviation of the weather-regime temperature anomaly, °C (from memory: monthly-mean temperature anomalies
    /// of about 1.5–2 °C in mid-latitude maritime winters). It moves onset and melt-out independently of each other and
    /// of the winter's total snowfall, because early and late season fall in different regimes.
    /// </summary>
    public const double RegimeSdC = 1.8;

    /// <summary>
    /// E-folding time of the slow ocean-driven temperature anomaly, days: an AR(1) at daily step (from memory: mid-latitude
    /// ocean mixed-layer temperature anomalies persist for about 3–6 months, and an island's air follows its sea).
    /// </summary>
    public const double OceanEFoldingDays = 90;

    /// <summary>Standard deviation of the slow ocean-driven temperature anomaly, °C (from memory: sea-surface temperature anomalies of about 0.5–1 °C).</summary>
    public const double OceanSdC = 0.6;

    /// <summary>
    /// Correlation of the precipitation regime index with the temperature regime (from memory: in westerly maritime
    /// climates mild spells tend to be wet and cold, blocked spells dry).
    /// </summary>
    public const double RegimeWetCorrelation = 0.3;

    /// <summary>Log-scale effect of one sd of the precipitation regime index on the wet-day probabilities (invented).</summary>
    public const double RegimeWetChanceLog = 0.25;

    /// <summary>Log-scale effect of one sd of the precipitation regime index on wet-day amounts (mean-preserving; invented).</summary>
    public const double RegimeAmountLog = 0.2;

    /// <summary>
    /// Standard deviation of the season phase anomaly, days (invented, of the order of the year-to-year spread of the
    /// timing of snowmelt, one to three weeks, from memory): in each season the whole seasonal cycle of temperature and
    /// of the precipitation maximum runs early or late by a number of days drawn once for the region (normal, truncated at ±2.5 sd). It makes some
    /// winters come and go early and others late, a mode of variation that moves onset, melt-out and the depth-weighted
    /// centre of the season together without lengthening the season; without it the weather regimes move onset and
    /// melt-out only independently of each other.
    /// </summary>
    public const double SeasonPhaseSdDays = 12;

    /// <summary>Days from 1 September over which the phase anomaly passes from the previous season's value to this season's (invented; no jump in the weather at the season boundary).</summary>
    public const double SeasonPhaseRampDays = 30;

    /// <summary>Standard deviation of the local (station) day-to-day noise, °C (invented).</summary>
    public const double LocalNoiseSdC = 0.7;

    /// <summary>Warming trend, °C per decade, applied uniformly (invented, of the size reported for recent decades: about 0.2–0.3 °C per decade, from memory).</summary>
    public const double WarmingCPerDecade = 0.3;

    // ---- Precipitation (daily, mm water equivalent) ----

    /// <summary>Regional probability of a wet day after a dry day, annual mean (from memory: two-state Markov chains fitted to maritime stations give p01 about 0.3–0.4).</summary>
    public const double WetAfterDry = 0.38;

    /// <summary>Regional probability of a wet day after a wet day, annual mean (from memory: p11 about 0.6–0.75).</summary>
    public const double WetAfterWet = 0.68;

    /// <summary>Relative winter excess of wet-day probabilities (±, cosine over the year peaking mid-January; invented).</summary>
    public const double WetSeasonality = 0.15;

    /// <summary>Gamma shape of wet-day amounts (from memory: daily precipitation gamma shapes about 0.6–0.9).</summary>
    public const double AmountShape = 0.75;

    /// <summary>Mean wet-day amount at sea level on the crest line (windward index 0), mm (invented).</summary>
    public const double MeanWetDayMm = 4.0;

    /// <summary>Relative winter excess of wet-day amounts (invented).</summary>
    public const double AmountSeasonality = 0.25;

    /// <summary>Orographic enhancement: relative increase of precipitation per km of elevation (common practice: precipitation gradients of several per cent per 100 m).</summary>
    public const double OrographicPerKm = 0.4;

    /// <summary>Windward enhancement: relative change at windward index ±1 (west +, lee −) (invented).</summary>
    public const double WindwardEffect = 0.3;

    /// <summary>Probability that a station stays dry on a regionally wet day (invented).</summary>
    public const double LocalDryChance = 0.12;

    /// <summary>Log-scale standard deviation of the station's daily amount factor (invented).</summary>
    public const double LocalAmountLogSd = 0.35;

    // ---- Snow ----

    /// <summary>Precipitation falls as snow at or below this daily mean air temperature, °C (common practice: a threshold near 1 °C).</summary>
    public const double SnowThresholdC = 1.0;

    /// <summary>Melt starts above this daily mean temperature, °C (common practice for the temperature-index method).</summary>
    public const double MeltBaseC = 0.0;

    /// <summary>Degree-day melt factor, mm water equivalent per °C per day (from memory: temperature-index melt literature, usual range 3–5).</summary>
    public const double DegreeDayFactor = 4.0;

    /// <summary>Density of fresh snow, kg/m³ (common practice: about 100).</summary>
    public const double FreshDensity = 100;

    /// <summary>Density a settled seasonal pack tends to, kg/m³ (common practice: about 350).</summary>
    public const double SettledDensity = 350;

    /// <summary>E-folding time of settling towards <see cref="SettledDensity"/>, days (from memory: seasonal packs densify over weeks to a few months).</summary>
    public const double SettlingDays = 25;

    /// <summary>Density of liquid water, kg/m³ (depth mm = SWE mm × 1000 / density).</summary>
    public const double WaterDensity = 1000;

    /// <summary>Snow-cover threshold of the season metrics, mm of depth (common practice: 2.5 cm; the fitting stage's default).</summary>
    public const int CoverThresholdMm = 25;

    /// <summary>Half-range of the seasonal cycle at coast distance <paramref name="coastKm"/>, °C.</summary>
    public static double AmplitudeC(double coastKm) =>
        CoastalAmplitudeC + (InlandExtraAmplitudeC * (1 - Math.Exp(-coastKm / ContinentalityScaleKm)));

    /// <summary>Coldest 0-based day of the year at coast distance <paramref name="coastKm"/>.</summary>
    public static double ColdestDoy(double coastKm) => InlandColdestDoy + (CoastalExtraLagDays * Math.Exp(-coastKm / ContinentalityScaleKm));

    /// <summary>Annual mean temperature (°C) at elevation (m) and latitude (°N), before anomalies and trend.</summary>
    public static double AnnualMeanC(double elevationM, double latitude) =>
        SeaLevelMeanC + (LatitudeGradientCPerDeg * (latitude - ReferenceLatitude)) - (LapseRateCPerKm * elevationM / 1000);

    /// <summary>Precipitation factor relative to sea level on the crest line, at elevation (m) and windward index (−1…1).</summary>
    public static double PrecipitationFactor(double elevationM, double windward) =>
        (1 + (OrographicPerKm * Math.Max(0, elevationM) / 1000)) * (1 + (WindwardEffect * windward));
}

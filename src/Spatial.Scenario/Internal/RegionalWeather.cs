using Spatial.Core;

namespace Spatial.Scenario.Internal;

/// <summary>
/// The weather shared by the whole island, one value per calendar day from 1 September of the first season to
/// 31 August after the last (29 February included: the weather goes on; the season calendar drops that day): the
/// regional year-to-year, ocean-driven, weather-regime and day-to-day temperature anomalies (each AR(1)), the warming trend, and the
/// regional wet/dry Markov chain with gamma-distributed unit amounts, both modulated by a precipitation regime index
/// that is partly correlated with the temperature regime, and each season's phase anomaly, which shifts the seasonal cycle
/// of temperature and precipitation by a number of days (<see cref="Climate.SeasonPhaseSdDays"/>): <see cref="CosDoy"/>
/// and <see cref="SinDoy"/> are of the shifted day. Stations add their own climate and local noise.
/// </summary>
internal sealed class RegionalWeather
{
    private RegionalWeather(int firstSeason, int seasons, DateOnly[] dates, int[] seasonIndex, int[] seasonDay, double[] cosDoy, double[] sinDoy, double[] anomalyC, double[] regimeC, bool[] wet, double[] unitAmount, double[] seasonPhaseDays)
    {
        SeasonPhaseDays = seasonPhaseDays;
        FirstSeason = firstSeason;
        Seasons = seasons;
        Dates = dates;
        SeasonIndex = seasonIndex;
        SeasonDay = seasonDay;
        CosDoy = cosDoy;
        SinDoy = sinDoy;
        AnomalyC = anomalyC;
        RegimeC = regimeC;
        Wet = wet;
        UnitAmount = unitAmount;
    }

    /// <summary>The first season (calendar year in which it starts).</summary>
    public int FirstSeason { get; }

    /// <summary>Number of seasons.</summary>
    public int Seasons { get; }

    /// <summary>Calendar date of each day.</summary>
    public DateOnly[] Dates { get; }

    /// <summary>Season index (0-based) of each day.</summary>
    public int[] SeasonIndex { get; }

    /// <summary>Season day 0…364 of each day, −1 for 29 February (dropped by <see cref="SeasonCalendar"/>).</summary>
    public int[] SeasonDay { get; }

    /// <summary>cos(2π·(doy − phase)/365) of each day (doy 0-based in a 365-day year, 29 February takes 28 February's; phase = the season's phase anomaly, ramped in over the first days of the season).</summary>
    public double[] CosDoy { get; }

    /// <summary>sin(2π·(doy − phase)/365) of each day.</summary>
    public double[] SinDoy { get; }

    /// <summary>Regional temperature anomaly of each day (year-to-year + ocean + weather regime + day-to-day + warming trend), °C.</summary>
    public double[] AnomalyC { get; }

    /// <summary>
    /// The slow part of <see cref="AnomalyC"/>, °C: the weather regime (AR(1), e-folding <see cref="Climate.RegimeEFoldingDays"/>
    /// days) plus the ocean-driven anomaly (AR(1), e-folding <see cref="Climate.OceanEFoldingDays"/> days).
    /// </summary>
    public double[] RegimeC { get; }

    /// <summary>
    /// Per season, the days by which the whole seasonal cycle of temperature and precipitation runs late (+) or early (−)
    /// (see <see cref="Climate.SeasonPhaseSdDays"/>).
    /// </summary>
    public IReadOnlyList<double> SeasonPhaseDays { get; }

    /// <summary>True on regionally wet days.</summary>
    public bool[] Wet { get; }

    /// <summary>Regional wet-day amount relative to the mean (unit-mean gamma × seasonal factor × regime factor); 0 on dry days.</summary>
    public double[] UnitAmount { get; }

    /// <summary>Number of days.</summary>
    public int Days => Dates.Length;

    /// <summary>Generates the regional weather for <paramref name="seasons"/> seasons from <paramref name="firstSeason"/>.</summary>
    public static RegionalWeather Generate(int firstSeason, int seasons, ulong seed)
    {
        var calendar = SeasonCalendar.Default;
        var start = new DateOnly(firstSeason, 9, 1);
        var end = new DateOnly(firstSeason + seasons, 8, 31);
        var n = end.DayNumber - start.DayNumber + 1;
        var dates = new DateOnly[n];
        var seasonIndex = new int[n];
        var seasonDay = new int[n];
        var cos = new double[n];
        var sin = new double[n];
        var anomaly = new double[n];
        var wet = new bool[n];
        var amount = new double[n];
        var regime = new double[n];

        var rng = new Rng(Rng.Derive(seed, 0x5745415448UL)); // "WEATH"
        var yearAnomaly = new double[seasons];
        var ya = rng.Normal() * Climate.YearAnomalySdC;
        for (var s = 0; s < seasons; s++)
        {
            yearAnomaly[s] = ya;
            ya = (Climate.YearAnomalyAr * ya) + (Math.Sqrt(1 - (Climate.YearAnomalyAr * Climate.YearAnomalyAr)) * Climate.YearAnomalySdC * rng.Normal());
        }

        // Season phase anomaly from a stream of its own (so the other draws are unchanged): days by which the whole
        // seasonal cycle of temperature and precipitation runs late (+) or early (−) in each season.
        var phaseRng = new Rng(Rng.Derive(seed, 0x5048415345UL)); // "PHASE"
        var phase = new double[seasons];
        for (var s = 0; s < seasons; s++)
        {
            // Normal, truncated at ±2.5 sd by redrawing: no season runs more than a month early or late.
            var z = phaseRng.Normal();
            while (Math.Abs(z) > 2.5)
            {
                z = phaseRng.Normal();
            }

            phase[s] = Climate.SeasonPhaseSdDays * z;
        }

        var daily = rng.Normal() * Climate.DailyAnomalySdC;
        var dailyInnovation = Math.Sqrt(1 - (Climate.DailyAnomalyAr * Climate.DailyAnomalyAr)) * Climate.DailyAnomalySdC;

        // Weather regimes and the ocean anomaly from a stream of their own: a temperature regime and an independent unit
        // index (the precipitation regime index mixes the two to the documented correlation, keeping unit variance), and
        // the slower ocean-driven anomaly; all three are unit-variance AR(1) at daily step.
        var regimeRng = new Rng(Rng.Derive(seed, 0x5245474D45UL)); // "REGME"
        var regimeAr = Math.Exp(-1 / Climate.RegimeEFoldingDays);
        var regimeInnovation = Math.Sqrt(1 - (regimeAr * regimeAr));
        var tempRegime = regimeRng.Normal();
        var otherRegime = regimeRng.Normal();
        var oceanAr = Math.Exp(-1 / Climate.OceanEFoldingDays);
        var oceanInnovation = Math.Sqrt(1 - (oceanAr * oceanAr));
        var ocean = regimeRng.Normal();
        var rho = Climate.RegimeWetCorrelation;
        var mix = Math.Sqrt(1 - (rho * rho));
        var chanceLog = Climate.RegimeWetChanceLog;
        var amountLog = Climate.RegimeAmountLog;

        var wasWet = false;
        var midYears = seasons / 2.0;
        for (var t = 0; t < n; t++)
        {
            var date = start.AddDays(t);
            dates[t] = date;
            var leapDay = !calendar.TryLocate(date, out var season, out var day);
            if (leapDay)
            {
                calendar.TryLocate(date.AddDays(-1), out season, out _);
                day = -1;
            }

            var s = season - firstSeason;
            seasonIndex[t] = s;
            seasonDay[t] = day;
            var doy0 = leapDay ? 58 : date.DayOfYear - 1 - (DateTime.IsLeapYear(date.Year) && date.Month > 2 ? 1 : 0);
            var dayInSeason = leapDay ? 180 : day;
            var ramp = Math.Min(1.0, (dayInSeason + 0.5) / Climate.SeasonPhaseRampDays);
            var shift = s > 0 ? (ramp * phase[s]) + ((1 - ramp) * phase[s - 1]) : phase[s];
            var doy = doy0 - shift;
            var angle = 2 * Math.PI * doy / 365.0;
            cos[t] = Math.Cos(angle);
            sin[t] = Math.Sin(angle);

            var years = s + ((dayInSeason + 0.5) / SeasonCalendar.DaysPerSeason) - midYears;
            regime[t] = (Climate.RegimeSdC * tempRegime) + (Climate.OceanSdC * ocean);
            anomaly[t] = yearAnomaly[s] + regime[t] + daily + (Climate.WarmingCPerDecade * years / 10);
            daily = (Climate.DailyAnomalyAr * daily) + (dailyInnovation * rng.Normal());
            var wetIndex = (rho * tempRegime) + (mix * otherRegime);
            tempRegime = (regimeAr * tempRegime) + (regimeInnovation * regimeRng.Normal());
            otherRegime = (regimeAr * otherRegime) + (regimeInnovation * regimeRng.Normal());
            ocean = (oceanAr * ocean) + (oceanInnovation * regimeRng.Normal());

            // Wet regimes raise the wet-day chances and amounts by log-normal factors exp(aZ − a²/2) and exp(bZ − b²/2 − ab),
            // whose product has unit mean over the regimes (E[e^((a+b)Z)] = e^((a+b)²/2)): the regimes move precipitation
            // between spells and hardly add to the mean (+2.4 % over 150 seasons, from the wet-spell persistence).
            var chanceFactor = Math.Exp((chanceLog * wetIndex) - (0.5 * chanceLog * chanceLog));
            var amountFactor = Math.Exp((amountLog * wetIndex) - (0.5 * amountLog * amountLog) - (chanceLog * amountLog));

            // Wetter winters: the cosine peaks in mid-January (doy 15).
            var winter = Math.Cos(2 * Math.PI * (doy - 15) / 365.0);
            var p = wasWet
                ? Math.Min(0.95, Climate.WetAfterWet * (1 + (Climate.WetSeasonality * winter)) * chanceFactor)
                : Math.Min(0.95, Climate.WetAfterDry * (1 + (Climate.WetSeasonality * winter)) * chanceFactor);
            var u = rng.NextDouble();
            var g = rng.Gamma(Climate.AmountShape) / Climate.AmountShape;
            wasWet = u < p;
            wet[t] = wasWet;
            amount[t] = wasWet ? g * (1 + (Climate.AmountSeasonality * winter)) * amountFactor : 0;
        }

        return new RegionalWeather(firstSeason, seasons, dates, seasonIndex, seasonDay, cos, sin, anomaly, regime, wet, amount, phase);
    }
}

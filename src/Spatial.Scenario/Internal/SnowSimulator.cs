namespace Spatial.Scenario.Internal;

/// <summary>What the generator needs to know about a station's place.</summary>
/// <param name="ElevationM">True elevation, metres.</param>
/// <param name="CoastKm">Distance to the sea, km.</param>
/// <param name="Latitude">Latitude, degrees north.</param>
/// <param name="Windward">Windward index, −1 (lee) … +1 (windward west).</param>
internal readonly record struct PlaceInputs(double ElevationM, double CoastKm, double Latitude, double Windward);

/// <summary>
/// The station's daily weather and snowpack: temperature = the place's annual mean (lapse rate, latitude) + a
/// seasonal cycle whose amplitude and lag depend on coast distance + the regional anomaly + local noise (+ an optional
/// uniform offset); precipitation = the regional wet/dry chain and amount × the place's orographic and windward
/// factor × local noise; snow accumulates at or below the rain/snow threshold, melts by degree days, and settles
/// from fresh-snow density towards a settled density. Depth (mm) = SWE (mm) × 1000 / density.
/// </summary>
/// <remarks>
/// The random draws per day are fixed in number and order (three per day) whatever the physical state, so that runs
/// with the same seed and perturbed inputs share their random numbers (common random numbers for finite differences).
/// Rain on snow is not modelled (it runs off). Values are deterministic for a seed.
/// </remarks>
internal static class SnowSimulator
{
    /// <summary>Daily snow depth (mm, rounded to whole millimetres) for every day of <paramref name="weather"/>.</summary>
    public static short[] Simulate(RegionalWeather weather, PlaceInputs place, ulong seed, double offsetC = 0)
    {
        var rng = new Rng(seed);
        var n = weather.Days;
        var depth = new short[n];
        var mean = Climate.AnnualMeanC(place.ElevationM, place.Latitude) + offsetC;
        var amp = Climate.AmplitudeC(place.CoastKm);
        var coldAngle = 2 * Math.PI * Climate.ColdestDoy(place.CoastKm) / 365.0;
        var cc = Math.Cos(coldAngle);
        var cs = Math.Sin(coldAngle);
        var wetMean = Climate.MeanWetDayMm * Climate.PrecipitationFactor(place.ElevationM, place.Windward);
        var logSd = Climate.LocalAmountLogSd;
        var logMeanCorrection = -0.5 * logSd * logSd;
        var settle = Math.Exp(-1 / Climate.SettlingDays);

        var swe = 0.0;
        var density = Climate.FreshDensity;
        var cosD = weather.CosDoy;
        var sinD = weather.SinDoy;
        var anomaly = weather.AnomalyC;
        var wet = weather.Wet;
        var unit = weather.UnitAmount;
        for (var t = 0; t < n; t++)
        {
            var localNoise = rng.Normal();
            var dryDraw = rng.NextDouble();
            var amountNoise = rng.Normal();

            // cos(2π(doy − coldest)/365) by the angle-difference identity; the cycle is coldest on the coldest day.
            var seasonal = -amp * ((cosD[t] * cc) + (sinD[t] * cs));
            var temp = mean + seasonal + anomaly[t] + (Climate.LocalNoiseSdC * localNoise);
            var precip = wet[t] && dryDraw >= Climate.LocalDryChance
                ? wetMean * unit[t] * Math.Exp((logSd * amountNoise) + logMeanCorrection)
                : 0.0;

            if (swe > 0)
            {
                density = Climate.SettledDensity - ((Climate.SettledDensity - density) * settle);
            }

            if (precip > 0 && temp <= Climate.SnowThresholdC)
            {
                density = (swe + precip) / ((swe / density) + (precip / Climate.FreshDensity));
                swe += precip;
            }

            if (temp > Climate.MeltBaseC && swe > 0)
            {
                swe = Math.Max(0, swe - (Climate.DegreeDayFactor * (temp - Climate.MeltBaseC)));
            }

            if (swe <= 0)
            {
                swe = 0;
                density = Climate.FreshDensity;
            }

            depth[t] = (short)Math.Min(short.MaxValue, Math.Round(swe * Climate.WaterDensity / density));
        }

        return depth;
    }
}

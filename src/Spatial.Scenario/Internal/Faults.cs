namespace Spatial.Scenario.Internal;

/// <summary>
/// Rates of the observation faults put into the records (all invented, of the kinds met in real station networks;
/// documented in gis-samples/README.md and truth.json). Station-level and station-season faults are given to an
/// exact number of stations, round(rate × count) but at least the stated minimum (never more than there are);
/// day-level and season-level faults are independent draws at the stated rate.
/// </summary>
internal static class FaultRates
{
    /// <summary>Probability that a reported day is left out at random.</summary>
    public const double MissingDay = 0.02;

    /// <summary>Fraction of stations that report nothing in June, July and August.</summary>
    public const double SummersUnreportedStations = 0.30;

    /// <summary>Probability that a station-season holds one outage.</summary>
    public const double OutageSeason = 0.08;

    /// <summary>Shortest outage, days.</summary>
    public const int OutageMinDays = 14;

    /// <summary>Longest outage, days.</summary>
    public const int OutageMaxDays = 56;

    /// <summary>Probability that a reported day is a one-day spike.</summary>
    public const double SpikeDay = 0.0005;

    /// <summary>Smallest spike added to the true depth, mm.</summary>
    public const int SpikeMinMm = 600;

    /// <summary>Largest spike added to the true depth, mm.</summary>
    public const int SpikeMaxMm = 2500;

    /// <summary>Fraction of stations with one flat-lined episode (at least 1 station).</summary>
    public const double FlatLineStations = 0.02;

    /// <summary>Shortest flat-line episode, days.</summary>
    public const int FlatLineMinDays = 90;

    /// <summary>Longest flat-line episode, days.</summary>
    public const int FlatLineMaxDays = 240;

    /// <summary>Fraction of station-seasons written in cm although the file says mm (at least 2).</summary>
    public const double CentimetreSeasons = 0.01;

    /// <summary>Fraction of stations with very sparse records (at least 2).</summary>
    public const double SparseStations = 0.03;

    /// <summary>Probability that a sparse station reports a given day.</summary>
    public const double SparseReportDay = 0.06;

    /// <summary>Fraction of stations whose listed elevation is grossly wrong (at least 3).</summary>
    public const double GrossElevationStations = 0.03;

    /// <summary>Smallest gross elevation error, m.</summary>
    public const double GrossMinM = 250;

    /// <summary>Largest gross elevation error, m.</summary>
    public const double GrossMaxM = 800;

    /// <summary>Standard deviation of the ordinary survey error of listed elevations, m (from memory: map- and GPS-derived station elevations are good to about 5–10 m).</summary>
    public const double SurveySdM = 8;

    /// <summary>round(rate × count), at least <paramref name="min"/>, at most <paramref name="count"/>.</summary>
    public static int Count(double rate, int count, int min) => Math.Min(count, Math.Max(min, (int)Math.Round(rate * count)));
}

/// <summary>Which stations (and station-seasons) get the station-level faults; drawn once, in station order.</summary>
internal sealed record FaultPlan(bool[] SummersUnreported, bool[] Sparse, bool[] FlatLine, bool[] Gross, HashSet<(int Station, int Season)> CentimetreSeasons)
{
    public static FaultPlan Draw(int stations, int seasons, Rng rng)
    {
        var summer = Pick(rng, stations, FaultRates.Count(FaultRates.SummersUnreportedStations, stations, 0));

        // Flat-lined and sparse stations are kept apart, so each fault is seen on its own.
        var order = rng.Permutation(stations);
        var flat = new bool[stations];
        var sparse = new bool[stations];
        var nFlat = FaultRates.Count(FaultRates.FlatLineStations, stations, 1);
        var nSparse = Math.Min(stations - nFlat, FaultRates.Count(FaultRates.SparseStations, stations, 2));
        for (var k = 0; k < nFlat; k++)
        {
            flat[order[k]] = true;
        }

        for (var k = nFlat; k < nFlat + Math.Max(0, nSparse); k++)
        {
            sparse[order[k]] = true;
        }

        var gross = Pick(rng, stations, FaultRates.Count(FaultRates.GrossElevationStations, stations, 3));
        // Centimetre seasons go to stations that are not sparse (a sparse station-season could hide them).
        var cm = new HashSet<(int, int)>();
        var eligible = sparse.Count(x => !x);
        var nCm = Math.Min(eligible * seasons, FaultRates.Count(FaultRates.CentimetreSeasons, stations * seasons, 2));
        while (cm.Count < nCm)
        {
            var s = rng.NextInt(stations);
            if (!sparse[s])
            {
                cm.Add((s, rng.NextInt(seasons)));
            }
        }

        return new FaultPlan(summer, sparse, flat, gross, cm);
    }

    private static bool[] Pick(Rng rng, int n, int k)
    {
        var p = rng.Permutation(n);
        var chosen = new bool[n];
        for (var i = 0; i < k; i++)
        {
            chosen[p[i]] = true;
        }

        return chosen;
    }
}

/// <summary>Turns a station's true daily depth into what its observer reported.</summary>
internal static class FaultInjector
{
    /// <summary>The reported series (−1 = not reported) and a description of its faults (elevation fields left 0).</summary>
    public static (short[] Observed, StationFaults Faults) Apply(short[] truth, RegionalWeather weather, FaultPlan plan, int station, int firstSeason, Rng rng)
    {
        var n = truth.Length;
        var obs = (short[])truth.Clone();

        // cm written where the file says mm.
        var cmSeasons = new List<int>();
        for (var s = 0; s < weather.Seasons; s++)
        {
            if (plan.CentimetreSeasons.Contains((station, s)))
            {
                cmSeasons.Add(firstSeason + s);
            }
        }

        if (cmSeasons.Count > 0)
        {
            for (var t = 0; t < n; t++)
            {
                if (plan.CentimetreSeasons.Contains((station, weather.SeasonIndex[t])))
                {
                    obs[t] = (short)Math.Round(truth[t] / 10.0, MidpointRounding.AwayFromZero);
                }
            }
        }

        // A sensor stuck at one value, starting on a snowy day where there is one.
        DaySpan? flat = null;
        var flatFrom = -1;
        var flatTo = -1;
        if (plan.FlatLine[station])
        {
            var length = FaultRates.FlatLineMinDays + rng.NextInt(FaultRates.FlatLineMaxDays - FaultRates.FlatLineMinDays + 1);
            var snowy = new List<int>();
            for (var t = 0; t + length < n; t++)
            {
                if (truth[t] >= 100)
                {
                    snowy.Add(t);
                }
            }

            flatFrom = snowy.Count > 0 ? snowy[rng.NextInt(snowy.Count)] : rng.NextInt(Math.Max(1, n - length));
            flatTo = Math.Min(n - 1, flatFrom + length - 1);
            for (var t = flatFrom; t <= flatTo; t++)
            {
                obs[t] = obs[flatFrom];
            }

            flat = new DaySpan(weather.Dates[flatFrom], weather.Dates[flatTo]);
        }

        // Outages of several weeks.
        var reported = new bool[n];
        Array.Fill(reported, true);
        var outages = new List<DaySpan>();
        var seasonStart = 0;
        for (var s = 0; s < weather.Seasons; s++)
        {
            var seasonEnd = seasonStart;
            while (seasonEnd < n && weather.SeasonIndex[seasonEnd] == s)
            {
                seasonEnd++;
            }

            var happens = rng.NextDouble() < FaultRates.OutageSeason;
            var len = FaultRates.OutageMinDays + rng.NextInt(FaultRates.OutageMaxDays - FaultRates.OutageMinDays + 1);
            var start = seasonStart + rng.NextInt(seasonEnd - seasonStart);
            if (happens)
            {
                var end = Math.Min(n - 1, start + len - 1);
                for (var t = start; t <= end; t++)
                {
                    reported[t] = false;
                }

                outages.Add(new DaySpan(weather.Dates[start], weather.Dates[end]));
            }

            seasonStart = seasonEnd;
        }

        // Summers, sparse reporting, single missing days, spikes.
        var missing = 0;
        var spikes = new List<DateOnly>();
        for (var t = 0; t < n; t++)
        {
            var uMissing = rng.NextDouble();
            var uSparse = rng.NextDouble();
            var uSpike = rng.NextDouble();
            var spikeSize = FaultRates.SpikeMinMm + rng.NextInt(FaultRates.SpikeMaxMm - FaultRates.SpikeMinMm + 1);
            var month = weather.Dates[t].Month;
            if (plan.SummersUnreported[station] && month is >= 6 and <= 8)
            {
                reported[t] = false;
            }

            if (plan.Sparse[station] && uSparse >= FaultRates.SparseReportDay)
            {
                reported[t] = false;
            }

            if (reported[t] && uMissing < FaultRates.MissingDay)
            {
                reported[t] = false;
                missing++;
            }

            if (reported[t] && (t < flatFrom || t > flatTo) && uSpike < FaultRates.SpikeDay)
            {
                obs[t] = (short)Math.Min(short.MaxValue, obs[t] + spikeSize);
                spikes.Add(weather.Dates[t]);
            }

            if (!reported[t])
            {
                obs[t] = -1;
            }
        }

        var faults = new StationFaults(0, false, plan.SummersUnreported[station], plan.Sparse[station], flat, cmSeasons, outages, spikes, missing);
        return (obs, faults);
    }
}

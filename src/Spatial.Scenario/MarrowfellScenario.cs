using NetTopologySuite.Geometries;
using Spatial.Core;
using Spatial.Scenario.Internal;

namespace Spatial.Scenario;

/// <summary>
/// The invented demo region Marrowfell (an island near 47° N, 33° W in the open Atlantic; it overlaps no real land)
/// and its physically based snow generator with ground truth.
/// </summary>
public static class MarrowfellScenario
{
    /// <summary>Elevation step of the finite differences, m (central, ±).</summary>
    public const double ElevationStepM = 100;

    /// <summary>Coast-distance step of the finite differences, km (central, ±).</summary>
    public const double CoastStepKm = 1;

    /// <summary>Latitude step of the finite differences, degrees (central, ±).</summary>
    public const double LatitudeStepDeg = 0.05;

    /// <summary>Temperature offset step of the warming finite difference, °C (central, ±; the total 0.3 °C is one decade of the trend).</summary>
    public const double WarmingStepC = 0.15;

    internal const ulong StationStream = 0x53544154UL; // "STAT"
    private const ulong FaultStream = 0x4641554CUL; // "FAUL"
    private const ulong PlaceStream = 0x504C4143UL; // "PLAC"
    private const ulong NameStream = 0x4E414D45UL; // "NAME"
    private const ulong PlanStream = 0x504C414EUL; // "PLAN"

    /// <summary>
    /// Generates the region: the fixed island (DEM and coastline), <see cref="ScenarioOptions.Stations"/> stations placed
    /// by the seed, their daily snow depth over <see cref="ScenarioOptions.Seasons"/> seasons, the observation faults,
    /// and the noise-free truth with the region's effects. Deterministic for the options, whatever the thread count.
    /// </summary>
    public static Scenario Generate(ScenarioOptions options, IProgress<double>? progress = null)
    {
        ArgumentNullException.ThrowIfNull(options);
        options.Validate();
        var seed = unchecked((ulong)options.Seed);

        var island = Island.Build();
        var (dem, coastGrid) = DemBuilder.Build(island);
        var sites = StationPlacer.Place(island, dem, coastGrid, options.Stations, new Rng(Rng.Derive(seed, PlaceStream)));
        var weather = RegionalWeather.Generate(options.FirstSeason, options.Seasons, seed);
        var plan = FaultPlan.Draw(sites.Count, options.Seasons, new Rng(Rng.Derive(seed, PlanStream)));
        progress?.Report(0.05);

        var n = sites.Count;
        var observed = new short[n][];
        var faults = new StationFaults[n];
        var baseValues = new SeasonValues[n][];
        var effects = options.Effects ? new StationEffects[n] : null;
        var done = 0;
        var parallel = new ParallelOptions { MaxDegreeOfParallelism = options.MaxThreads ?? Environment.ProcessorCount };
        Parallel.For(0, n, parallel, i =>
        {
            var site = sites[i];
            var place = new PlaceInputs(site.ElevationM, site.CoastKm, site.Latitude, site.Windward);
            var stationSeed = Rng.Derive(seed, StationStream, (ulong)i);
            var truth = SnowSimulator.Simulate(weather, place, stationSeed);
            baseValues[i] = SeasonMetricsCalc.Compute(truth, weather);
            if (effects is not null)
            {
                effects[i] = StationEffects.Compute(weather, place, stationSeed);
            }

            (observed[i], faults[i]) = FaultInjector.Apply(truth, weather, plan, i, options.FirstSeason, new Rng(Rng.Derive(seed, FaultStream, (ulong)i)));
            var k = Interlocked.Increment(ref done);
            if (progress is not null && k % Math.Max(1, n / 50) == 0)
            {
                progress.Report(0.05 + (0.9 * k / n));
            }
        });

        // Listed elevations and names, in station order from one stream of their own.
        var nameRng = new Rng(Rng.Derive(seed, NameStream));
        var usedNames = new HashSet<string>(StringComparer.Ordinal);
        var width = Math.Max(3, n.ToString(System.Globalization.CultureInfo.InvariantCulture).Length);
        var stations = new ScenarioStation[n];
        var stationTruth = new StationTruth[n];
        for (var i = 0; i < n; i++)
        {
            var site = sites[i];
            double error;
            if (plan.Gross[i])
            {
                var size = nameRng.Uniform(FaultRates.GrossMinM, FaultRates.GrossMaxM);
                var sign = site.ElevationM < FaultRates.GrossMaxM || nameRng.NextDouble() < 0.5 ? 1 : -1;
                error = sign * size;
            }
            else
            {
                error = FaultRates.SurveySdM * nameRng.Normal();
            }

            var listed = Math.Max(0, Math.Round(site.ElevationM + error));
            var id = new StationId("MF" + (i + 1).ToString(System.Globalization.CultureInfo.InvariantCulture).PadLeft(width, '0'));
            var name = StationNames.For(site, nameRng, usedNames);
            var station = new Station(id, name, site.Longitude, site.Latitude, listed);
            stations[i] = new ScenarioStation(station, site.ElevationM, site.CoastKm, site.X, site.Y, site.Windward, faults[i] with
            {
                ListedElevationErrorM = listed - site.ElevationM,
                GrossElevationError = plan.Gross[i],
            });
            stationTruth[i] = TruthOf(id, baseValues[i], options.FirstSeason, weather.SeasonPhaseDays);
        }

        var regionEffects = effects is null ? null : RegionEffectsOf(effects, stations, stationTruth, baseValues, options.FirstSeason);
        progress?.Report(1.0);
        return new Scenario(
            options,
            dem,
            CoastlineLonLat(island),
            stations,
            new DailyRecords(weather.Dates[0], observed),
            new ScenarioTruth(stationTruth, regionEffects));
    }

    private static MultiPolygon CoastlineLonLat(Island island)
    {
        var factory = new GeometryFactory(new PrecisionModel(), 4326);
        Polygon Convert(Polygon p)
        {
            var ring = p.ExteriorRing.Coordinates.Select(c =>
            {
                var (lon, lat) = Utm25.ToGeographic(c.X, c.Y);
                return new Coordinate(Math.Round(lon, 6), Math.Round(lat, 6));
            }).ToArray();
            ring[^1] = ring[0].Copy();
            if (!NetTopologySuite.Algorithm.Orientation.IsCCW(ring))
            {
                Array.Reverse(ring);
            }

            return factory.CreatePolygon(ring);
        }

        return factory.CreateMultiPolygon([Convert(island.Main), .. island.Islets.Select(Convert)]);
    }

    private static StationTruth TruthOf(StationId id, SeasonValues[] values, int firstSeason, IReadOnlyList<double> phase)
    {
        var seasons = values.Select((v, s) => new SeasonTruth(firstSeason + s, v.Onset, v.Meltout, v.Duration, v.LongestCover, v.SnowDays, v.Peak, v.PeakDay, v.Centroid, phase[s])).ToArray();
        var onset = values.Where(v => v.Onset.HasValue).Select(v => (double)v.Onset!.Value).ToArray();
        var melt = values.Where(v => v.Meltout.HasValue).Select(v => (double)v.Meltout!.Value).ToArray();
        double[][] columns =
        [
            onset,
            melt,
            values.Select(v => (double)v.Duration).ToArray(),
            values.Select(v => (double)v.LongestCover).ToArray(),
            values.Select(v => (double)v.SnowDays).ToArray(),
            values.Select(v => (double)v.Peak).ToArray(),
            values.Where(v => v.Centroid.HasValue).Select(v => v.Centroid!.Value).ToArray(),
        ];
        var mean = SnowMetrics.FromArray(columns.Select(c => c.Length == 0 ? double.NaN : c.Average()).ToArray());
        var median = SnowMetrics.FromArray(columns.Select(Median).ToArray());
        return new StationTruth(id, mean, median, (double)onset.Length / values.Length, seasons);
    }

    private static double Median(double[] v)
    {
        if (v.Length == 0)
        {
            return double.NaN;
        }

        var s = v.Order().ToArray();
        return s.Length % 2 == 1 ? s[s.Length / 2] : 0.5 * (s[(s.Length / 2) - 1] + s[s.Length / 2]);
    }

    private static RegionEffects RegionEffectsOf(StationEffects[] effects, ScenarioStation[] stations, StationTruth[] truth, SeasonValues[][] values, int firstSeason)
    {
        SnowMetrics Average(Func<StationEffects, double[]> pick)
        {
            var r = new double[SnowMetrics.Names.Count];
            for (var m = 0; m < r.Length; m++)
            {
                var xs = effects.Select(pick).Select(a => a[m]).Where(v => !double.IsNaN(v)).ToArray();
                r[m] = xs.Length == 0 ? double.NaN : xs.Average();
            }

            return SnowMetrics.FromArray(r);
        }

        var timing = effects.Count(e => !double.IsNaN(e.PerKmElevation[0]));

        // Realised trend: per station, the least-squares slope of each season metric on the season year, × 10.
        var realised = new double[SnowMetrics.Names.Count];
        for (var m = 0; m < realised.Length; m++)
        {
            var slopes = new List<double>();
            foreach (var sv in values)
            {
                var pts = sv.Select((v, s) => (Year: (double)(firstSeason + s), Value: MetricOf(v, m))).Where(p => !double.IsNaN(p.Value)).ToArray();
                if (pts.Length < Math.Max(3, sv.Length / 2))
                {
                    continue;
                }

                var mx = pts.Average(p => p.Year);
                var my = pts.Average(p => p.Value);
                var sxy = pts.Sum(p => (p.Year - mx) * (p.Value - my));
                var sxx = pts.Sum(p => (p.Year - mx) * (p.Year - mx));
                slopes.Add(10 * sxy / sxx);
            }

            realised[m] = slopes.Count == 0 ? double.NaN : slopes.Average();
        }

        List<OlsEffect> OlsOf(Func<StationTruth, SnowMetrics> statistic)
        {
            var ols = new List<OlsEffect>();
            for (var m = 0; m < SnowMetrics.Names.Count; m++)
            {
                var rows = Enumerable.Range(0, stations.Length)
                    .Where(i => !double.IsNaN(statistic(truth[i]).ToArray()[m]) && ((m >= 2 && m != CentroidMetric) || truth[i].CoverSeasonFraction >= 0.5))
                    .ToArray();
                if (rows.Length < 8)
                {
                    continue;
                }

                var x = new double[rows.Length, 4];
                var y = new double[rows.Length];
                for (var r = 0; r < rows.Length; r++)
                {
                    var s = stations[rows[r]];
                    x[r, 0] = 1;
                    x[r, 1] = s.ElevationTrueM / 1000;
                    x[r, 2] = s.CoastKm / 10;
                    x[r, 3] = s.Station.Latitude;
                    y[r] = statistic(truth[rows[r]]).ToArray()[m];
                }

                var (b, r2) = LeastSquares.Fit(x, y);
                ols.Add(new OlsEffect(SnowMetrics.Names[m], rows.Length, b[0], b[1], b[2], b[3], r2));
            }

            return ols;
        }

        return new RegionEffects(
            stations.Length,
            timing,
            Average(e => e.PerKmElevation),
            Average(e => e.Per10KmCoast),
            Average(e => e.PerDegreeLatitude),
            Average(e => e.PerDecadeWarming),
            SnowMetrics.FromArray(realised),
            OlsOf(t => t.Mean),
            OlsOf(t => t.Median));
    }

    internal static double MetricOf(SeasonValues v, int m) => m switch
    {
        0 => v.Onset ?? double.NaN,
        1 => v.Meltout ?? double.NaN,
        2 => v.Duration,
        3 => v.LongestCover,
        4 => v.SnowDays,
        5 => v.Peak,
        _ => v.Centroid ?? double.NaN,
    };

    /// <summary>Index of centroid_day in <see cref="SnowMetrics.Names"/>: like onset and melt-out, defined only in seasons with snow.</summary>
    internal const int CentroidMetric = 6;
}

/// <summary>One station's central finite differences of its season-mean metrics (NaN where undefined), per unit named.</summary>
internal sealed record StationEffects(double[] PerKmElevation, double[] Per10KmCoast, double[] PerDegreeLatitude, double[] PerDecadeWarming)
{
    public static StationEffects Compute(RegionalWeather weather, PlaceInputs place, ulong seed)
    {
        double[] Diff(PlaceInputs lo, PlaceInputs hi, double offsetLo, double offsetHi, double stepUnits)
        {
            var a = SeasonMetricsCalc.Compute(SnowSimulator.Simulate(weather, lo, seed, offsetLo), weather);
            var b = SeasonMetricsCalc.Compute(SnowSimulator.Simulate(weather, hi, seed, offsetHi), weather);
            var result = new double[SnowMetrics.Names.Count];
            for (var m = 0; m < result.Length; m++)
            {
                var sum = 0.0;
                var count = 0;
                for (var s = 0; s < a.Length; s++)
                {
                    var va = MarrowfellScenario.MetricOf(a[s], m);
                    var vb = MarrowfellScenario.MetricOf(b[s], m);
                    if (double.IsNaN(va) || double.IsNaN(vb))
                    {
                        continue;
                    }

                    sum += vb - va;
                    count++;
                }

                // Timing metrics need cover in both runs in at least half the seasons.
                result[m] = count == 0 || ((m < 2 || m == MarrowfellScenario.CentroidMetric) && count * 2 < a.Length) ? double.NaN : sum / count / stepUnits;
            }

            return result;
        }

        var eLo = Math.Max(0, place.ElevationM - MarrowfellScenario.ElevationStepM);
        var eHi = eLo + (2 * MarrowfellScenario.ElevationStepM);
        var cLo = Math.Max(0, place.CoastKm - MarrowfellScenario.CoastStepKm);
        var cHi = cLo + (2 * MarrowfellScenario.CoastStepKm);
        var lat = MarrowfellScenario.LatitudeStepDeg;
        return new StationEffects(
            Diff(place with { ElevationM = eLo }, place with { ElevationM = eHi }, 0, 0, (eHi - eLo) / 1000),
            Diff(place with { CoastKm = cLo }, place with { CoastKm = cHi }, 0, 0, (cHi - cLo) / 10),
            Diff(place with { Latitude = place.Latitude - lat }, place with { Latitude = place.Latitude + lat }, 0, 0, 2 * lat),
            Diff(place, place, -MarrowfellScenario.WarmingStepC, MarrowfellScenario.WarmingStepC, 2 * MarrowfellScenario.WarmingStepC / Climate.WarmingCPerDecade));
    }
}

using NetTopologySuite.Algorithm.Locate;
using NetTopologySuite.Geometries;
using NetTopologySuite.Operation.Distance;
using Spatial.Core;

namespace Spatial.Scenario.Internal;

/// <summary>A station site chosen by <see cref="StationPlacer"/>.</summary>
internal sealed record Site(double X, double Y, double Longitude, double Latitude, double ElevationM, double CoastKm, double Windward);

/// <summary>
/// Places stations on land so that they spread over elevation and coast distance: station k takes elevation band
/// k mod B of 100 m bands (in a shuffled order), then a coast-distance band of 2.5 km chosen uniformly among those the
/// elevation band meets, then a random point in a random cell of both bands, at least a minimum spacing from the
/// stations already placed.
/// </summary>
internal static class StationPlacer
{
    private const double ElevationBandM = 100;
    private const double CoastBandKm = 2.5;
    private const double HighestStationM = 2200;

    public static IReadOnlyList<Site> Place(Island island, RasterGrid dem, float[] coastGridKm, int count, Rng rng)
    {
        var bands = (int)(HighestStationM / ElevationBandM);
        var cells = new Dictionary<(int E, int C), List<int>>();
        var values = dem.Values;
        for (var i = 0; i < values.Length; i++)
        {
            if (dem.IsNoData(values[i]) || values[i] > HighestStationM + 50)
            {
                continue;
            }

            var key = (Math.Min(bands - 1, (int)(values[i] / ElevationBandM)), (int)(coastGridKm[i] / CoastBandKm));
            if (!cells.TryGetValue(key, out var list))
            {
                cells[key] = list = [];
            }

            list.Add(i);
        }

        var coastBandsOf = new List<int>[bands];
        for (var e = 0; e < bands; e++)
        {
            coastBandsOf[e] = cells.Keys.Where(k => k.E == e && cells[k].Count >= 3).Select(k => k.C).Order().ToList();
        }

        var usable = Enumerable.Range(0, bands).Where(e => coastBandsOf[e].Count > 0).ToArray();
        var order = new List<int>();
        while (order.Count < count)
        {
            var perm = rng.Permutation(usable.Length);
            order.AddRange(perm.Select(p => usable[p]));
        }

        var landArea = values.ToArray().Count(v => !dem.IsNoData(v)) * DemBuilder.CellM * DemBuilder.CellM;
        var spacing = Math.Min(1500, 0.5 * Math.Sqrt(landArea / count));
        var locator = island.LandLocator();
        var coast = new IndexedFacetDistance(island.Land.Boundary);
        var sites = new List<Site>(count);
        var grid = new Dictionary<(long, long), List<int>>();
        for (var k = 0; k < count; k++)
        {
            var band = order[k];
            Site? site = null;
            for (var attempt = 0; site is null; attempt++)
            {
                var bandList = coastBandsOf[band];
                var cb = bandList[rng.NextInt(bandList.Count)];
                var list = cells[(band, cb)];
                var cell = list[rng.NextInt(list.Count)];
                var (x, y) = dem.Transform.ToMap((cell % dem.Width) + rng.NextDouble(), (cell / dem.Width) + rng.NextDouble());
                var relaxed = attempt > 400 ? spacing / 4 : spacing;
                if (locator.Locate(new Coordinate(x, y)) != Location.Interior || TooClose(grid, sites, x, y, relaxed, spacing))
                {
                    continue;
                }

                var elevation = Bilinear(dem, x, y);
                var coastKm = coast.Distance(new Point(x, y)) / 1000;
                var (lon, lat) = Utm25.ToGeographic(x, y);
                site = new Site(x, y, lon, lat, elevation, coastKm, Island.WindwardIndex(x, y));
            }

            sites.Add(site);
            var key = ((long)Math.Floor(site.X / spacing), (long)Math.Floor(site.Y / spacing));
            if (!grid.TryGetValue(key, out var bucket))
            {
                grid[key] = bucket = [];
            }

            bucket.Add(sites.Count - 1);
        }

        return sites;
    }

    /// <summary>
    /// The DEM at map point (x, y), bilinear between the four surrounding cell centres; next to the sea (a neighbour
    /// without data) or at the edge, the containing cell's value. Metres.
    /// </summary>
    public static double Bilinear(RasterGrid dem, double x, double y)
    {
        var (pc, pr) = dem.Transform.ToPixel(x, y);
        var c0 = (int)Math.Floor(pc - 0.5);
        var r0 = (int)Math.Floor(pr - 0.5);
        var fx = pc - 0.5 - c0;
        var fy = pr - 0.5 - r0;
        if (c0 >= 0 && r0 >= 0 && c0 + 1 < dem.Width && r0 + 1 < dem.Height)
        {
            var a = dem[c0, r0];
            var b = dem[c0 + 1, r0];
            var c = dem[c0, r0 + 1];
            var d = dem[c0 + 1, r0 + 1];
            if (!float.IsNaN(a) && !float.IsNaN(b) && !float.IsNaN(c) && !float.IsNaN(d))
            {
                return ((1 - fy) * (((1 - fx) * a) + (fx * b))) + (fy * (((1 - fx) * c) + (fx * d)));
            }
        }

        var cc = Math.Clamp((int)Math.Floor(pc), 0, dem.Width - 1);
        var rr = Math.Clamp((int)Math.Floor(pr), 0, dem.Height - 1);
        var v = dem[cc, rr];
        return float.IsNaN(v) ? 0 : v;
    }

    private static bool TooClose(Dictionary<(long, long), List<int>> grid, List<Site> sites, double x, double y, double min, double bucketSize)
    {
        var bx = (long)Math.Floor(x / bucketSize);
        var by = (long)Math.Floor(y / bucketSize);
        for (var dx = -1; dx <= 1; dx++)
        {
            for (var dy = -1; dy <= 1; dy++)
            {
                if (!grid.TryGetValue((bx + dx, by + dy), out var bucket))
                {
                    continue;
                }

                foreach (var i in bucket)
                {
                    var s = sites[i];
                    if (((s.X - x) * (s.X - x)) + ((s.Y - y) * (s.Y - y)) < min * min)
                    {
                        return true;
                    }
                }
            }
        }

        return false;
    }
}

/// <summary>Invented station names from syllables, with a word for the site (height, shore, side of the ridge).</summary>
internal static class StationNames
{
    private static readonly string[] Heads = ["Ard", "Bal", "Car", "Dun", "Esk", "Fal", "Gar", "Hol", "Ivar", "Kel", "Lan", "Mor", "Nar", "Pen", "Quen", "Ros", "Skel", "Tor", "Ul", "Vel", "Wen", "Yar", "Brae", "Cul", "Drum", "Fen", "Glas", "Hask"];
    private static readonly string[] Middles = ["", "a", "e", "i", "o", "ow", "en", "ar", "il"];
    private static readonly string[] Tails = ["by", "dale", "ford", "holm", "ness", "stead", "wick", "thwaite", "haven", "moor", "garth", "ton", "mere", "scar", "beck", "shaw", "rigg"];

    public static string For(Site site, Rng rng, HashSet<string> used)
    {
        var word = site.ElevationM switch
        {
            >= 1700 => "Summit",
            >= 1200 => "Fell",
            >= 700 => "Heights",
            _ when site.CoastKm < 1.5 => "Shore",
            _ when site.Windward < -0.3 => "Leeside",
            _ => "Vale",
        };
        for (var attempt = 0; ; attempt++)
        {
            var stem = Heads[rng.NextInt(Heads.Length)] + Middles[rng.NextInt(Middles.Length)] + Tails[rng.NextInt(Tails.Length)];
            var name = attempt < 50 ? $"{stem} {word}" : $"{stem} {word} {attempt}";
            if (used.Add(name))
            {
                return name;
            }
        }
    }
}

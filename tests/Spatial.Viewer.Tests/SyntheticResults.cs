using System.Buffers.Binary;
using System.Globalization;
using System.IO.Compression;
using System.Text;

namespace Spatial.Viewer.Tests;

/// <summary>
/// Writes an invented results folder for the invented island Marrowfell, following the file contracts of
/// DEVELOPERS.md (station_list.csv, stations.csv, seasons.csv, basis.json, covariates.csv, regression/fitted.csv,
/// regression/local.csv, layers/coastline.geojson, layers/hillshade.png+json, layers/predicted_*.png+json).
/// Invented data, for plumbing only: the numbers are seeded noise shaped like the real thing, and the
/// per-station summaries are computed from the invented seasons so that the two files agree.
/// Deterministic for a given seed and size. Also used (as a linked file) by the viewer benchmark.
/// </summary>
public static class SyntheticResults
{
    /// <summary>Components in the invented basis.</summary>
    public const int K = 3;

    /// <summary>Centre of the invented island, WGS 84 degrees (open North Atlantic water).</summary>
    public const double CentreLon = -35.0, CentreLat = 58.0;

    /// <summary>Half extent of the island, degrees of longitude and latitude.</summary>
    public const double HalfLon = 0.9, HalfLat = 0.45;

    private static readonly string[] Labels = ["amount", "timing", "duration"];
    private static readonly string[] Metrics = ["onset_day", "meltout_day", "longest_cover_days", "snow_days", "peak_depth_mm", "peak_day", "centroid_day"];

    /// <summary>Station ids of the small fixture with special roles.</summary>
    public const string NoSeasonsStation = "MF-NOSEASONS", MarkupNameStation = "MF-003";

    /// <summary>Writes the folder. <paramref name="stations"/> ≥ 4; seasons from <paramref name="firstSeason"/> on.</summary>
    public static void Write(string folder, int stations, int seasons, int seed, int firstSeason = 2000, bool layers = true)
    {
        var rng = new Random(seed);
        Directory.CreateDirectory(folder);
        var ids = new string[stations];
        var lon = new double[stations];
        var lat = new double[stations];
        var elev = new double[stations];
        for (var i = 0; i < stations; i++)
        {
            ids[i] = i == stations - 1 ? NoSeasonsStation : $"MF-{i + 1:D3}";

            // Inside the island's ellipse, uniform by rejection.
            double u, v;
            do
            {
                u = rng.NextDouble() * 2 - 1;
                v = rng.NextDouble() * 2 - 1;
            }
            while (u * u + v * v > 0.8);
            lon[i] = Math.Round(CentreLon + u * HalfLon, 5);
            lat[i] = Math.Round(CentreLat + v * HalfLat, 5);
            elev[i] = Math.Round(Dome(lon[i], lat[i]) + rng.NextDouble() * 20, 1);
        }

        string Name(int i) => i switch
        {
            0 => "Fell Top, North",
            1 => "Tarn \"Upper\" Hut",
            2 => "<b>Skerry</b> Point",
            _ when ids[i] == NoSeasonsStation => "Unread Gauge",
            _ => $"Station {i + 1}",
        };

        Csv(Path.Combine(folder, "station_list.csv"), ["station", "name", "longitude", "latitude", "elevation_m"], Enumerable.Range(0, stations).Select(i => new object?[] { ids[i], Name(i), lon[i], lat[i], elev[i] }));

        // Basis: a mean season curve and K smooth orthonormal-ish shapes (amount, timing, duration).
        var mean = new double[365];
        var comps = new double[K][];
        for (var d = 0; d < 365; d++)
        {
            mean[d] = Math.Round(Math.Max(0, 900 * Math.Sin(Math.PI * Math.Clamp((d - 50) / 230.0, 0, 1))), 3);
        }

        for (var k = 0; k < K; k++)
        {
            comps[k] = new double[365];
            var norm = 0.0;
            for (var d = 0; d < 365; d++)
            {
                var t = Math.Clamp((d - 50) / 230.0, 0, 1);
                comps[k][d] = k switch
                {
                    0 => Math.Sin(Math.PI * t),
                    1 => -Math.Sin(2 * Math.PI * t),
                    _ => t is > 0 and < 1 ? Math.Sin(3 * Math.PI * t) * 0.8 + 0.2 : 0,
                };
                norm += comps[k][d] * comps[k][d];
            }

            norm = Math.Sqrt(norm);
            for (var d = 0; d < 365; d++)
            {
                comps[k][d] = Math.Round(comps[k][d] / norm, 6);
            }
        }

        var basis = new StringBuilder();
        basis.Append("{\"format_version\":1,\"season_start\":\"09-01\",\"units\":\"mm\",\"mean\":").Append(Array(mean)).Append(",\"components\":[");
        basis.Append(string.Join(",", comps.Select(Array))).Append("],\"eigenvalues\":[4.1e6,1.3e6,4.0e5],\"variance_fraction\":[0.62,0.2,0.06],\"cumulative_fraction\":[0.62,0.82,0.88],\"north_error\":[1.0e5,3.0e4,1.0e4]");
        basis.Append(",\"labels\":[\"amount\",\"timing\",\"duration\"],\"training\":{},\"provenance\":{\"note\":\"invented for viewer tests\"}}\n");
        File.WriteAllText(Path.Combine(folder, "basis.json"), basis.ToString());

        // Seasons and their per-station summaries.
        var seasonHeader = new List<string> { "station", "season", "observed_days" };
        seasonHeader.AddRange(Enumerable.Range(1, K).Select(k => $"c{k}"));
        seasonHeader.AddRange(Enumerable.Range(0, K + 1).Select(k => $"residual_{k}"));
        seasonHeader.AddRange(Metrics);
        seasonHeader.AddRange(["below_min_days", "modelled_bare_days"]); // flags the fit writes after the metrics
        var seasonRows = new List<object?[]>();
        var names = Enumerable.Range(1, K).Select(k => $"c{k}").Concat(Metrics).ToArray();
        var summaryHeader = new List<string> { "station", "seasons" };
        foreach (var n in names)
        {
            summaryHeader.AddRange([$"median_{n}", $"iqr_{n}", $"mk_s_{n}", $"mk_z_{n}", $"mk_p_{n}", $"sen_per_decade_{n}"]);
        }

        var summaryRows = new List<object?[]>();
        for (var i = 0; i < stations; i++)
        {
            var n = ids[i] == NoSeasonsStation ? 0 : seasons;
            var perName = names.Select(_ => new List<(int Year, double Value)>()).ToArray();
            var wet = (elev[i] - 300) * 2.0;
            for (var s = 0; s < n; s++)
            {
                var year = firstSeason + s;
                var observed = rng.NextDouble() < 0.15 ? rng.Next(60, 200) : rng.Next(300, 366);
                var c = new double[K];
                c[0] = Math.Round(wet + rng.NextDouble() * 1500 - 750 - 15 * s, 3);
                c[1] = Math.Round((rng.NextDouble() - 0.5) * 900, 3);
                c[2] = Math.Round((rng.NextDouble() - 0.5) * 500, 3);
                var misfit = i == 4 && s == 1 ? 1.4 : 1.0; // one broken-looking season
                var res = new double[K + 1];
                res[0] = 1;
                var r = 1.0;
                for (var k = 1; k <= K; k++)
                {
                    r *= 0.35 + rng.NextDouble() * 0.4;
                    res[k] = Math.Round(Math.Min(1, r * misfit), 4);
                }

                if (misfit > 1)
                {
                    res[K] = 0.97;
                }

                var onset = 40 + rng.Next(0, 40);
                var melt = 230 + rng.Next(0, 60);
                var m = new double?[] { onset, melt, melt - onset - rng.Next(0, 15), melt - onset - rng.Next(0, 25), Math.Round(400 + Math.Max(0, wet) + rng.NextDouble() * 600, 1), onset + rng.Next(60, 140), (onset + melt) / 2 };
                if (rng.NextDouble() < 0.05)
                {
                    m[0] = null; // an unknown onset
                }

                var row = new List<object?> { ids[i], year, observed };
                row.AddRange(c.Select(x => (object?)x));
                row.AddRange(res.Select(x => (object?)x));
                row.AddRange(m.Select(x => (object?)x));
                row.Add(observed < 250 ? "true" : "false");
                row.Add(0);
                seasonRows.Add([.. row]);
                for (var j = 0; j < K; j++)
                {
                    perName[j].Add((year, c[j]));
                }

                for (var j = 0; j < Metrics.Length; j++)
                {
                    if (m[j] is { } value)
                    {
                        perName[K + j].Add((year, value));
                    }
                }
            }

            var summary = new List<object?> { ids[i], n };
            foreach (var list in perName)
            {
                summary.AddRange(Summary(list));
            }

            summaryRows.Add([.. summary]);
        }

        Csv(Path.Combine(folder, "seasons.csv"), [.. seasonHeader], seasonRows);
        Csv(Path.Combine(folder, "stations.csv"), [.. summaryHeader], summaryRows);

        // Covariates (the last station has none).
        var covRows = new List<object?[]>();
        var coast = new double[stations];
        for (var i = 0; i < stations - 1; i++)
        {
            var dem = Math.Round(Dome(lon[i], lat[i]), 1);
            var u = (lon[i] - CentreLon) / HalfLon;
            var v = (lat[i] - CentreLat) / HalfLat;
            coast[i] = Math.Round(Math.Max(0.2, (1 - Math.Sqrt(u * u + v * v)) * 45), 3);
            var aspect = Math.Round((Math.Atan2(u, v) * 180 / Math.PI + 360) % 360, 2);
            covRows.Add([ids[i], lon[i], lat[i], elev[i], dem, Math.Round(elev[i] - dem, 1), Math.Abs(elev[i] - dem) > 15 ? "check" : "ok", Math.Round(2 + rng.NextDouble() * 20, 2), aspect,
                Math.Round(Math.Cos(aspect * Math.PI / 180), 4), Math.Round(Math.Sin(aspect * Math.PI / 180), 4), Math.Round(20 + rng.NextDouble() * 200, 1), Math.Round(100 + rng.NextDouble() * 500, 1), coast[i], Math.Round(rng.NextDouble() * 360, 1)]);
        }

        Csv(Path.Combine(folder, "covariates.csv"), ["station", "longitude", "latitude", "elevation_listed_m", "elevation_dem_m", "elevation_diff_m", "elevation_flag", "slope_deg", "aspect_deg", "northness", "eastness", "relief_1km_m", "relief_5km_m", "coast_km", "coast_azimuth_deg"], covRows);

        // Regression results for the median of component 1 and the median onset day.
        Directory.CreateDirectory(Path.Combine(folder, "regression"));
        var fitted = new List<object?[]>();
        var local = new List<object?[]>();
        foreach (var response in new[] { "median_c1", "median_onset_day" })
        {
            for (var i = 0; i < stations - 1; i++)
            {
                var observed = Math.Round(response == "median_c1" ? (elev[i] - 300) * 2 + rng.NextDouble() * 300 : 60 - elev[i] / 40 + rng.NextDouble() * 10, 3);
                var residual = Math.Round((rng.NextDouble() - 0.5) * (response == "median_c1" ? 400 : 12), 3);
                fitted.Add([ids[i], response, observed, Math.Round(observed - residual, 3), residual, Math.Round(0.01 + rng.NextDouble() * 0.2, 4), Math.Round(rng.NextDouble() * 0.1, 4)]);
                local.Add([ids[i], response, Math.Round(0.3 + rng.NextDouble() * 0.6, 4), Math.Round(rng.NextDouble() * 100 - 50, 3), Math.Round(5 + rng.NextDouble() * 5, 3),
                    Math.Round(1 + (lon[i] - CentreLon) * 2 + rng.NextDouble() * 0.2, 4), Math.Round(0.1 + rng.NextDouble() * 0.1, 4), Math.Round(-3 + (lat[i] - CentreLat) * 6, 4), Math.Round(0.5 + rng.NextDouble(), 4)]);
            }
        }

        Csv(Path.Combine(folder, "regression", "fitted.csv"), ["station", "response", "observed", "fitted", "residual", "leverage", "cooks_distance"], fitted);
        Csv(Path.Combine(folder, "regression", "local.csv"), ["station", "response", "local_r2", "local_intercept", "local_se_intercept", "local_elevation_dem_m", "local_se_elevation_dem_m", "local_coast_km", "local_se_coast_km"], local);

        if (!layers)
        {
            return;
        }

        // Layers: the island's coast as a WGS 84 polygon (with a lake as a hole), a hillshade and a predicted surface.
        var layerDir = Path.Combine(folder, "layers");
        Directory.CreateDirectory(layerDir);
        var outer = new List<string>();
        for (var a = 0; a <= 72; a++)
        {
            var t = a % 72 * 2 * Math.PI / 72;
            var wobble = 1 + 0.08 * Math.Sin(5 * t) + 0.04 * Math.Cos(3 * t);
            outer.Add(Point(CentreLon + Math.Cos(t) * HalfLon * 1.05 * wobble, CentreLat + Math.Sin(t) * HalfLat * 1.05 * wobble));
        }

        var lake = new List<string>();
        for (var a = 0; a <= 12; a++)
        {
            var t = -(a % 12) * 2 * Math.PI / 12;
            lake.Add(Point(CentreLon + 0.25 + Math.Cos(t) * 0.06, CentreLat + 0.1 + Math.Sin(t) * 0.03));
        }

        File.WriteAllText(Path.Combine(layerDir, "coastline.geojson"), "{\"type\":\"FeatureCollection\",\"features\":[{\"type\":\"Feature\",\"properties\":{\"name\":\"Marrowfell\"},\"geometry\":{\"type\":\"Polygon\",\"coordinates\":[[" + string.Join(",", outer) + "],[" + string.Join(",", lake) + "]]}}]}\n");
        double west = CentreLon - HalfLon * 1.3, east = CentreLon + HalfLon * 1.3, south = CentreLat - HalfLat * 1.3, north = CentreLat + HalfLat * 1.3;
        var bounds = Invariant($"\"west\":{west:R},\"south\":{south:R},\"east\":{east:R},\"north\":{north:R}");
        const int w = 240, h = 120;
        var shade = new byte[w * h * 2];
        var pred = new byte[w * h * 2];
        for (var y = 0; y < h; y++)
        {
            for (var x = 0; x < w; x++)
            {
                var lo = west + (x + 0.5) / w * (east - west);
                var la = north - (y + 0.5) / h * (north - south);
                var z = Dome(lo, la);
                var dzdx = Dome(lo + 0.01, la) - Dome(lo - 0.01, la);
                var dzdy = Dome(lo, la + 0.01) - Dome(lo, la - 0.01);
                var light = Math.Clamp(0.75 + (-dzdx + dzdy) / 400, 0, 1);
                var land = z > 0;
                shade[(y * w + x) * 2] = (byte)(light * 255);
                shade[(y * w + x) * 2 + 1] = (byte)(land ? 150 : 0);
                pred[(y * w + x) * 2] = (byte)Math.Clamp(255 - z / 4, 0, 255);
                pred[(y * w + x) * 2 + 1] = (byte)(land ? 200 : 0);
            }
        }

        File.WriteAllBytes(Path.Combine(layerDir, "hillshade.png"), GreyAlphaPng(w, h, shade));
        File.WriteAllText(Path.Combine(layerDir, "hillshade.json"), "{" + bounds + "}\n");
        File.WriteAllBytes(Path.Combine(layerDir, "predicted_median_c1.png"), GreyAlphaPng(w, h, pred));
        File.WriteAllText(Path.Combine(layerDir, "predicted_median_c1.json"), "{" + bounds + ",\"min\":-600,\"max\":1400,\"unit\":\"mm (coefficient)\"}\n");
    }

    /// <summary>Invented terrain: a dome peaking at 1000 m, 0 at the coast ellipse.</summary>
    public static double Dome(double lon, double lat)
    {
        var u = (lon - CentreLon) / HalfLon;
        var v = (lat - CentreLat) / HalfLat;
        var r2 = u * u + v * v;
        return r2 >= 1 ? 0 : 1000 * (1 - r2) * (1 - 0.3 * Math.Sin(4 * u) * Math.Cos(3 * v));
    }

    private static IEnumerable<object?> Summary(List<(int Year, double Value)> list)
    {
        var v = list.Select(p => p.Value).OrderBy(x => x).ToArray();
        if (v.Length == 0)
        {
            return [null, null, null, null, null, null];
        }

        double Q(double p)
        {
            var pos = p * (v.Length - 1);
            var lo = (int)Math.Floor(pos);
            var hi = Math.Min(v.Length - 1, lo + 1);
            return v[lo] + (pos - lo) * (v[hi] - v[lo]);
        }

        // Mann–Kendall S and its normal z (no ties correction); Sen's slope (median pairwise slope) per decade.
        var s = 0;
        var slopes = new List<double>();
        for (var a = 0; a < list.Count; a++)
        {
            for (var b = a + 1; b < list.Count; b++)
            {
                s += Math.Sign(list[b].Value - list[a].Value);
                slopes.Add((list[b].Value - list[a].Value) / (list[b].Year - list[a].Year));
            }
        }

        var n = list.Count;
        var variance = n * (n - 1) * (2 * n + 5) / 18.0;
        var z = variance > 0 ? (s - Math.Sign(s)) / Math.Sqrt(variance) : double.NaN;
        var p = double.IsNaN(z) ? double.NaN : Erfc(Math.Abs(z) / Math.Sqrt(2));
        slopes.Sort();
        var sen = slopes.Count == 0 ? double.NaN : slopes.Count % 2 == 1 ? slopes[slopes.Count / 2] : 0.5 * (slopes[slopes.Count / 2 - 1] + slopes[slopes.Count / 2]);
        return [Q(0.5), Q(0.75) - Q(0.25), s, z, p, sen * 10];
    }

    // Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7): good enough for invented p-values.
    private static double Erfc(double x)
    {
        var t = 1 / (1 + 0.3275911 * x);
        var poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
        return poly * Math.Exp(-x * x);
    }

    private static string Point(double lon, double lat) => Invariant($"[{Math.Round(lon, 5):R},{Math.Round(lat, 5):R}]");

    private static string Array(double[] v) => "[" + string.Join(",", v.Select(x => x.ToString("R", CultureInfo.InvariantCulture))) + "]";

    private static string Invariant(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);

    private static void Csv(string path, string[] header, IEnumerable<object?[]> rows)
    {
        var sb = new StringBuilder();
        sb.Append(string.Join(",", header)).Append('\n');
        foreach (var row in rows)
        {
            sb.Append(string.Join(",", row.Select(Field))).Append('\n');
        }

        File.WriteAllText(path, sb.ToString());
    }

    private static string Field(object? value) => value switch
    {
        null => string.Empty,
        double d when double.IsNaN(d) => string.Empty,
        double d => d.ToString("R", CultureInfo.InvariantCulture),
        int i => i.ToString(CultureInfo.InvariantCulture),
        string s when s.IndexOfAny([',', '"', '\n', '\r']) >= 0 => "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"",
        string s => s,
        _ => Convert.ToString(value, CultureInfo.InvariantCulture) ?? string.Empty,
    };

    /// <summary>An 8-bit grey + alpha PNG (ISO/IEC 15948: signature, IHDR, one zlib IDAT, IEND; filter 0 per row).</summary>
    internal static byte[] GreyAlphaPng(int width, int height, byte[] greyAlpha)
    {
        using var ms = new MemoryStream();
        ms.Write([0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A]);
        var ihdr = new byte[13];
        BinaryPrimitives.WriteInt32BigEndian(ihdr, width);
        BinaryPrimitives.WriteInt32BigEndian(ihdr.AsSpan(4), height);
        ihdr[8] = 8; // bit depth
        ihdr[9] = 4; // colour type: grey + alpha
        Chunk(ms, "IHDR", ihdr);
        using var raw = new MemoryStream();
        using (var z = new ZLibStream(raw, CompressionLevel.Optimal, leaveOpen: true))
        {
            for (var y = 0; y < height; y++)
            {
                z.WriteByte(0);
                z.Write(greyAlpha, y * width * 2, width * 2);
            }
        }

        Chunk(ms, "IDAT", raw.ToArray());
        Chunk(ms, "IEND", []);
        return ms.ToArray();
    }

    private static void Chunk(Stream s, string type, byte[] data)
    {
        Span<byte> len = stackalloc byte[4];
        BinaryPrimitives.WriteInt32BigEndian(len, data.Length);
        s.Write(len);
        var typeBytes = Encoding.ASCII.GetBytes(type);
        s.Write(typeBytes);
        s.Write(data);
        BinaryPrimitives.WriteUInt32BigEndian(len, Crc32([.. typeBytes, .. data]));
        s.Write(len);
    }

    // CRC-32 as PNG defines it (ISO 3309 polynomial 0xEDB88320, reflected).
    private static uint Crc32(byte[] data)
    {
        var crc = 0xFFFFFFFFu;
        foreach (var b in data)
        {
            crc ^= b;
            for (var k = 0; k < 8; k++)
            {
                crc = (crc & 1) != 0 ? (crc >> 1) ^ 0xEDB88320u : crc >> 1;
            }
        }

        return ~crc;
    }
}

using System.Globalization;
using System.Text;
using System.Text.Json;
using NetTopologySuite.Geometries;
using Spatial.Core.IO;
using Spatial.Scenario.Internal;
using Spatial.Terrain.Rasters;

namespace Spatial.Scenario;

/// <summary>Writes a <see cref="Scenario"/> into a folder: the files described in gis-samples/README.md.</summary>
public static class ScenarioFiles
{
    /// <summary>Land polygons, GeoJSON (RFC 7946, WGS 84).</summary>
    public const string Coastline = "coastline.geojson";

    /// <summary>Heights, float32 GeoTIFF, UTM zone 25N, no data at sea.</summary>
    public const string Dem = "dem.tif";

    /// <summary>Station list (CSV: station, name, longitude, latitude, elevation_m).</summary>
    public const string StationList = "stations.csv";

    /// <summary>Daily records (gzip CSV: station, date, depth in whole mm; days not reported are absent).</summary>
    public const string Records = "records.csv.gz";

    /// <summary>Ground truth (JSON).</summary>
    public const string Truth = "truth.json";

    /// <summary>Per station-season noise-free metrics (CSV).</summary>
    public const string TruthSeasons = "truth_seasons.csv";

    // zlib level 3: faster than the default level 6 on these records for a file about 2 % larger (default samples: 7.67 MB vs 7.49 MB).
    private const int RecordsCompressionLevel = 3;

    /// <summary>
    /// Writes every file of <paramref name="scenario"/> into <paramref name="folder"/> (created when needed), each
    /// atomically. Returns the paths written, in a fixed order. The same scenario gives the same bytes.
    /// </summary>
    public static IReadOnlyList<string> Write(string folder, Scenario scenario)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        ArgumentNullException.ThrowIfNull(scenario);
        Directory.CreateDirectory(folder);
        var paths = new List<string>();
        string P(string name)
        {
            var p = Path.Combine(folder, name);
            paths.Add(p);
            return p;
        }

        AtomicFile.WriteText(P(Coastline), w => WriteCoastline(w, scenario.Coastline));
        GeoTiffWriter.Write(P(Dem), scenario.Dem);
        AtomicFile.WriteText(P(StationList), w => WriteStations(w, scenario));
        AtomicFile.Write(P(Records), s => WriteRecords(s, scenario));
        AtomicFile.Write(P(Truth), s => TruthJson.Write(s, scenario));
        AtomicFile.WriteText(P(TruthSeasons), w => WriteTruthSeasons(w, scenario));
        return paths;
    }

    private static string F(double v, int decimals) => v.ToString("F" + decimals.ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);

    private static void WriteCoastline(TextWriter w, MultiPolygon land)
    {
        w.Write("{\"type\":\"FeatureCollection\",\"name\":\"Marrowfell coastline (invented)\",\"features\":[\n");
        for (var i = 0; i < land.NumGeometries; i++)
        {
            var p = (Polygon)land.GetGeometryN(i);
            var name = i == 0 ? "Marrowfell" : $"Marrowfell islet {i}";
            var kind = i == 0 ? "main island" : "islet";
            w.Write($"{{\"type\":\"Feature\",\"properties\":{{\"name\":\"{name}\",\"kind\":\"{kind}\"}},\"geometry\":{{\"type\":\"Polygon\",\"coordinates\":[");
            for (var r = 0; r < 1 + p.NumInteriorRings; r++)
            {
                var ring = r == 0 ? p.ExteriorRing : p.GetInteriorRingN(r - 1);
                w.Write(r == 0 ? "[" : ",[");
                var cs = ring.Coordinates;
                for (var k = 0; k < cs.Length; k++)
                {
                    w.Write(k == 0 ? "[" : ",[");
                    w.Write(F(cs[k].X, 6));
                    w.Write(',');
                    w.Write(F(cs[k].Y, 6));
                    w.Write(']');
                }

                w.Write(']');
            }

            w.Write(i + 1 < land.NumGeometries ? "]}},\n" : "]}}\n");
        }

        w.Write("]}\n");
    }

    private static void WriteStations(TextWriter w, Scenario scenario)
    {
        w.Write("station,name,longitude,latitude,elevation_m\n");
        foreach (var s in scenario.Stations)
        {
            var st = s.Station;
            w.Write($"{st.Id.Value},{st.Name},{F(st.Longitude, 6)},{F(st.Latitude, 6)},{F(st.ElevationListedM ?? double.NaN, 0)}\n");
        }
    }

    private static void WriteRecords(Stream stream, Scenario scenario)
    {
        var days = scenario.Records.Days;
        var dateBytes = new byte[days][];
        for (var t = 0; t < days; t++)
        {
            dateBytes[t] = Encoding.ASCII.GetBytes(scenario.Records.FirstDate.AddDays(t).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture));
        }

        using var gz = new GzipWriter(stream, RecordsCompressionLevel);
        var buffer = new byte[1 << 16];
        var used = 0;
        void Flush()
        {
            gz.Write(buffer.AsSpan(0, used));
            used = 0;
        }

        void Put(ReadOnlySpan<byte> bytes)
        {
            if (used + bytes.Length > buffer.Length)
            {
                Flush();
            }

            bytes.CopyTo(buffer.AsSpan(used));
            used += bytes.Length;
        }

        Put("station,date,depth\n"u8);
        Span<byte> digits = stackalloc byte[8];
        for (var i = 0; i < scenario.Stations.Count; i++)
        {
            var id = Encoding.ASCII.GetBytes(scenario.Stations[i].Station.Id.Value + ",");
            var series = scenario.Records.DepthMm[i];
            for (var t = 0; t < days; t++)
            {
                var v = series[t];
                if (v < 0)
                {
                    continue;
                }

                Put(id);
                Put(dateBytes[t]);
                var k = digits.Length;
                digits[--k] = (byte)'\n';
                var x = (int)v;
                do
                {
                    digits[--k] = (byte)('0' + (x % 10));
                    x /= 10;
                }
                while (x > 0);

                digits[--k] = (byte)',';
                Put(digits[k..]);
            }
        }

        Flush();
        gz.Finish();
    }

    private static void WriteTruthSeasons(TextWriter w, Scenario scenario)
    {
        w.Write("station,season,onset_day,meltout_day,duration_days,longest_cover_days,snow_days,peak_depth_mm,peak_day,centroid_day,phase_days\n");
        static string O(int? v) => v?.ToString(CultureInfo.InvariantCulture) ?? string.Empty;
        static string C(double? v) => v?.ToString("F3", CultureInfo.InvariantCulture) ?? string.Empty;
        foreach (var st in scenario.Truth.Stations)
        {
            foreach (var s in st.Seasons)
            {
                w.Write(string.Create(CultureInfo.InvariantCulture, $"{st.Station.Value},{s.Season},{O(s.OnsetDay)},{O(s.MeltoutDay)},{s.DurationDays},{s.LongestCoverDays},{s.SnowDays},{s.PeakDepthMm},{O(s.PeakDay)},{C(s.CentroidDay)},{s.PhaseDays.ToString("F3", CultureInfo.InvariantCulture)}\n"));
            }
        }
    }
}

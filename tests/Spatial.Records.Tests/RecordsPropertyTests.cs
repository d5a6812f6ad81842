using System.Globalization;
using System.IO.Compression;
using System.Text;
using CsCheck;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Records.Tests;

/// <summary>Property tests with CsCheck generators driven by fixed seeds (deterministic runs).</summary>
public sealed class RecordsPropertyTests : IDisposable
{
    private static readonly string[] Ids = ["A", "B2", "st 3", "x,y", "q\"uote", "Ünï"];
    private readonly string folder = TestData.NewScratchFolder("props");

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private sealed record Case(int Stations, (int Station, int DayOffset, int DepthMm, bool Cm)[] Rows, int Delimiter, bool Crlf, bool Bom, bool Gzip);

    private static readonly Gen<Case> Cases =
        from stations in Gen.Int[1, Ids.Length]
        from rows in Gen.Select(Gen.Int[0, stations - 1], Gen.Int[0, 900], Gen.Int[0, 4000], Gen.Bool).Array[1, 300]
        from delimiter in Gen.Int[0, 2]
        from crlf in Gen.Bool
        from bom in Gen.Bool
        from gzip in Gen.Bool
        select new Case(stations, rows, delimiter, crlf, bom, gzip);

    private static IEnumerable<T> Seeded<T>(Gen<T> gen, int count, ulong seed)
    {
        for (var i = 0; i < count; i++)
        {
            yield return gen.Generate(new PCG(7, seed + (ulong)i), null, out _);
        }
    }

    private static string Quote(string s, char delimiter) =>
        s.Contains(delimiter, StringComparison.Ordinal) || s.Contains('"', StringComparison.Ordinal) ? "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : s;

    [Fact]
    public void Random_valid_files_round_trip_exactly_into_the_matrix()
    {
        var start = new DateOnly(1999, 9, 1);
        var calendar = SeasonCalendar.Default;
        var n = 0;
        foreach (var c in Seeded(Cases, 60, seed: 20_240_601))
        {
            n++;
            var d = c.Delimiter switch { 0 => ',', 1 => ';', _ => '\t' };
            var nl = c.Crlf ? "\r\n" : "\n";
            var expected = new Dictionary<(string, int), float[]>();
            var text = new StringBuilder($"station{d}date{d}depth{d}unit{nl}");
            var seen = new HashSet<(int, int)>();
            foreach (var (s, offset, mm, cm) in c.Rows)
            {
                var date = start.AddDays(offset);
                if ((date.Month == 2 && date.Day == 29) || !seen.Add((s, offset)))
                {
                    continue;
                }

                calendar.TryLocate(date, out var season, out var day);
                if (!expected.TryGetValue((Ids[s], season), out var row))
                {
                    row = new float[365];
                    row.AsSpan().Fill(float.NaN);
                    expected[(Ids[s], season)] = row;
                }

                row[day] = mm;
                var depth = cm ? (mm / 10.0).ToString("0.0", CultureInfo.InvariantCulture) : mm.ToString(CultureInfo.InvariantCulture);
                if (d != ',')
                {
                    depth = depth.Replace('.', ',');
                }

                text.Append($"{Quote(Ids[s], d)}{d}{date:yyyy-MM-dd}{d}{Quote(depth, d)}{d}{(cm ? "cm" : "mm")}{nl}");
            }

            var stations = new StringBuilder("station,name,longitude,latitude\n");
            for (var s = 0; s < c.Stations; s++)
            {
                stations.Append(CultureInfo.InvariantCulture, $"{Quote(Ids[s], ',')},n{s},{s},{s}\n");
            }

            var records = Path.Combine(folder, $"r{n}.csv" + (c.Gzip ? ".gz" : string.Empty));
            var bytes = (c.Bom ? new byte[] { 0xEF, 0xBB, 0xBF } : []).Concat(Encoding.UTF8.GetBytes(text.ToString())).ToArray();
            if (c.Gzip)
            {
                using var gz = new GZipStream(File.Create(records), CompressionLevel.Fastest);
                gz.Write(bytes);
            }
            else
            {
                File.WriteAllBytes(records, bytes);
            }

            var stationsPath = Path.Combine(folder, $"s{n}.csv");
            File.WriteAllText(stationsPath, stations.ToString());

            // The series rules are switched off: random depths are not snow.
            var result = RecordsImport.Run(new ImportOptions(records, stationsPath) { SpikeJumpMm = 1e9, FlatlineDays = 100_000 });

            var keys = expected.Keys.OrderBy(k => k.Item1, StringComparer.Ordinal).ThenBy(k => k.Item2).ToArray();
            Assert.Equal(keys, result.Matrix.Keys.Select(k => (k.Station.Value, k.Season)));
            for (var i = 0; i < keys.Length; i++)
            {
                Assert.Equal(expected[keys[i]], result.Matrix.Row(i).ToArray());
            }

            Assert.Equal(seen.Count, result.Quality.RowsKept);
            Assert.Equal(0, result.Quality.RemovedTotal);
        }
    }

    private static readonly Gen<byte[]> Garbage =
        Gen.OneOf(
            Gen.Byte.Array[0, 3000],
            Gen.Byte.Array[0, 500].Select(b => Encoding.UTF8.GetBytes("station,date,depth\n").Concat(b).ToArray()),
            Gen.Select(Gen.Int[0, 60], Gen.Byte, Gen.Int[1, 5]).Array[1, 8].Select(edits =>
            {
                var valid = Encoding.UTF8.GetBytes("station,date,depth,unit\nA,2001-01-01,5,mm\nA,2001-01-02,\"6\",cm\n");
                foreach (var (at, value, _) in edits)
                {
                    valid[at % valid.Length] = value;
                }

                return valid;
            }));

    [Fact]
    public void Random_bytes_never_crash_the_reader_they_are_read_or_refused_with_a_located_message()
    {
        var stations = Path.Combine(folder, "s.csv");
        File.WriteAllText(stations, "station,name,longitude,latitude\nA,a,1,1\n");
        var n = 0;
        foreach (var bytes in Seeded(Garbage, 300, seed: 99))
        {
            var path = Path.Combine(folder, $"g{n++}.csv");
            File.WriteAllBytes(path, bytes);
            try
            {
                var r = RecordsImport.Run(new ImportOptions(path, stations));
                Assert.Equal(r.Quality.RowsRead, r.Quality.RowsKept + r.Quality.DuplicatesMerged + r.Quality.EmptyDepth + r.Quality.OtherElement + r.Quality.RemovedTotal);
            }
            catch (SpatialDataException e)
            {
                Assert.Equal(path, e.Diagnostic.File);
                Assert.DoesNotContain('\n', e.Diagnostic.ToString());
            }
        }
    }

    [Fact]
    public void Random_bytes_as_a_station_list_are_read_or_refused_with_a_located_message()
    {
        var n = 0;
        foreach (var bytes in Seeded(Garbage, 200, seed: 5))
        {
            var path = Path.Combine(folder, $"sl{n++}.csv");
            File.WriteAllBytes(path, bytes);
            try
            {
                StationListFile.Read(path);
            }
            catch (SpatialDataException e)
            {
                Assert.Equal(path, e.Diagnostic.File);
            }
        }
    }
}

using System.Globalization;
using System.Text;
using Spatial.Scenario.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Scenario.Tests;

public sealed class ReferenceTests
{
    // cs2cs prints 0.1 mm; ProjNet's series and PROJ's agree far better than a millimetre this close to the central meridian.
    private const double ProjectedToleranceM = 0.001;
    private const double RoundTripToleranceDeg = 1e-9;

    public static TheoryData<double, double, double, double> Cs2csPoints()
    {
        var data = new TheoryData<double, double, double, double>();
        foreach (var line in File.ReadAllLines(TestData.Path("utm25n_cs2cs.csv")).Skip(1))
        {
            var f = line.Split(',').Select(s => double.Parse(s, CultureInfo.InvariantCulture)).ToArray();
            data.Add(f[0], f[1], f[2], f[3]);
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(Cs2csPoints))]
    public void Utm_zone_25N_matches_proj_cs2cs(double lon, double lat, double easting, double northing)
    {
        // PROJ 9.1.1 cs2cs EPSG:4326 → EPSG:32625 (data/SOURCES.md).
        var (x, y) = Utm25.ToUtm(lon, lat);
        Tolerance.Near(easting, x, ProjectedToleranceM, "easting");
        Tolerance.Near(northing, y, ProjectedToleranceM, "northing");
        var (lon2, lat2) = Utm25.ToGeographic(x, y);
        Tolerance.Near(lon, lon2, RoundTripToleranceDeg, "longitude round trip");
        Tolerance.Near(lat, lat2, RoundTripToleranceDeg, "latitude round trip");
    }

    [Fact]
    public void Least_squares_matches_the_exact_rational_solution()
    {
        var rows = File.ReadAllLines(TestData.Path("ols_small.csv")).Skip(1)
            .Select(l => l.Split(',').Select(s => double.Parse(s, CultureInfo.InvariantCulture)).ToArray()).ToArray();
        var x = new double[rows.Length, 4];
        var y = new double[rows.Length];
        for (var i = 0; i < rows.Length; i++)
        {
            y[i] = rows[i][0];
            x[i, 0] = 1;
            x[i, 1] = rows[i][1];
            x[i, 2] = rows[i][2];
            x[i, 3] = rows[i][3];
        }

        // Python fractions (exact rational least squares), data/SOURCES.md. The design's condition number is about 1e4 (the
        // latitude column near 47), so 11 significant digits are the least Householder QR in double should give.
        var expected = File.ReadAllLines(TestData.Path("ols_small_exact.txt")).Skip(1).Select(s => double.Parse(s, CultureInfo.InvariantCulture)).ToArray();
        var (b, r2) = LeastSquares.Fit(x, y);
        for (var k = 0; k < 4; k++)
        {
            Tolerance.Digits(expected[k], b[k], 11, $"coefficient {k}");
        }

        Tolerance.Digits(expected[4], r2, 11, "R²");
    }

    [Fact]
    public void Crc32_of_the_check_string_is_the_published_check_value()
    {
        // CRC-32/ISO-HDLC check value for "123456789" (Cook's CRC catalogue; Williams 1993).
        Assert.Equal(0xCBF43926u, GzipWriter.Crc32(Encoding.ASCII.GetBytes("123456789")));
    }

    [Fact]
    public void A_gzip_member_has_a_fixed_header_and_decompresses_to_the_input()
    {
        var text = Encoding.ASCII.GetBytes(string.Concat(Enumerable.Range(0, 5000).Select(i => $"MF{i % 7:D3},2001-01-{(i % 28) + 1:D2},{i % 311}\n")));
        using var ms = new MemoryStream();
        using (var gz = new GzipWriter(ms, 6))
        {
            gz.Write(text);
        }

        var bytes = ms.ToArray();

        // RFC 1952 §2.3: ID1 ID2 = 1f 8b, CM = 8 (deflate), FLG = 0, MTIME = 0, XFL = 0, OS = 255 (unknown).
        Assert.Equal(new byte[] { 0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 0xff }, bytes[..10]);
        using var back = new System.IO.Compression.GZipStream(new MemoryStream(bytes), System.IO.Compression.CompressionMode.Decompress);
        using var output = new MemoryStream();
        back.CopyTo(output);
        Assert.Equal(text, output.ToArray());
    }

    [Fact]
    public void The_distance_transform_equals_brute_force_distances()
    {
        var rng = new Rng(11);
        const int w = 37;
        const int h = 23;
        var target = Enumerable.Range(0, w * h).Select(_ => rng.NextDouble() < 0.04).ToArray();
        target[0] = true;
        var d = DistanceTransform.Compute(target, w, h);
        for (var i = 0; i < w * h; i++)
        {
            var best = double.MaxValue;
            for (var j = 0; j < w * h; j++)
            {
                if (target[j])
                {
                    double dx = (i % w) - (j % w);
                    double dy = (i / w) - (j / w);
                    best = Math.Min(best, Math.Sqrt((dx * dx) + (dy * dy)));
                }
            }

            Tolerance.Near(best, d[i], 1e-9, $"cell {i}");
        }
    }

    [Fact]
    public void Season_metrics_follow_their_definitions_on_a_hand_made_curve()
    {
        var curve = new int[365];
        curve[10] = 30;       // a one-day cover early in the season
        for (var d = 60; d < 200; d++)
        {
            curve[d] = d == 100 ? 20 : 40 + d;  // main cover, broken once (day 100 below 25 mm)
        }

        curve[150] = 900;     // the peak
        curve[210] = 24;      // below the threshold: not covered
        var m = SeasonMetricsCalc.Of(curve);
        Assert.Equal(10, m.Onset);
        Assert.Equal(199, m.Meltout);
        Assert.Equal(190, m.Duration);      // 199 − 10 + 1
        Assert.Equal(99, m.LongestCover);   // days 101…199
        Assert.Equal(1 + 139, m.SnowDays);  // day 10 + days 60…199 except day 100
        Assert.Equal(900, m.Peak);
        Assert.Equal(150, m.PeakDay);

        var empty = SeasonMetricsCalc.Of(new int[365]);
        Assert.Null(empty.Onset);
        Assert.Null(empty.PeakDay);
        Assert.Equal(0, empty.Duration);
    }
}

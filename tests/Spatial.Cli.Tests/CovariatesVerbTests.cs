using System.Globalization;
using System.Text.Json;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

public sealed class CovariatesVerbTests : IDisposable
{
    private readonly string scratch = TestData.NewScratchFolder("covariates-verb");

    public CovariatesVerbTests()
    {
        // Flinders Peak and a station far outside the DEM; the coast is a single point at Buninyong.
        File.WriteAllText(Path.Combine(scratch, "stations.csv"),
            "station,name,longitude,latitude,elevation_m\nFLP,Flinders Peak,144.42486788888888,-37.95103341666667,348\nFAR,Far away,150,-30,\n");
        File.WriteAllText(Path.Combine(scratch, "coast.geojson"),
            "{\"type\":\"FeatureCollection\",\"features\":[{\"type\":\"Feature\",\"properties\":{},\"geometry\":{\"type\":\"Point\",\"coordinates\":[143.92649552777777,-37.65282113888889]}}]}");

        // A 5×5 geographic grid of 0.01° cells, z = 300 + 20·(column index): a plane rising to the east.
        var lines = new List<string> { "ncols 5", "nrows 5", "xllcorner 144.40", "yllcorner -37.97", "cellsize 0.01", "NODATA_value -9999" };
        for (var r = 0; r < 5; r++)
        {
            lines.Add(string.Join(' ', Enumerable.Range(0, 5).Select(c => (300 + (20 * c)).ToString(CultureInfo.InvariantCulture))));
        }

        File.WriteAllLines(Path.Combine(scratch, "dem.asc"), lines);
    }

    public void Dispose() => Directory.Delete(scratch, recursive: true);

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    [Fact]
    public void Covariates_of_Flinders_Peak_give_GeographicLib_distance_to_Buninyong_and_the_hand_worked_DEM_value()
    {
        var outPath = Path.Combine(scratch, "res", "covariates.csv");
        var (code, stdout, err) = Run("covariates", "--stations", Path.Combine(scratch, "stations.csv"), "--dem", Path.Combine(scratch, "dem.asc"),
            "--dem-crs", "EPSG:4326", "--coast", Path.Combine(scratch, "coast.geojson"), "--out", outPath, "--json");
        Assert.True(code == 0, err);
        using var summary = JsonDocument.Parse(stdout);
        Assert.Equal(2, summary.RootElement.GetProperty("stations").GetInt32());
        Assert.Equal(1, summary.RootElement.GetProperty("with_dem_elevation").GetInt32());
        Assert.Contains("FAR", summary.RootElement.GetProperty("warnings")[0].GetString(), StringComparison.Ordinal);
        Assert.True(File.Exists(Path.Combine(scratch, "res", "manifest.json")));

        var rows = File.ReadAllLines(outPath);
        Assert.Equal("station,longitude,latitude,elevation_listed_m,elevation_dem_m,elevation_diff_m,elevation_flag,slope_deg,aspect_deg,northness,eastness,relief_1km_m,relief_5km_m,coast_km,coast_azimuth_deg", rows[0]);
        var f = rows[1].Split(',');
        Assert.Equal("FLP", f[0]);

        // By hand: bilinear on a plane is exact; the station sits (144.424867889 − 144.40)/0.01 − 0.5 cell centres east of column 0.
        var z = 300 + (20 * (((144.42486788888888 - 144.40) / 0.01) - 0.5));
        Tolerance.Near(z, D(f[4]), 1e-6, "DEM elevation");
        Tolerance.Near(348 - z, D(f[5]), 1e-6, "listed − DEM");
        Assert.Equal("0", f[6]);
        Tolerance.Near(270, D(f[8]), 1e-9, "aspect of a plane rising to the east: downslope to the west");

        // GeographicLib GeodSolve on WGS84 (ICSM GDA manual example): s12 = 54972.271139201 m, azi1 = −53.13184079711937°.
        Tolerance.Near(54.972271139201, D(f[13]), 1e-6, "coast_km");
        Tolerance.Near(360 - 53.13184079711937, D(f[14]), 1e-7, "coast azimuth");

        var far = rows[2].Split(',');
        Assert.Equal("FAR", far[0]);
        Assert.Equal(string.Empty, far[4]);
        Assert.Equal(string.Empty, far[7]);
        Assert.NotEqual(string.Empty, far[13]);
    }

    [Fact]
    public void A_broken_DEM_fails_with_one_line_naming_the_file_and_writes_nothing()
    {
        var bad = Path.Combine(scratch, "bad.asc");
        File.WriteAllText(bad, "ncols 2\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 2 3\n");
        var outPath = Path.Combine(scratch, "out.csv");
        var (code, _, err) = Run("covariates", "--stations", Path.Combine(scratch, "stations.csv"), "--dem", bad, "--dem-crs", "EPSG:4326", "--coast", "none", "--out", outPath);
        Assert.Equal(1, code);
        Assert.Contains("bad.asc", err, StringComparison.Ordinal);
        Assert.Single(err.Trim().Split('\n'));
        Assert.False(File.Exists(outPath));
    }

    [Fact]
    public void Without_coast_option_the_built_in_world_coast_is_used()
    {
        // Plumbing: Flinders Peak lies inland of Port Phillip Bay (Victoria), a few km to some tens of km from the sea.
        var outPath = Path.Combine(scratch, "w.csv");
        var (code, _, err) = Run("covariates", "--stations", Path.Combine(scratch, "stations.csv"), "--out", outPath);
        Assert.True(code == 0, err);
        var f = File.ReadAllLines(outPath)[1].Split(',');
        Assert.InRange(D(f[13]), 0.5, 60);
        Assert.Equal(string.Empty, f[4]);
    }

    private static double D(string s) => double.Parse(s, CultureInfo.InvariantCulture);
}

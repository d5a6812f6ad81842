using System.Globalization;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

/// <summary>Station lists whose <c>crs</c> column names a projected CRS are converted to WGS 84 on import.</summary>
public sealed class StationCrsTests : IDisposable
{
    private readonly string dir = TestData.NewScratchFolder("station-crs");

    public void Dispose() => Directory.Delete(dir, true);

    private string Write(string stationsCsv)
    {
        File.WriteAllText(Path.Combine(dir, "records.csv"), "station,date,depth\nU1,2000-12-01,300\nU2,2000-12-01,120\n");
        var path = Path.Combine(dir, "stations.csv");
        File.WriteAllText(path, stationsCsv);
        return path;
    }

    [Fact]
    public void A_station_list_in_UTM_coordinates_is_imported_at_the_longitude_and_latitude_PROJ_gives()
    {
        // Reference: PROJ 9.1.1 cs2cs EPSG:32625 EPSG:4326 -f %.8f on "516317.7 5192279.5" → 46.88385292 -32.78582930,
        // and EPSG:32633 on "500000 5000000" → 45.15347718 15.00000000 (run once, recorded here).
        var stations = Write("station,name,longitude,latitude,elevation_m,crs\nU1,Utm one,516317.7,5192279.5,165,EPSG:32625\nU2,Utm two,500000,5000000,80,EPSG:32633\n");
        var outDir = Path.Combine(dir, "out");

        var (code, _, error) = CliHarness.Run("import", "--records", Path.Combine(dir, "records.csv"), "--stations", stations, "--out", outDir, "--min-days", "0");

        Assert.True(code == 0, error);
        var rows = File.ReadAllLines(Path.Combine(outDir, "station_list.csv")).Skip(1).Select(l => l.Split(',')).ToDictionary(f => f[0]);
        Tolerance.Near(-32.78582930, double.Parse(rows["U1"][2], CultureInfo.InvariantCulture), 1e-8, "U1 longitude, degrees");
        Tolerance.Near(46.88385292, double.Parse(rows["U1"][3], CultureInfo.InvariantCulture), 1e-8, "U1 latitude, degrees");
        Tolerance.Near(15.0, double.Parse(rows["U2"][2], CultureInfo.InvariantCulture), 1e-8, "U2 longitude, degrees");
        Tolerance.Near(45.15347718, double.Parse(rows["U2"][3], CultureInfo.InvariantCulture), 1e-8, "U2 latitude, degrees");
    }

    [Fact]
    public void An_EPSG_code_Spatial_does_not_know_is_a_located_error()
    {
        var stations = Write("station,name,longitude,latitude,elevation_m,crs\nU1,One,652000,6862000,100,EPSG:2154\nU2,Two,-33,47,80,EPSG:4326\n");

        var (code, _, error) = CliHarness.Run("import", "--records", Path.Combine(dir, "records.csv"), "--stations", stations, "--out", Path.Combine(dir, "bad"));

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("stations.csv:2", error, StringComparison.Ordinal);
        Assert.Contains("EPSG:2154", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(Path.Combine(dir, "bad")) && Directory.GetFiles(Path.Combine(dir, "bad")).Length > 0);
    }
}

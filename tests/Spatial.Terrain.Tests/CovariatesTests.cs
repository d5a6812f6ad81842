using Spatial.Core;
using Spatial.Terrain.Coast;
using Spatial.Terrain.Rasters;
using Spatial.Testing;
using Xunit;

namespace Spatial.Terrain.Tests;

public sealed class CovariatesTests
{
    // Position error of the round trip through cs2cs's 12 printed decimals (≈0.1 µm) times slopes below 1 m/m.
    private const double ElevationToleranceM = 1e-4;

    private static List<Station> CsStations() =>
        ReferenceCsv.Read("dem", "stations_cs2cs.csv").Select((r, i) => new Station(new StationId($"S{i:00}"), $"n{i}", r.D("lon"), r.D("lat"), 600)).ToList();

    [Fact]
    public void Stations_in_WGS_84_get_GDAL_bilinear_elevations_of_a_UTM_DEM()
    {
        // PROJ cs2cs EPSG:32633 → EPSG:4326 positions and GDAL 3.6.2 bilinear values (data/dem/SOURCES.md).
        var rows = ReferenceCsv.Read("dem", "stations_cs2cs.csv");
        var table = Covariates.Compute(CsStations(), new CovariateOptions { Dem = DemFile.Read(TestData.Path("dem", "dem_f32_strip.tif")) });
        Assert.Empty(table.Warnings);
        for (var i = 0; i < rows.Count; i++)
        {
            Tolerance.Near(rows[i].D("bilinear"), table.Rows[i].ElevationDemM, ElevationToleranceM, $"station {i}");
            Tolerance.Near(600 - rows[i].D("bilinear"), table.Rows[i].ElevationDiffM, ElevationToleranceM, $"listed − DEM of station {i}");
            Assert.Equal(Math.Abs(600 - rows[i].D("bilinear")) > 100, table.Rows[i].ElevationFlag);
            Assert.InRange(table.Rows[i].SlopeDeg, 0, 90);
            Tolerance.Near(Math.Cos(table.Rows[i].AspectDeg * Math.PI / 180), table.Rows[i].Northness, 1e-12, "northness = cos(aspect)");
            Assert.True(table.Rows[i].Relief5KmM >= table.Rows[i].Relief1KmM);
        }
    }

    [Fact]
    public void A_station_outside_the_DEM_gets_empty_terrain_columns_and_a_warning_not_a_failure()
    {
        var stations = new List<Station>
        {
            new(new StationId("in"), "", 15.03, 60.46, null),
            new(new StationId("out"), "", 16.5, 61.0, 800),
        };
        var table = Covariates.Compute(stations, new CovariateOptions { Dem = DemFile.Read(TestData.Path("dem", "dem_f32_tiled.tif")), DemName = "dem.tif" });
        Assert.False(double.IsNaN(table.Rows[0].ElevationDemM));
        Assert.Null(table.Rows[0].ElevationFlag);
        Assert.True(double.IsNaN(table.Rows[1].ElevationDemM));
        Assert.True(double.IsNaN(table.Rows[1].SlopeDeg));
        Assert.Null(table.Rows[1].ElevationFlag);
        var w = Assert.Single(table.Warnings);
        Assert.Equal(Severity.Warning, w.Severity);
        Assert.Contains("out", w.Message, StringComparison.Ordinal);
        Assert.Contains("outside the DEM", w.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void The_table_file_has_the_contract_columns_invariant_numbers_and_empty_unknowns()
    {
        var coast = CoastGeometry.FromGeoJson(TestData.Path("coast", "coast.geojson"));
        var stations = new List<Station> { new(new StationId("A,1"), "", 5.1, 60.1, null), new(new StationId("B"), "", 15.03, 60.46, 612.5) };
        var table = Covariates.Compute(stations, new CovariateOptions { Dem = DemFile.Read(TestData.Path("dem", "dem_area.asc")), Coast = coast });
        var dir = TestData.NewScratchFolder("cov");
        try
        {
            var path = Path.Combine(dir, "covariates.csv");
            table.Write(path);
            var lines = File.ReadAllText(path).Split('\n');
            Assert.Equal("station,longitude,latitude,elevation_listed_m,elevation_dem_m,elevation_diff_m,elevation_flag,slope_deg,aspect_deg,northness,eastness,relief_1km_m,relief_5km_m,coast_km,coast_azimuth_deg", lines[0]);
            Assert.StartsWith("\"A,1\",5.1,60.1,,,,,,,,,,,", lines[1], StringComparison.Ordinal);
            var f = lines[2].Split(',');
            Assert.Equal(15, f.Length);
            Assert.Equal("612.5", f[3]);
            Assert.Equal(table.Rows[1].ElevationDemM.ToString("R", System.Globalization.CultureInfo.InvariantCulture), f[4]);
            Assert.True(double.Parse(f[13], System.Globalization.CultureInfo.InvariantCulture) < 0, "B is east of the invented island, at sea in its terms");
            Assert.Equal(string.Empty, lines[^1]);
            table.Write(path);
            Assert.Single(Directory.GetFiles(dir));
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    [Fact]
    public void Grid_covariates_match_the_station_covariates_at_cell_centres()
    {
        var dem = DemFile.Read(TestData.Path("dem", "dem_f32_strip.tif"));
        var grid = Covariates.ForGrid(dem, null);
        var stations = new List<Station>();
        var cells = new[] { (10, 10), (30, 20), (45, 40), (0, 0) };
        foreach (var (c, r) in cells)
        {
            stations.Add(new Station(new StationId($"c{c}r{r}"), "", grid.Longitude[(r * dem.Width) + c], grid.Latitude[(r * dem.Width) + c], null));
        }

        var table = Covariates.Compute(stations, new CovariateOptions { Dem = dem });
        for (var k = 0; k < cells.Length; k++)
        {
            var i = (cells[k].Item2 * dem.Width) + cells[k].Item1;
            Assert.True(grid.Land[i]);
            Tolerance.Near(grid.ElevationM[i], table.Rows[k].ElevationDemM, 1e-3, $"elevation at cell {cells[k]}");
            Tolerance.Near(grid.SlopeDeg[i], table.Rows[k].SlopeDeg, 1e-4, $"slope at cell {cells[k]}");
            Tolerance.Near(grid.Relief5KmM[i], table.Rows[k].Relief5KmM, 1e-3, $"relief at cell {cells[k]}");
        }

        Assert.False(grid.Land[(9 * dem.Width) + 7]); // a no-data cell of the fixture
    }
}

using System.Text;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Records.Tests;

public sealed class StationListFileTests : IDisposable
{
    private readonly string folder = TestData.NewScratchFolder("stations");

    public void Dispose() => Directory.Delete(folder, recursive: true);

    private string Write(string name, string text, bool bom = false)
    {
        var path = Path.Combine(folder, name);
        File.WriteAllBytes(path, [.. (bom ? new byte[] { 0xEF, 0xBB, 0xBF } : []), .. Encoding.UTF8.GetBytes(text)]);
        return path;
    }

    private SpatialDataException Refused(string text, long expectedLine)
    {
        var path = Write("bad.csv", text);
        var e = Assert.Throws<SpatialDataException>(() => StationListFile.Read(path));
        Assert.Equal(path, e.Diagnostic.File);
        Assert.Equal(expectedLine, e.Diagnostic.Line);
        Assert.Contains($"{path}:{expectedLine}", e.Message, StringComparison.Ordinal);
        return e;
    }

    [Fact]
    public void A_plain_list_reads_each_station_with_coordinates_and_optional_elevation()
    {
        var path = Write("s.csv", "station,name,longitude,latitude,elevation_m\nA1,Alder Cross,-3.25,57.5,412\nB2,Brackwater,-3.5,57.75,\n");

        var list = StationListFile.Read(path);

        Assert.Equal(2, list.Stations.Count);
        Assert.Equal(new Station(new StationId("A1"), "Alder Cross", -3.25, 57.5, 412), list.Stations[0]);
        Assert.Equal(new Station(new StationId("B2"), "Brackwater", -3.5, 57.75, null), list.Stations[1]);
        Assert.Empty(list.Warnings);
    }

    [Fact]
    public void A_byte_order_mark_CRLF_line_ends_quoted_names_and_blank_trailing_lines_are_read()
    {
        var path = Write("s.csv", "station,name,longitude,latitude\r\nA1,\"Cross, upper \"\"north\"\"\",10.5,60.25\r\n\r\n\r\n", bom: true);

        var list = StationListFile.Read(path);

        var s = Assert.Single(list.Stations);
        Assert.Equal("A1", s.Id.Value);
        Assert.Equal("Cross, upper \"north\"", s.Name);
        Assert.Equal(10.5, s.Longitude);
        Assert.Equal(60.25, s.Latitude);
        Assert.Null(s.ElevationListedM);
    }

    [Fact]
    public void A_semicolon_list_with_decimal_commas_is_read()
    {
        var path = Write("s.csv", "station;name;longitude;latitude;elevation_m\nA1;Fell;-3,125;57,5;1200,5\n");

        var s = Assert.Single(StationListFile.Read(path).Stations);

        Assert.Equal(-3.125, s.Longitude);
        Assert.Equal(57.5, s.Latitude);
        Assert.Equal(1200.5, s.ElevationListedM);
    }

    [Fact]
    public void A_tab_separated_list_with_upper_case_header_and_wgs84_crs_column_is_read()
    {
        var path = Write("s.tsv", "STATION\tName\tLongitude\tLatitude\tCRS\nA1\tFell\t1\t2\tEPSG:4326\nA2\tMoor\t3\t4\t\n");

        var list = StationListFile.Read(path);

        Assert.Equal(["A1", "A2"], list.Stations.Select(s => s.Id.Value));
    }

    [Fact]
    public void A_projected_crs_is_refused_with_a_message_saying_only_wgs84_is_read()
    {
        var e = Refused("station,name,longitude,latitude,crs\nA1,Fell,1,2,EPSG:4326\nA2,Moor,500000,6400000,EPSG:32630\n", 3);

        Assert.Contains("EPSG:32630", e.Message, StringComparison.Ordinal);
        Assert.Contains("EPSG:4326", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_latitude_out_of_range_is_refused_on_its_line()
    {
        var e = Refused("station,name,longitude,latitude\nA1,Fell,1,2\nA2,Moor,3,91.5\n", 3);

        Assert.Contains("latitude 91.5", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_longitude_out_of_range_is_refused_on_its_line() =>
        Refused("station,name,longitude,latitude\nA1,Fell,181,2\n", 2);

    [Fact]
    public void A_non_numeric_coordinate_is_refused_on_its_line() =>
        Refused("station,name,longitude,latitude\nA1,Fell,east,2\n", 2);

    [Fact]
    public void An_implausible_elevation_is_refused_on_its_line() =>
        Refused("station,name,longitude,latitude,elevation_m\nA1,Fell,1,2,29000\n", 2);

    [Fact]
    public void A_duplicate_station_is_refused_naming_the_first_line()
    {
        var e = Refused("station,name,longitude,latitude\nA1,Fell,1,2\nA2,Moor,1,2\nA1,Fell,1,2\n", 4);

        Assert.Contains("line 2", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_missing_latitude_column_is_refused_on_the_header_line()
    {
        var e = Refused("station,name,longitude\nA1,Fell,1\n", 1);

        Assert.Contains("latitude", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void An_empty_file_is_refused() => Refused(string.Empty, 1);

    [Fact]
    public void A_header_without_stations_is_refused_on_the_line_after_the_header() =>
        Refused("station,name,longitude,latitude\n", 2);

    [Fact]
    public void A_short_row_is_refused_on_its_line() =>
        Refused("station,name,longitude,latitude\nA1,Fell,1,2\nA2,Moor,1\n", 3);

    [Fact]
    public void An_empty_station_id_is_refused_on_its_line() =>
        Refused("station,name,longitude,latitude\n,Fell,1,2\n", 2);

    [Fact]
    public void A_station_at_zero_zero_is_kept_with_a_located_warning()
    {
        var path = Write("s.csv", "station,name,longitude,latitude\nA1,Fell,0,0\n");

        var list = StationListFile.Read(path);

        Assert.Single(list.Stations);
        var w = Assert.Single(list.Warnings);
        Assert.Equal(2, w.Line);
    }

    [Fact]
    public void A_written_list_reads_back_to_the_same_stations()
    {
        Station[] stations =
        [
            new(new StationId("A1"), "Upper, \"north\" cross", -3.123456789012345, 57.5, 412.25),
            new(new StationId("Z9"), string.Empty, 179.999, -89.5, null),
        ];
        var path = Path.Combine(folder, "station_list.csv");

        StationListFile.Write(path, stations);

        Assert.Equal(stations, StationListFile.Read(path).Stations);
        Assert.StartsWith("station,name,longitude,latitude,elevation_m\n", File.ReadAllText(path), StringComparison.Ordinal);
    }
}

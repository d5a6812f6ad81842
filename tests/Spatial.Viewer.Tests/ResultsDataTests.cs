using System.Net;
using Spatial.Core;
using Spatial.Testing;
using Spatial.Viewer.Internal;
using Xunit;

namespace Spatial.Viewer.Tests;

public sealed class ResultsDataTests : IDisposable
{
    private readonly string folder = TestData.NewScratchFolder("viewer-data");

    public ResultsDataTests() => SyntheticResults.Write(folder, 10, 3, seed: 5);

    public void Dispose() => Directory.Delete(folder, recursive: true);

    [Fact]
    public void Quoted_names_with_commas_and_doubled_quotes_are_read_as_written()
    {
        var data = ResultsData.Load(folder);
        Assert.Equal("Fell Top, North", data.Stations[0].Name);
        Assert.Equal("Tarn \"Upper\" Hut", data.Stations[1].Name);
        Assert.Equal("<b>Skerry</b> Point", data.Stations[2].Name);
    }

    [Theory]
    [InlineData("stations.csv", "stations.median_c1")]
    [InlineData("seasons.csv", "seasons.median_residual_3")]
    [InlineData("covariates.csv", "covariates.coast_km")]
    [InlineData("regression/fitted.csv", "fitted.median_c1")]
    [InlineData("regression/local.csv", "local.median_c1.local_r2")]
    public void A_missing_optional_file_removes_its_variables_and_nothing_else(string file, string variable)
    {
        Assert.Contains(variable, ResultsData.Load(folder).Values.Keys);
        File.Delete(Path.Combine(folder, file));
        var data = ResultsData.Load(folder);
        Assert.DoesNotContain(variable, data.Values.Keys);
        Assert.Equal(10, data.Stations.Count);
    }

    [Fact]
    public async Task A_folder_with_only_a_station_list_serves_a_page_with_no_variables_layers_or_basis()
    {
        foreach (var entry in Directory.EnumerateFileSystemEntries(folder).Where(e => Path.GetFileName(e) != "station_list.csv"))
        {
            if (Directory.Exists(entry))
            {
                Directory.Delete(entry, recursive: true);
            }
            else
            {
                File.Delete(entry);
            }
        }

        await using var server = await ViewerServer.StartAsync(new ViewerOptions(folder));
        using var http = new HttpClient { BaseAddress = server.Uri };
        var meta = await http.GetStringAsync("/api/meta");
        Assert.Contains("\"variables\":[]", meta, StringComparison.Ordinal);
        Assert.Contains("\"coastline\":false,\"hillshade\":null,\"predicted\":[]", meta, StringComparison.Ordinal);
        Assert.Contains("\"count\":10", await http.GetStringAsync("/api/stations"), StringComparison.Ordinal);
        Assert.Equal(HttpStatusCode.NotFound, (await http.GetAsync("/api/basis")).StatusCode);
        Assert.Equal(HttpStatusCode.NotFound, (await http.GetAsync("/api/layers/coastline.geojson")).StatusCode);
        Assert.Equal(HttpStatusCode.OK, (await http.GetAsync("/api/stations/MF-001/seasons")).StatusCode);
    }

    [Fact]
    public void Without_a_station_list_the_covariate_table_gives_the_positions()
    {
        File.Delete(Path.Combine(folder, "station_list.csv"));
        var data = ResultsData.Load(folder);
        Assert.Equal(9, data.Stations.Count); // the generator writes no covariates for its last station
    }

    [Fact]
    public void A_folder_without_any_station_table_is_a_data_error_naming_what_to_run()
    {
        File.Delete(Path.Combine(folder, "station_list.csv"));
        File.Delete(Path.Combine(folder, "covariates.csv"));
        var e = Assert.Throws<SpatialDataException>(() => ResultsData.Load(folder));
        Assert.Contains("spatial import", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_malformed_number_is_reported_with_file_line_and_column()
    {
        var path = Path.Combine(folder, "stations.csv");
        var lines = File.ReadAllLines(path);
        var fields = lines[3].Split(',');
        fields[2] = "12,5".Replace(',', ';');
        lines[3] = string.Join(",", fields);
        File.WriteAllLines(path, lines);
        var e = Assert.Throws<SpatialDataException>(() => ResultsData.Load(folder));
        Assert.Equal("stations.csv", e.Diagnostic.File);
        Assert.Equal(4, e.Diagnostic.Line);
        Assert.Equal(3, e.Diagnostic.Column);
        Assert.Contains("'12;5', expected a number", e.Diagnostic.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_basis_with_a_short_mean_curve_is_a_data_error()
    {
        File.WriteAllText(Path.Combine(folder, "basis.json"), "{\"mean\":[1,2,3],\"components\":[]}");
        var e = Assert.Throws<SpatialDataException>(() => ResultsData.Load(folder));
        Assert.Contains("365", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_row_with_too_few_fields_is_a_data_error_on_its_line()
    {
        File.AppendAllText(Path.Combine(folder, "covariates.csv"), "MF-010,1,2\n");
        var e = Assert.Throws<SpatialDataException>(() => ResultsData.Load(folder));
        Assert.Equal(11, e.Diagnostic.Line);
    }

    [Fact]
    public void The_public_surface_is_the_server_and_its_options()
    {
        var types = typeof(ViewerServer).Assembly.GetExportedTypes().Select(t => t.FullName!).Order(StringComparer.Ordinal).ToArray();
        Assert.Equal(["Spatial.Viewer.ViewerOptions", "Spatial.Viewer.ViewerServer"], types);
    }

    [Theory]
    [InlineData("/api/stations", null)]
    [InlineData("/api/stations/A%2FB", null)]
    [InlineData("/api/stations/..", "bad path")]
    [InlineData("/a/%2e%2e/b", "bad path")]
    [InlineData("/a\\b", "bad path")]
    [InlineData("/a%5Cb", "bad path")]
    [InlineData("/a%00b", "bad path")]
    [InlineData("/a%252e", "bad path")]
    [InlineData("/api/stations?variable=%zz", "malformed query string")]
    [InlineData("/api/stations?variable=%C3%28", "malformed query string")]
    [InlineData("/api/stations?variable=%0a", "malformed query string")]
    [InlineData("relative", "bad path")]
    public void The_request_guard_names_what_it_refuses(string target, string? expected)
    {
        Assert.Equal(expected, RequestGuard.TargetProblem(target));
    }
}

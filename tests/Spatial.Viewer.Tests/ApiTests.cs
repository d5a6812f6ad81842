using System.Globalization;
using System.Net;
using System.Text.Json;
using Spatial.Testing;
using Xunit;

namespace Spatial.Viewer.Tests;

[Collection(SharedServer.Name)]
public sealed class ApiTests(ServerFixture fixture)
{
    private readonly HttpClient http = fixture.Http;

    private async Task<JsonElement> Get(string url)
    {
        using var response = await http.GetAsync(url);
        var text = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, $"GET {url}: {(int)response.StatusCode} {text}");
        return JsonDocument.Parse(text).RootElement.Clone();
    }

    private async Task<(HttpStatusCode Status, string Body)> Status(string url)
    {
        using var response = await http.GetAsync(url);
        return (response.StatusCode, await response.Content.ReadAsStringAsync());
    }

    [Fact]
    public async Task The_page_and_its_own_script_and_style_are_served_with_their_types_and_a_strict_content_policy()
    {
        using var page = await http.GetAsync("/");
        Assert.Equal(HttpStatusCode.OK, page.StatusCode);
        Assert.Equal("text/html", page.Content.Headers.ContentType!.MediaType);
        var html = await page.Content.ReadAsStringAsync();
        Assert.Contains("<script src=\"/app.js\"", html, StringComparison.Ordinal);
        Assert.DoesNotContain("http://", html.Replace("http://www.w3.org/2000/svg", string.Empty, StringComparison.Ordinal), StringComparison.Ordinal);
        Assert.DoesNotContain("https://", html, StringComparison.Ordinal);
        Assert.Contains("default-src 'self'", page.Headers.GetValues("Content-Security-Policy").Single(), StringComparison.Ordinal);
        Assert.Equal("nosniff", page.Headers.GetValues("X-Content-Type-Options").Single());
        using var js = await http.GetAsync("/app.js");
        Assert.Equal("text/javascript", js.Content.Headers.ContentType!.MediaType);
        using var css = await http.GetAsync("/app.css");
        Assert.Equal("text/css", css.Content.Headers.ContentType!.MediaType);
    }

    [Fact]
    public async Task Meta_lists_the_variables_of_every_file_present_and_the_layers()
    {
        var meta = await Get("/api/meta");
        Assert.Equal(Fixture.StationCount, meta.GetProperty("station_count").GetInt32());
        var keys = meta.GetProperty("variables").EnumerateArray().Select(v => v.GetProperty("key").GetString()).ToArray();
        Assert.Contains("stations.median_onset_day", keys);
        Assert.Contains("stations.sen_per_decade_c1", keys);
        Assert.Contains("fitted.median_c1", keys);
        Assert.Contains("local.median_c1.local_elevation_dem_m", keys);
        Assert.Contains("covariates.coast_km", keys);
        Assert.DoesNotContain("covariates.aspect_deg", keys); // circular: not on a linear scale
        var trend = meta.GetProperty("variables").EnumerateArray().First(v => v.GetProperty("key").GetString() == "stations.sen_per_decade_onset_day");
        Assert.Equal("diverging", trend.GetProperty("scale").GetString());
        Assert.Equal("day of season per decade", trend.GetProperty("unit").GetString());
        var c1 = meta.GetProperty("variables").EnumerateArray().First(v => v.GetProperty("key").GetString() == "stations.median_c1");
        Assert.Equal("Component 1 (amount): median of seasons", c1.GetProperty("label").GetString());
        var residual = meta.GetProperty("variables").EnumerateArray().First(v => v.GetProperty("key").GetString() == "fitted.median_onset_day");
        Assert.Equal("Regression residual of Season onset (median)", residual.GetProperty("label").GetString());
        Assert.Equal("day of season", residual.GetProperty("unit").GetString());
        Assert.Equal(2000, meta.GetProperty("seasons").GetProperty("first").GetInt32());
        Assert.Equal(2000 + FixtureTests.Seasons - 1, meta.GetProperty("seasons").GetProperty("last").GetInt32());
        Assert.Equal(SyntheticResults.K, meta.GetProperty("components").GetInt32());
        var layers = meta.GetProperty("layers");
        Assert.True(layers.GetProperty("coastline").GetBoolean());
        Assert.Equal("/api/layers/hillshade.png", layers.GetProperty("hillshade").GetProperty("url").GetString());
        Assert.Equal("predicted_median_c1", layers.GetProperty("predicted")[0].GetProperty("key").GetString());
    }

    [Fact]
    public async Task Stations_without_filters_carry_the_values_of_stations_csv_for_every_listed_station()
    {
        var body = await Get("/api/stations?variable=stations.median_onset_day");
        var stations = body.GetProperty("stations").EnumerateArray().ToArray();
        Assert.Equal(Fixture.StationCount, stations.Length);
        var header = Fixture.Header("stations.csv");
        var col = Array.IndexOf(header, "median_onset_day");
        foreach (var row in Fixture.Rows("stations.csv"))
        {
            var s = stations.Single(x => x.GetProperty("id").GetString() == row[0]);
            var v = s.GetProperty("value");
            if (row[col].Length == 0)
            {
                Assert.Equal(JsonValueKind.Null, v.ValueKind);
            }
            else
            {
                Assert.Equal(double.Parse(row[col], CultureInfo.InvariantCulture), v.GetDouble());
            }
        }
    }

    [Fact]
    public async Task Season_filters_hide_stations_without_counting_seasons_and_recompute_medians_over_the_counting_seasons()
    {
        // Seasons that count: 2003…2006 with at least 300 observed days and misfit (residual_3) at most 0.5.
        var body = await Get("/api/stations?variable=stations.median_c1&from=2003&to=2006&min_days=300&max_residual=0.5");
        Assert.True(body.GetProperty("variable").GetProperty("recomputed").GetBoolean());
        var header = Fixture.Header("seasons.csv");
        int c1 = Array.IndexOf(header, "c1"), res = Array.IndexOf(header, "residual_3"), obs = Array.IndexOf(header, "observed_days");
        var expected = Fixture.Rows("seasons.csv")
            .Where(r => int.Parse(r[1], CultureInfo.InvariantCulture) is >= 2003 and <= 2006 && int.Parse(r[obs], CultureInfo.InvariantCulture) >= 300 && double.Parse(r[res], CultureInfo.InvariantCulture) <= 0.5)
            .GroupBy(r => r[0])
            .ToDictionary(g => g.Key, g => Median(g.Select(r => double.Parse(r[c1], CultureInfo.InvariantCulture)).ToArray()));
        var actual = body.GetProperty("stations").EnumerateArray().ToDictionary(s => s.GetProperty("id").GetString()!, s => s.GetProperty("value").GetDouble());
        Assert.Equal(expected.Keys.Order(StringComparer.Ordinal), actual.Keys.Order(StringComparer.Ordinal));
        Assert.True(actual.Count < Fixture.StationCount);
        foreach (var (id, value) in expected)
        {
            Tolerance.Near(value, actual[id], 1e-9, $"median c1 of {id} (mm, rounding of the JSON writer)");
        }

        static double Median(double[] v)
        {
            Array.Sort(v);
            return v.Length % 2 == 1 ? v[v.Length / 2] : (v[v.Length / 2 - 1] + v[v.Length / 2]) / 2;
        }
    }

    [Fact]
    public async Task A_station_shows_its_facts_trends_and_regression_rows()
    {
        var s = await Get("/api/stations/MF-001");
        Assert.Equal("Fell Top, North", s.GetProperty("name").GetString());
        var cov = Fixture.Rows("covariates.csv").Single(r => r[0] == "MF-001");
        var covHeader = Fixture.Header("covariates.csv");
        Assert.Equal(double.Parse(cov[Array.IndexOf(covHeader, "coast_km")], CultureInfo.InvariantCulture), s.GetProperty("coast_km").GetDouble());
        Assert.Equal(double.Parse(cov[Array.IndexOf(covHeader, "elevation_dem_m")], CultureInfo.InvariantCulture), s.GetProperty("elevation_dem_m").GetDouble());
        Assert.Equal(3 + 7, s.GetProperty("trends").GetArrayLength()); // c1…c3 and the seven metrics
        Assert.Equal(2, s.GetProperty("regression").GetArrayLength());
        var seasons = await Get("/api/stations/MF-001/seasons");
        Assert.Equal(FixtureTests.Seasons, seasons.GetProperty("rows").GetArrayLength());
        Assert.Equal(["season", .. Fixture.Header("seasons.csv").Skip(2)], seasons.GetProperty("columns").EnumerateArray().Select(c => c.GetString()!).ToArray());
    }

    [Fact]
    public async Task The_curve_of_a_season_is_the_mean_plus_the_first_k_components_times_the_coefficients()
    {
        var curve = await Get("/api/stations/MF-002/curve?season=2004");
        var basis = Fixture.Basis.Value;
        var c = Fixture.SeasonRow("MF-002", 2004)!;
        var recon = curve.GetProperty("reconstructions");
        Assert.Equal(SyntheticResults.K, recon.GetArrayLength());
        for (var k = 1; k <= SyntheticResults.K; k++)
        {
            for (var d = 0; d < 365; d += 13)
            {
                var expected = basis.Mean[d] + Enumerable.Range(0, k).Sum(i => c[i] * basis.Components[i][d]);
                Tolerance.Near(expected, recon[k - 1][d].GetDouble(), 1e-4, $"reconstruction k={k} day {d} (mm; rounded to 1e-4 mm in the API)");
            }
        }

        var observed = curve.GetProperty("observed");
        Assert.Equal(365, observed.GetArrayLength());
        Assert.Equal(JsonValueKind.Null, observed[0].ValueKind); // a missing day stays missing
    }

    [Fact]
    public async Task The_basis_is_served_as_read()
    {
        var basis = await Get("/api/basis");
        Assert.Equal(Fixture.Basis.Value.Mean[200], basis.GetProperty("mean")[200].GetDouble());
        Assert.Equal(["amount", "timing", "duration"], basis.GetProperty("labels").EnumerateArray().Select(l => l.GetString()!).ToArray());
    }

    [Fact]
    public async Task The_current_layer_downloads_as_an_RFC_7946_feature_collection()
    {
        using var response = await http.GetAsync("/api/stations.geojson?variable=covariates.coast_km&min_days=300");
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("application/geo+json", response.Content.Headers.ContentType!.MediaType);
        Assert.Contains("stations_covariates_coast_km.geojson", response.Content.Headers.ContentDisposition!.ToString(), StringComparison.Ordinal);
        using var doc = JsonDocument.Parse(await response.Content.ReadAsStringAsync());
        Assert.Equal("FeatureCollection", doc.RootElement.GetProperty("type").GetString());
        var list = await Get("/api/stations?variable=covariates.coast_km&min_days=300");
        Assert.Equal(list.GetProperty("count").GetInt32(), doc.RootElement.GetProperty("features").GetArrayLength());
        var first = doc.RootElement.GetProperty("features")[0];
        Assert.Equal("Point", first.GetProperty("geometry").GetProperty("type").GetString());
        Assert.Equal(list.GetProperty("stations")[0].GetProperty("lon").GetDouble(), first.GetProperty("geometry").GetProperty("coordinates")[0].GetDouble());
    }

    [Fact]
    public async Task Layers_are_served_with_their_media_types_and_unknown_layers_are_404()
    {
        using var coast = await http.GetAsync("/api/layers/coastline.geojson");
        Assert.Equal(HttpStatusCode.OK, coast.StatusCode);
        Assert.Equal("application/geo+json", coast.Content.Headers.ContentType!.MediaType);
        Assert.Equal(File.ReadAllBytes(TestData.Path("results", "layers", "coastline.geojson")), await coast.Content.ReadAsByteArrayAsync());
        using var hill = await http.GetAsync("/api/layers/hillshade.png");
        Assert.Equal("image/png", hill.Content.Headers.ContentType!.MediaType);
        Assert.Equal(HttpStatusCode.NotFound, (await Status("/api/layers/hillshade.json")).Status);
        Assert.Equal(HttpStatusCode.NotFound, (await Status("/api/layers/stations.geojson")).Status);
    }

    [Theory]
    [InlineData("/api/stations/NO-SUCH")]
    [InlineData("/api/stations/NO-SUCH/seasons")]
    [InlineData("/api/stations/NO-SUCH/curve?season=2004")]
    [InlineData("/api/stations/MF-001/curve?season=1850")]
    [InlineData("/no/such/page")]
    public async Task Unknown_stations_seasons_and_addresses_are_404_with_a_short_message(string url)
    {
        var (status, body) = await Status(url);
        Assert.Equal(HttpStatusCode.NotFound, status);
        Assert.StartsWith("{\"error\":", body, StringComparison.Ordinal);
        Assert.True(body.Length < 120, body);
    }

    [Theory]
    [InlineData("/api/stations?variable=nope")]
    [InlineData("/api/stations?colour=red")]
    [InlineData("/api/stations?from=abc")]
    [InlineData("/api/stations?from=1e99")]
    [InlineData("/api/stations?from=2008&to=2001")]
    [InlineData("/api/stations?min_days=-1")]
    [InlineData("/api/stations?min_days=366")]
    [InlineData("/api/stations?max_residual=NaN")]
    [InlineData("/api/stations?max_residual=-0.1")]
    [InlineData("/api/stations?variable=stations.median_c1&variable=stations.median_c2")]
    [InlineData("/api/stations?variable=%zz")]
    [InlineData("/api/stations?variable=%C3%28")]
    [InlineData("/api/stations?%00=1")]
    [InlineData("/api/stations/MF-001/curve")]
    [InlineData("/api/stations/MF-001/curve?season=2004.5")]
    [InlineData("/api/stations/MF-001/curve?season=2004&k=2")]
    [InlineData("/api/meta?x=1")]
    [InlineData("/?debug=1")]
    public async Task Bad_parameters_are_400_with_a_short_message(string url)
    {
        var (status, body) = await Status(url);
        Assert.Equal(HttpStatusCode.BadRequest, status);
        Assert.Contains("\"error\":", body, StringComparison.Ordinal);
        Assert.True(body.Length < 200, body);
    }

    [Fact]
    public async Task A_long_query_string_is_400()
    {
        Assert.Equal(HttpStatusCode.BadRequest, (await Status("/api/stations?variable=" + new string('a', 5000))).Status);
        Assert.Equal(HttpStatusCode.BadRequest, (await Status("/api/stations?variable=" + new string('a', 200_000))).Status);
    }

    [Fact]
    public async Task Anything_but_GET_is_refused()
    {
        using var post = await http.PostAsync("/api/stations", new StringContent("x"));
        Assert.Equal(HttpStatusCode.MethodNotAllowed, post.StatusCode);
        using var delete = await http.DeleteAsync("/api/layers/coastline.geojson");
        Assert.Equal(HttpStatusCode.MethodNotAllowed, delete.StatusCode);
    }

    [Fact]
    public async Task A_foreign_Host_header_is_refused()
    {
        using var request = new HttpRequestMessage(HttpMethod.Get, "/api/meta");
        request.Headers.Host = "attacker.example";
        using var response = await http.SendAsync(request);
        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
    }

    [Fact]
    public async Task A_thousand_requests_in_a_bounded_loop_all_succeed()
    {
        string[] urls = ["/api/meta", "/api/stations?variable=stations.median_c1", "/api/stations/MF-007", "/api/stations/MF-007/seasons", "/api/layers/coastline.geojson"];
        var failures = 0;
        for (var i = 0; i < 1000; i++)
        {
            using var response = await http.GetAsync(urls[i % urls.Length]);
            await response.Content.ReadAsByteArrayAsync();
            failures += response.IsSuccessStatusCode ? 0 : 1;
        }

        Assert.Equal(0, failures);
    }
}

public sealed class CurveWithoutReaderTests
{
    [Fact]
    public async Task Without_a_season_matrix_reader_the_curve_has_no_observed_days_and_says_why()
    {
        await using var server = await ViewerServer.StartAsync(new ViewerOptions(ServerFixture.ResultsFolder));
        using var http = new HttpClient { BaseAddress = server.Uri };
        using var doc = JsonDocument.Parse(await http.GetStringAsync("/api/stations/MF-002/curve?season=2004"));
        Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("observed").ValueKind);
        Assert.Equal("no season-matrix reader was given to the viewer", doc.RootElement.GetProperty("observed_note").GetString());
        Assert.Equal(SyntheticResults.K, doc.RootElement.GetProperty("reconstructions").GetArrayLength());
    }

    [Fact]
    public async Task A_reader_that_fails_leaves_the_reconstruction_and_says_the_matrix_cannot_be_read()
    {
        await using var server = await ViewerServer.StartAsync(new ViewerOptions(ServerFixture.ResultsFolder, 0, (_, _) => throw new IOException("disk gone")));
        using var http = new HttpClient { BaseAddress = server.Uri };
        var text = await http.GetStringAsync("/api/stations/MF-002/curve?season=2004");
        Assert.Contains("\"observed_note\":\"the season matrix cannot be read\"", text, StringComparison.Ordinal);
        Assert.DoesNotContain("disk gone", text, StringComparison.Ordinal);
    }
}

using System.Globalization;
using System.Text.Json;
using Microsoft.Playwright;
using Xunit;
using Xunit.Abstractions;

namespace Spatial.Viewer.Tests;

/// <summary>The map page in a real headless Chromium: few, fast checks sharing one browser.</summary>
[Collection(SharedBrowser.Name)]
public sealed class BrowserTests(BrowserFixture fixture, ITestOutputHelper output)
{
    private async Task<(IPage Page, List<string> Errors)> Open(string query = "")
    {
        var page = await fixture.Context!.NewPageAsync();
        var errors = new List<string>();
        page.Console += (_, m) =>
        {
            if (m.Type is "error" or "warning")
            {
                errors.Add($"console {m.Type}: {m.Text}");
            }
        };
        page.PageError += (_, e) => errors.Add("page error: " + e);
        page.RequestFailed += (_, r) => errors.Add("request failed: " + r.Url);
        await page.GotoAsync(fixture.Server.Uri + query);
        await page.WaitForSelectorAsync("html[data-ready='1']", new() { Timeout = 30_000, State = WaitForSelectorState.Attached });
        return (page, errors);
    }

    private bool Skip()
    {
        if (fixture.Context is null)
        {
            output.WriteLine("skipped: " + fixture.SkipReason);
            return true;
        }

        return false;
    }

    /// <summary>Writes a screenshot into the test output folder (artifacts/), for people to look at.</summary>
    private async Task Shot(IPage page, string name)
    {
        var folder = Path.Combine(AppContext.BaseDirectory, "artifacts");
        Directory.CreateDirectory(folder);
        var shot = Path.Combine(folder, name);
        await page.ScreenshotAsync(new() { Path = shot });
        output.WriteLine("screenshot: " + shot);
        Assert.True(new FileInfo(shot).Length > 10_000, "the screenshot is nearly empty");
    }

    private async Task<JsonElement> Api(string url)
    {
        using var http = new HttpClient { BaseAddress = fixture.Server.Uri };
        return JsonDocument.Parse(await http.GetStringAsync(url)).RootElement.Clone();
    }

    [Fact]
    public async Task The_page_loads_without_console_errors_and_draws_one_mark_per_station_of_the_layer()
    {
        if (Skip())
        {
            return;
        }

        var (page, errors) = await Open();
        var layer = await Api("/api/stations?variable=" + await page.InputValueAsync("#variable"));
        var marks = page.Locator("#g-stations circle[data-station]");
        Assert.Equal(layer.GetProperty("count").GetInt32(), await marks.CountAsync());
        Assert.Equal(Fixture.StationCount, await marks.CountAsync());
        foreach (var s in layer.GetProperty("stations").EnumerateArray().Take(10))
        {
            var mark = page.Locator($"#g-stations circle[data-station='{s.GetProperty("id").GetString()}']");
            var value = await mark.GetAttributeAsync("data-value");
            if (s.GetProperty("value").ValueKind == JsonValueKind.Null)
            {
                Assert.Equal(string.Empty, value);
            }
            else
            {
                Assert.Equal(s.GetProperty("value").GetDouble(), double.Parse(value!, CultureInfo.InvariantCulture));
            }
        }

        Assert.Equal(1, await page.Locator("#g-coast path").CountAsync());
        Assert.Equal(1, await page.Locator("#g-hill image").CountAsync());
        await Shot(page, "viewer-map.png");
        Assert.Empty(errors);
        await page.CloseAsync();
    }

    [Fact]
    public async Task Changing_the_variable_changes_the_colours_and_the_legend()
    {
        if (Skip())
        {
            return;
        }

        var (page, errors) = await Open();
        await page.SelectOptionAsync("#variable", "stations.median_onset_day");
        await page.WaitForSelectorAsync("#legend[data-variable='stations.median_onset_day']");
        var fillsBefore = await page.EvalOnSelectorAllAsync<string[]>("#g-stations circle", "cs => cs.map(c => c.getAttribute('fill') || 'none')");
        var legendBefore = await page.InnerTextAsync("#legend");
        Assert.Equal("fellside", await page.GetAttributeAsync("#legend", "data-scale"));
        Assert.Contains("day of season", legendBefore, StringComparison.Ordinal);

        await page.SelectOptionAsync("#variable", "stations.sen_per_decade_c1");
        await page.WaitForSelectorAsync("#legend[data-variable='stations.sen_per_decade_c1']");
        var fillsAfter = await page.EvalOnSelectorAllAsync<string[]>("#g-stations circle", "cs => cs.map(c => c.getAttribute('fill') || 'none')");
        var legendAfter = await page.InnerTextAsync("#legend");
        Assert.Equal("thaw-frost", await page.GetAttributeAsync("#legend", "data-scale"));
        Assert.Contains("per decade", legendAfter, StringComparison.Ordinal);
        Assert.NotEqual(legendBefore, legendAfter);
        Assert.True(fillsBefore.Zip(fillsAfter).Count(p => p.First != p.Second) > fillsBefore.Length / 2, "most marks should change colour");
        Assert.Empty(errors);
        await page.CloseAsync();
    }

    [Fact]
    public async Task Filters_keyboard_zoom_and_the_download_link_follow_the_controls()
    {
        if (Skip())
        {
            return;
        }

        var (page, errors) = await Open();

        // The first control in tab order is the variable chooser; the arrow keys change it.
        await page.Keyboard.PressAsync("Tab");
        Assert.Equal("variable", await page.EvaluateAsync<string>("() => document.activeElement.id"));
        await page.FillAsync("#min-days", "300");
        await page.FillAsync("#from", "2004");
        var expected = await Api("/api/stations?variable=stations.median_c1&from=2004&min_days=300");
        await Assertions.Expect(page.Locator("#g-stations circle")).ToHaveCountAsync(expected.GetProperty("count").GetInt32());
        Assert.Contains("min_days=300", await page.GetAttributeAsync("#download", "href"), StringComparison.Ordinal);
        await page.ClickAsync("#clear-filters");
        await Assertions.Expect(page.Locator("#g-stations circle")).ToHaveCountAsync(Fixture.StationCount);

        var before = await page.GetAttributeAsync("#map", "viewBox");
        await page.FocusAsync("#map");
        await page.Keyboard.PressAsync("+");
        var zoomed = await page.GetAttributeAsync("#map", "viewBox");
        Assert.NotEqual(before, zoomed);
        await page.Keyboard.PressAsync("ArrowLeft");
        Assert.NotEqual(zoomed, await page.GetAttributeAsync("#map", "viewBox"));
        await page.Keyboard.PressAsync("0");
        Assert.Equal(before, await page.GetAttributeAsync("#map", "viewBox"));

        // Wheel zooms about the pointer; a drag pans and opens no station.
        var box = (await page.Locator("#map").BoundingBoxAsync())!;
        await page.Mouse.MoveAsync(box.X + 30, box.Y + 30);
        await page.Mouse.WheelAsync(0, -400);
        await Assertions.Expect(page.Locator("#map")).Not.ToHaveAttributeAsync("viewBox", before!);
        var wheeled = await page.GetAttributeAsync("#map", "viewBox");
        await page.Mouse.DownAsync();
        await page.Mouse.MoveAsync(box.X + 130, box.Y + 90, new() { Steps = 5 });
        await page.Mouse.UpAsync();
        Assert.NotEqual(wheeled, await page.GetAttributeAsync("#map", "viewBox"));
        Assert.True(await page.Locator("#panel").IsHiddenAsync());
        Assert.Empty(errors);
        await page.CloseAsync();
    }

    [Fact]
    public async Task Clicking_a_station_opens_its_panel_with_a_chart_and_a_screenshot_is_kept()
    {
        if (Skip())
        {
            return;
        }

        var (page, errors) = await Open();
        await page.SelectOptionAsync("#underlay", "predicted_median_c1");
        await page.HoverAsync("#g-stations circle[data-station='MF-003']", new() { Force = true });
        var tip = await page.InnerTextAsync("#tooltip");
        Assert.Contains("<b>Skerry</b> Point (MF-003)", tip, StringComparison.Ordinal); // markup in a name is shown as text
        await page.ClickAsync("#g-stations circle[data-station='MF-001']", new() { Force = true });
        await page.WaitForSelectorAsync("#panel[data-station='MF-001']");
        await page.WaitForSelectorAsync("#chart path[data-series='reconstruction']");
        Assert.Contains("Fell Top, North", await page.InnerTextAsync("#panel-title"), StringComparison.Ordinal);
        Assert.Equal(FixtureTests.Seasons, await page.Locator("#panel-seasons tbody tr").CountAsync());
        Assert.Equal(1, await page.Locator("#chart path[data-series='observed']").CountAsync());
        Assert.Equal(1, await page.Locator("#chart path[data-series='mean']").CountAsync());
        var full = await page.GetAttributeAsync("#chart path[data-series='reconstruction']", "d");
        await page.FillAsync("#k", "1");
        await page.DispatchEventAsync("#k", "input");
        Assert.NotEqual(full, await page.GetAttributeAsync("#chart path[data-series='reconstruction']", "d"));
        await page.FillAsync("#k", "3");
        await page.DispatchEventAsync("#k", "input");
        Assert.Contains("Mann-Kendall", await page.InnerTextAsync("#panel-trends"), StringComparison.Ordinal);

        await Shot(page, "viewer-station-panel.png");
        Assert.Empty(errors);
        await page.CloseAsync();
    }
}

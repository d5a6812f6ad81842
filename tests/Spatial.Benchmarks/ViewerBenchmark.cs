using System.Globalization;
using Microsoft.Playwright;
using Spatial.Viewer;
using Spatial.Viewer.Tests;

namespace Spatial.Benchmarks;

/// <summary>
/// First complete render of the map page with 10,000 stations in headless Debian Chromium (driven by
/// Playwright, never a downloaded browser), beside the same page with 100 stations measured in the same run.
/// The figure is the page's own mark: milliseconds from navigation start to the animation frame after the
/// station marks were drawn (<c>html[data-render-ms]</c>), which includes fetching the page, the metadata,
/// the layers and the station list from the local server.
/// Usage: <c>dotnet run -c Release --project tests/Spatial.Benchmarks -- viewer [repeats]</c>; set
/// <c>SPATIAL_BENCH_VERBOSE=1</c> for each render's breakdown and <c>SPATIAL_BENCH_SCREENSHOT=FILE.png</c> to keep a
/// screenshot of the 10,000-station page.
/// </summary>
public sealed class ViewerBenchmark : IBenchmark
{
    public string Name => "viewer";

    public string Description => "map page first render, 10,000 stations vs 100 (headless chromium)";

    public void Run(BenchReport report, string[] args) => RunAsync(report, args).GetAwaiter().GetResult();

    private static async Task RunAsync(BenchReport report, string[] args)
    {
        ArgumentNullException.ThrowIfNull(report);
        var repeats = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 5;
        var chromium = (Environment.GetEnvironmentVariable("PATH") ?? string.Empty).Split(Path.PathSeparator)
            .Where(d => d.Length > 0).Select(d => Path.Combine(d, "chromium")).FirstOrDefault(File.Exists);
        if (chromium is null)
        {
            report.Line("  chromium is not installed (Debian: apt-get install chromium); nothing measured.");
            return;
        }

        var root = Path.Combine(Path.GetTempPath(), "spatial-bench-viewer-" + Guid.NewGuid().ToString("N"));
        try
        {
            var big = Path.Combine(root, "big");
            var small = Path.Combine(root, "small");
            SyntheticResults.Write(big, 10_000, 3, seed: 10);
            SyntheticResults.Write(small, 100, 3, seed: 10);
            await using var bigServer = await ViewerServer.StartAsync(new ViewerOptions(big));
            await using var smallServer = await ViewerServer.StartAsync(new ViewerOptions(small));
            using var playwright = await Playwright.CreateAsync();
            await using var context = await playwright.Chromium.LaunchPersistentContextAsync(Path.Combine(root, "profile"), new BrowserTypeLaunchPersistentContextOptions
            {
                ExecutablePath = chromium,
                Headless = true,
                Args = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
                ViewportSize = new ViewportSize { Width = 1400, Height = 900 },
            });

            // One warm-up of each (JIT of the server, browser caches of nothing: the API sends no-store).
            await Render(context, smallServer.Uri, 100);
            await Render(context, bigServer.Uri, 10_000);
            var smallMs = new List<double>();
            var bigMs = new List<double>();
            for (var i = 0; i < repeats; i++)
            {
                smallMs.Add(await Render(context, smallServer.Uri, 100));
                bigMs.Add(await Render(context, bigServer.Uri, 10_000));
            }

            smallMs.Sort();
            bigMs.Sort();
            report.Figure("baseline: 100 stations, best first render", smallMs[0], "ms");
            report.Figure("baseline: 100 stations, median first render", smallMs[smallMs.Count / 2], "ms");
            report.Figure("10,000 stations, best first render", bigMs[0], "ms");
            report.Figure("10,000 stations, median first render", bigMs[bigMs.Count / 2], "ms");
            report.Figure("10,000 stations, worst first render", bigMs[^1], "ms");
            report.Figure("ratio 10,000 / 100 stations (median)", bigMs[bigMs.Count / 2] / smallMs[smallMs.Count / 2], "x");
            report.Line(bigMs[^1] < 1000 ? "  target met: every 10,000-station render under 1 s" : "  target missed: a 10,000-station render took 1 s or more");
        }
        finally
        {
            try
            {
                Directory.Delete(root, recursive: true);
            }
            catch (IOException)
            {
                // Temporary folder; the browser may hold a lock file for a moment.
            }
        }
    }

    private static bool Verbose => Environment.GetEnvironmentVariable("SPATIAL_BENCH_VERBOSE") == "1";

    private static async Task<double> Render(IBrowserContext context, Uri uri, int stations)
    {
        var page = await context.NewPageAsync();
        try
        {
            await page.GotoAsync(uri.ToString());
            await page.WaitForSelectorAsync("html[data-ready='1']", new() { State = WaitForSelectorState.Attached, Timeout = 60_000 });
            var marks = await page.Locator("#g-stations circle[data-station]").CountAsync();
            if (marks != stations)
            {
                throw new InvalidOperationException($"the page drew {marks} station marks, expected {stations}");
            }

            var ms = await page.GetAttributeAsync("html", "data-render-ms");
            if (Environment.GetEnvironmentVariable("SPATIAL_BENCH_SCREENSHOT") is { Length: > 0 } shot && stations == 10_000)
            {
                await page.ScreenshotAsync(new() { Path = Path.GetFullPath(shot) });
            }

            if (Verbose)
            {
                Console.WriteLine($"    {stations} stations: render {ms} ms (station list fetched in {await page.GetAttributeAsync("html", "data-fetch-ms")} ms, drawn in {await page.GetAttributeAsync("html", "data-draw-ms")} ms)");
            }

            return double.Parse(ms!, CultureInfo.InvariantCulture);
        }
        finally
        {
            await page.CloseAsync();
        }
    }
}

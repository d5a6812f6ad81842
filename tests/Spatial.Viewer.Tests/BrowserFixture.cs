using Microsoft.Playwright;
using Spatial.Testing;
using Xunit;

namespace Spatial.Viewer.Tests;

/// <summary>
/// One headless Debian Chromium (never a downloaded browser) driven by Playwright, with a fresh user-data
/// folder, shared by every browser test; plus one viewer over the committed invented results folder.
/// <see cref="Context"/> is null (and the tests return early) when chromium is not installed and CI does not demand it.
/// </summary>
public sealed class BrowserFixture : IAsyncLifetime
{
    private IPlaywright? playwright;
    private string? profile;

    public IBrowserContext? Context { get; private set; }

    public ViewerServer Server { get; private set; } = null!;

    public string SkipReason { get; private set; } = string.Empty;

    /// <summary>Launch arguments: no network beyond loopback use, no GPU, no sandbox (containers), no first-run chores.</summary>
    internal static readonly string[] ChromiumArgs = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

    public async Task InitializeAsync()
    {
        Server = await ViewerServer.StartAsync(new ViewerOptions(ServerFixture.ResultsFolder, 0, ServerFixture.ObservedCurve));
        var chromium = ExternalTool.Locate("chromium", out var why);
        if (chromium is null)
        {
            SkipReason = why;
            return;
        }

        playwright = await Playwright.CreateAsync();
        profile = TestData.NewScratchFolder("chromium-profile");
        Context = await playwright.Chromium.LaunchPersistentContextAsync(profile, new BrowserTypeLaunchPersistentContextOptions
        {
            ExecutablePath = chromium,
            Headless = true,
            Args = ChromiumArgs,
            ViewportSize = new ViewportSize { Width = 1400, Height = 900 },
            Timeout = 60_000,
        });
    }

    public async Task DisposeAsync()
    {
        if (Context is not null)
        {
            await Context.CloseAsync();
        }

        playwright?.Dispose();
        await Server.DisposeAsync();
        if (profile is not null)
        {
            try
            {
                Directory.Delete(profile, recursive: true);
            }
            catch (IOException)
            {
                // The browser may still hold a lock file for a moment; the folder is under the temp folder.
            }
        }
    }
}

[CollectionDefinition(Name)]
public sealed class SharedBrowser : ICollectionFixture<BrowserFixture>
{
    public const string Name = "browser";
}

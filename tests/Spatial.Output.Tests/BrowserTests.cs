using System.Diagnostics;
using Spatial.Core;
using Spatial.Output.Report;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class BrowserTests
{
    [Fact]
    public async Task Chromium_loads_the_report_offline_and_its_DOM_holds_every_section_and_image()
    {
        var chromium = ExternalTool.Locate("chromium", out var why);
        if (chromium is null)
        {
            Console.WriteLine(why);
            return;
        }

        var dir = TestData.NewScratchFolder("browser");
        var path = Path.Combine(dir, "report.html");
        ReportBuilder.Write(Fixtures.Results(), path, new ReportOptions(Surfaces: new Dictionary<string, RasterGrid> { ["median_c1"] = Fixtures.Surface() }));

        // Headless Chromium with every host name unresolvable: the page must still load in full (it needs no network).
        var psi = new ProcessStartInfo(chromium) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        foreach (var a in new[] { "--headless", "--no-sandbox", "--disable-gpu", "--host-resolver-rules=MAP * ~NOTFOUND", $"--user-data-dir={Path.Combine(dir, "profile")}", "--dump-dom", new Uri(path).AbsoluteUri })
        {
            psi.ArgumentList.Add(a);
        }

        using var p = Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        _ = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(TimeSpan.FromSeconds(90)))
        {
            p.Kill(entireProcessTree: true);
            Assert.Fail("chromium did not finish within 90 s");
        }

        var dom = await stdout;
        foreach (var id in ReportBuilder.Sections)
        {
            Assert.Contains($"<section id=\"{id}\">", dom, StringComparison.Ordinal);
        }

        Assert.Contains("<img src=\"data:image/png;base64,", dom, StringComparison.Ordinal);
        Assert.Contains("<svg", dom, StringComparison.Ordinal);
        Directory.Delete(dir, true);
    }
}

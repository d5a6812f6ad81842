using System.Text.Json;
using System.Xml.Linq;
using Xunit;

namespace Spatial.Cli.Tests;

public sealed class ReportVerbTests
{
    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    [Fact]
    public void Report_writes_one_well_formed_HTML_file_with_every_section()
    {
        var dir = ExportVerbTests.SmallResults();
        var outPath = Path.Combine(dir, "out", "r.html");
        var (code, stdout, stderr) = Run("report", dir, "--out", outPath, "--title", "Marrowfell test", "--json");
        Assert.True(code == 0, stderr);
        using var summary = JsonDocument.Parse(stdout);
        Assert.Equal(11, summary.RootElement.GetProperty("Sections").GetArrayLength());
        var doc = XDocument.Parse(File.ReadAllText(outPath).Replace("<!DOCTYPE html>", string.Empty, StringComparison.Ordinal));
        XNamespace x = "http://www.w3.org/1999/xhtml";
        Assert.Equal("Marrowfell test", doc.Descendants(x + "title").Single().Value);
        Assert.Equal(11, doc.Descendants(x + "section").Count());
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Report_can_also_write_its_maps_and_plots_as_figure_files()
    {
        var dir = ExportVerbTests.SmallResults();
        var figures = Path.Combine(dir, "figures");
        var (code, _, stderr) = Run("report", dir, "--figures", figures);
        Assert.True(code == 0, stderr);

        // The small folder has no basis.json (so no component labels) but a trend per station: its map as SVG and PNG.
        Assert.Equal(["map_sen_per_decade_c1.png", "map_sen_per_decade_c1.svg"], Directory.GetFiles(figures).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Report_defaults_to_report_html_in_the_results_folder()
    {
        var dir = ExportVerbTests.SmallResults();
        var (code, stdout, stderr) = Run("report", dir);
        Assert.True(code == 0, stderr);
        Assert.True(File.Exists(Path.Combine(dir, "report.html")));
        Assert.Contains("report.html", stdout, StringComparison.Ordinal);
        Directory.Delete(dir, true);
    }

    [Fact]
    public void Report_with_a_missing_coastline_file_is_a_data_error_and_writes_nothing()
    {
        var dir = ExportVerbTests.SmallResults();
        var (code, _, stderr) = Run("report", dir, "--coast", Path.Combine(dir, "nope.geojson"));
        Assert.Equal(1, code);
        Assert.Contains("nope.geojson", stderr, StringComparison.Ordinal);
        Assert.False(File.Exists(Path.Combine(dir, "report.html")));
        Directory.Delete(dir, true);
    }
}

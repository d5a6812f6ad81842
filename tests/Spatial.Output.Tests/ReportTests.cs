using System.Text.RegularExpressions;
using System.Xml.Linq;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Output.Report;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class ReportTests
{
    private static readonly XNamespace X = "http://www.w3.org/1999/xhtml";

    private static string FullReport()
    {
        var curve = Enumerable.Range(0, 365).Select(d => d is > 70 and < 250 && d % 9 != 0 ? 400.0 * Math.Sin(Math.PI * (d - 70) / 180) : double.NaN).ToArray();
        var options = new ReportOptions(
            Dem: Fixtures.ConeDem(),
            Surfaces: new Dictionary<string, RasterGrid> { ["median_c1"] = Fixtures.Surface() },
            Reconstructions: [new SeasonCurve("MF02", 2016, curve)]);
        return ReportBuilder.Build(Fixtures.Results(), options).Html;
    }

    private static XDocument Parse(string html) => XDocument.Parse(html.Replace("<!DOCTYPE html>", string.Empty, StringComparison.Ordinal));

    [Fact]
    public void Report_is_well_formed_markup_with_every_section()
    {
        var doc = Parse(FullReport());
        var ids = doc.Descendants(X + "section").Select(s => (string)s.Attribute("id")!).ToList();
        Assert.Equal(ReportBuilder.Sections, ids);
        foreach (var section in doc.Descendants(X + "section"))
        {
            Assert.NotNull(section.Element(X + "h2"));
        }
    }

    [Fact]
    public void Report_makes_no_network_requests()
    {
        var html = FullReport();
        var doc = Parse(html);
        foreach (var a in doc.Descendants().Attributes().Where(a => a.Name.LocalName is "src" or "href" or "srcset" or "action" or "poster" or "data"))
        {
            Assert.True(a.Value.StartsWith("data:", StringComparison.Ordinal) || a.Value.StartsWith('#'), $"{a.Parent!.Name.LocalName} {a.Name}={a.Value[..Math.Min(60, a.Value.Length)]}");
        }

        Assert.Empty(doc.Descendants(X + "link"));
        Assert.Empty(doc.Descendants(X + "script"));
        Assert.Empty(doc.Descendants(X + "iframe"));
        Assert.DoesNotMatch(new Regex("url\\((?!\"?data:)", RegexOptions.IgnoreCase), html);
        Assert.DoesNotContain("@import", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Report_holds_the_caution_the_residual_definition_provenance_hashes_and_print_styles()
    {
        var html = FullReport();
        Assert.Contains("Results support, and do not replace, the judgement of qualified hydrologists and avalanche professionals; defer to local codes and practice.", html, StringComparison.Ordinal);
        Assert.Contains("residual_k = √(Σ over observed days of (x − mean − Σ_{i≤k} c_i v_i)²)", html, StringComparison.Ordinal);
        Assert.Contains(string.Concat(Enumerable.Repeat("9f", 32)), html, StringComparison.Ordinal); // records.csv hash as manifest.json gives it
        Assert.Contains(Sha256File.Of(TestData.Path("results", "seasons.csv")), html, StringComparison.Ordinal);
        Assert.Contains("@media print", html, StringComparison.Ordinal);
    }

    [Fact]
    public void Report_embeds_maps_plots_and_surfaces_from_the_full_results_folder()
    {
        var result = ReportBuilder.Build(Fixtures.Results(), new ReportOptions(Surfaces: new Dictionary<string, RasterGrid> { ["median_c1"] = Fixtures.Surface() })).Result;
        var doc = Parse(FullReport());
        var maps = doc.Descendants(XName.Get("svg", "http://www.w3.org/2000/svg")).Count(s => s.Descendants(XName.Get("circle", "http://www.w3.org/2000/svg")).Any());
        Assert.True(maps >= 5, $"{maps} maps");

        // Two models × (residual vs fitted, QQ, two partial-residual plots) + variance + components + 1 reconstruction.
        Assert.Equal(11, doc.Descendants(X + "img").Count(i => ((string?)i.Attribute("src"))!.StartsWith("data:image/png", StringComparison.Ordinal) && (string?)i.Attribute("class") != "surface"));
        Assert.Single(doc.Descendants(X + "img"), i => (string?)i.Attribute("class") == "surface");
        Assert.True(result.Figures > 10);
    }

    [Fact]
    public void A_folder_with_only_a_station_list_still_gives_every_section_with_notes()
    {
        var src = Fixtures.ResultsWithout("basis.json", "seasons.csv", "stations.csv", "covariates.csv", "interpretation.json", "quality.json", "manifest.json", "regression/regression.json", "regression/fitted.csv", "regression/local.csv", "coastline.geojson");
        var (html, result) = ReportBuilder.Build(ResultsFolder.Open(src), new ReportOptions());
        var doc = Parse(html);
        Assert.Equal(ReportBuilder.Sections, doc.Descendants(X + "section").Select(s => (string)s.Attribute("id")!).ToList());
        Assert.Contains(result.Notes, n => n.Contains("basis.json", StringComparison.Ordinal));
        Assert.Contains(result.Notes, n => n.Contains("regression.json", StringComparison.Ordinal));
        Directory.Delete(src, true);
    }

    [Fact]
    public void Figures_folder_gets_every_map_and_plot_of_the_report_as_two_files()
    {
        var dir = TestData.NewScratchFolder("figures");
        var result = ReportBuilder.Build(Fixtures.Results(), new ReportOptions(FiguresDir: dir)).Result;

        // Every map and plot twice (SVG + PNG); no surfaces were given, so figures = maps + plots.
        Assert.Equal(2 * result.Figures, Directory.GetFiles(dir).Length);
        Assert.Equal(result.FigureFiles.Order(StringComparer.Ordinal), Directory.GetFiles(dir).Select(Path.GetFileName).Order(StringComparer.Ordinal));
        Assert.Contains("map_median_c1.svg", result.FigureFiles);
        Directory.Delete(dir, true);
    }

    [Fact]
    public void North_errors_on_the_eigenvalue_scale_become_fractions_of_the_variance()
    {
        // basis.json of the invented folder: λ1 = 52000, fraction 0.78, δλ1 = 7350 → 7350 × 0.78 / 52000 = 0.11025.
        var e = ReportBuilder.ErrorFraction([0.78], [52000], [7350]);
        Tolerance.Near(0.11025, e[0], 1e-12, "North error as a fraction");
    }
}

using Xunit;

namespace Spatial.Output.Tests;

public sealed class PublicApiTests
{
    [Fact]
    public void Public_surface_is_the_listed_types_only()
    {
        // Snapshot of the public surface (STYLE.md habit 3): a change here is a change for the Cli, Viewer and demo.
        string[] expected =
        [
            "Spatial.Output.Colour.ColourScale", "Spatial.Output.Colour.OkLab", "Spatial.Output.Colour.OkLabConvert", "Spatial.Output.Colour.Rgb8",
            "Spatial.Output.ExportOptions", "Spatial.Output.ExportResult", "Spatial.Output.LayerExport", "Spatial.Output.LayerFormats",
            "Spatial.Output.Maps.MapOptions", "Spatial.Output.Maps.MapRenderer",
            "Spatial.Output.Plots.Figure", "Spatial.Output.Plots.PlotFactory",
            "Spatial.Output.Raster.GeoBounds", "Spatial.Output.Raster.Hillshade",
            "Spatial.Output.Report.ReportBuilder", "Spatial.Output.Report.ReportOptions", "Spatial.Output.Report.ReportResult", "Spatial.Output.Report.SeasonCurve",
            "Spatial.Output.ResultsFolder",
        ];
        var actual = typeof(LayerExport).Assembly.GetExportedTypes().Select(t => t.FullName!).Order(StringComparer.Ordinal).ToArray();
        Assert.Equal(expected, actual);
    }
}

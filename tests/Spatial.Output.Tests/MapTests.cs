using System.Xml.Linq;
using SkiaSharp;
using Spatial.Core;
using Spatial.Output.Maps;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class MapTests
{
    private static readonly XNamespace SvgNs = "http://www.w3.org/2000/svg";

    [Fact]
    public void Svg_map_is_well_formed_with_every_station_a_legend_with_units_a_scale_bar_and_a_north_arrow()
    {
        var svg = MapRenderer.Svg(Fixtures.Results(), new MapOptions("median_peak_depth_mm", Dem: Fixtures.ConeDem()));
        var doc = XDocument.Parse(svg);
        var texts = doc.Descendants(SvgNs + "text").Select(t => t.Value).ToList();

        // Six stations in the invented folder, each a circle of radius 6.5 (known values) or 5 (unknown).
        Assert.Equal(6, doc.Descendants(SvgNs + "circle").Count(c => (string?)c.Attribute("r") is "6.5" or "5") - 1);
        Assert.Contains("mm", texts);
        Assert.Contains("N", texts);
        Assert.Contains(texts, t => t.EndsWith(" km", StringComparison.Ordinal));
        Assert.Contains(texts, t => t.StartsWith("WGS 84 / UTM zone 29N", StringComparison.Ordinal));
        Assert.Single(doc.Descendants(SvgNs + "image"));
        Assert.DoesNotContain("http://", svg.Replace("http://www.w3.org/2000/svg", string.Empty, StringComparison.Ordinal), StringComparison.Ordinal);
    }

    [Fact]
    public void Png_map_draws_visible_text_in_the_title_area()
    {
        var png = MapRenderer.Png(Fixtures.Results(), new MapOptions("median_c1"));
        using var bitmap = SKBitmap.Decode(png);
        Assert.Equal(900, bitmap.Width);

        // The title band (y 10…34, x 16…200) is white except for glyphs: a font must have drawn dark pixels there.
        var dark = 0;
        for (var y = 10; y < 34; y++)
        {
            for (var x = 16; x < 200; x++)
            {
                if (bitmap.GetPixel(x, y).Red < 100)
                {
                    dark++;
                }
            }
        }

        Assert.True(dark > 100, $"only {dark} dark pixels in the title band: text is not rendering (a font-less native SkiaSharp?)");
    }

    [Fact]
    public void Scale_bar_length_is_a_round_number_of_kilometres()
    {
        Assert.Equal(5000, MapRenderer.NiceStep(7321));
        Assert.Equal(2000, MapRenderer.NiceStep(2000));
        Assert.Equal(10, MapRenderer.NiceStep(19.9));
    }

    [Fact]
    public void A_text_column_cannot_be_mapped_and_says_which_can()
    {
        var e = Assert.Throws<SpatialDataException>(() => MapRenderer.Svg(Fixtures.Results(), new MapOptions("name")));
        Assert.Contains("median_c1", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Same_inputs_draw_byte_identical_maps()
    {
        var o = new MapOptions("sen_per_decade_c1", Dem: Fixtures.ConeDem());
        Assert.Equal(MapRenderer.Png(Fixtures.Results(), o), MapRenderer.Png(Fixtures.Results(), o));
        Assert.Equal(MapRenderer.Svg(Fixtures.Results(), o), MapRenderer.Svg(Fixtures.Results(), o));
        _ = TestData.Path();
    }
}

using SkiaSharp;
using Spatial.Core;
using Spatial.Output.Plots;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class PlotTests
{
    [Fact]
    public void QQ_points_use_Blom_positions_and_standardised_residuals()
    {
        var (theory, sorted) = PlotFactory.QqPoints([3.0, -1.0, 1.0, double.NaN, -3.0]);
        Assert.Equal(4, theory.Length);

        // Blom (1958) position of the largest of n = 4: (4 − 0.375)/4.25 = 0.852941; Φ⁻¹(0.852941) = 1.049 (normal table, 3 decimals).
        Tolerance.Near(1.049, theory[3], 0.0005, "normal quantile of the largest residual");
        Tolerance.Near(-theory[3], theory[0], 1e-12, "symmetry");

        // Residuals −3, −1, 1, 3: mean 0, sample SD √(20/3) = 2.5820; largest standardised 3/2.5820 = 1.1619.
        Tolerance.Near(3 / Math.Sqrt(20.0 / 3), sorted[3], 1e-12, "standardised largest residual");
    }

    [Fact]
    public void Every_plot_renders_PNG_with_text_and_SVG()
    {
        var mean = Enumerable.Range(0, 365).Select(d => 300 * Math.Max(0, Math.Sin(Math.PI * (d - 60) / 240))).ToArray();
        var c1 = mean.Select(v => v / 4000).ToArray();
        var figures = new[]
        {
            PlotFactory.VarianceExplained([0.7, 0.2], [0.1, 0.03]),
            PlotFactory.Components(mean, [c1], ["amount"], SeasonCalendar.Default),
            PlotFactory.Reconstruction("MF01 2015", mean, [c1], [120], mean.Select(v => v * 1.1).ToArray(), SeasonCalendar.Default),
            PlotFactory.ResidualVsFitted([1, 2, 3], [0.1, -0.2, 0.1], "median_c1", "mm"),
            PlotFactory.PartialResidual([1, 2, 3], [1.1, 1.8, 3.1], 1, "coast_km", "median_c1"),
            PlotFactory.Qq([0.1, -0.2, 0.3, -0.1], "median_c1"),
        };
        foreach (var f in figures)
        {
            using var bitmap = SKBitmap.Decode(f.Png);
            Assert.Equal(PlotFactory.Width, bitmap.Width);
            Assert.True(f.Svg.Contains("<svg", StringComparison.Ordinal), f.Svg[..Math.Min(120, f.Svg.Length)]);

            // The title band must hold dark glyph pixels: the fontconfig build of SkiaSharp draws text.
            var dark = 0;
            for (var y = 0; y < 30; y++)
            {
                for (var x = 0; x < bitmap.Width; x++)
                {
                    dark += bitmap.GetPixel(x, y).Red < 120 ? 1 : 0;
                }
            }

            Assert.True(dark > 50, $"{f.Title}: no text drawn ({dark} dark pixels)");
        }
    }
}

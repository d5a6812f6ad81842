using Spatial.Output.Colour;
using Spatial.Testing;
using Xunit;

namespace Spatial.Output.Tests;

public sealed class ColourTests
{
    /// <summary>OKLab units: the reference table prints three decimals (± 0.0005), plus rounding of our own.</summary>
    private const double TableTolerance = 0.0015;

    [Theory]
    // Ottosson 2020, table of XYZ → OKLab test values (from memory; data/SOURCES.md).
    [InlineData(0.950, 1.000, 1.089, 1.000, 0.000, 0.000)]
    [InlineData(1.000, 0.000, 0.000, 0.450, 1.236, -0.019)]
    [InlineData(0.000, 1.000, 0.000, 0.922, -0.671, 0.263)]
    [InlineData(0.000, 0.000, 1.000, 0.153, -1.415, -0.449)]
    public void XYZ_to_OKLab_matches_the_published_test_values(double x, double y, double z, double l, double a, double b)
    {
        var c = OkLabConvert.FromXyz(x, y, z);
        Tolerance.Near(l, c.L, TableTolerance, "L");
        Tolerance.Near(a, c.A, TableTolerance, "a");
        Tolerance.Near(b, c.B, TableTolerance, "b");
    }

    [Fact]
    public void sRGB_white_is_OKLab_lightness_one_with_no_chroma()
    {
        // Ottosson 2020: the sRGB → LMS matrix rows sum to 1, so white maps to L = 1, a = b = 0 (to the 1e-7 the matrices print).
        var c = OkLabConvert.FromSrgb8(new Rgb8(255, 255, 255));
        Tolerance.Near(1.0, c.L, 1e-7, "L of white");
        Tolerance.Near(0.0, c.A, 1e-7, "a of white");
        Tolerance.Near(0.0, c.B, 1e-7, "b of white");
    }

    [Fact]
    public void Every_12_bit_sRGB_colour_survives_a_round_trip_through_OKLab()
    {
        for (var r = 0; r < 256; r += 17)
        {
            for (var g = 0; g < 256; g += 17)
            {
                for (var b = 0; b < 256; b += 17)
                {
                    var c = new Rgb8((byte)r, (byte)g, (byte)b);
                    Assert.Equal(c, OkLabConvert.ToSrgb8(OkLabConvert.FromSrgb8(c)));
                }
            }
        }
    }

    [Fact]
    public void Sequential_scale_darkens_monotonically_and_stays_in_the_sRGB_gamut()
    {
        var scale = ColourScale.Fellside;
        var previous = double.PositiveInfinity;
        for (var i = 0; i <= 256; i++)
        {
            var lab = scale.LabAt(i / 256.0);
            Assert.True(lab.L < previous, $"lightness must fall at step {i}");
            previous = lab.L;
            InGamut(lab);
        }

        // Ends differ in lightness by more than half the range: readable in grey and by every colour-vision type (common practice).
        Assert.True(scale.LabAt(0).L - scale.LabAt(1).L > 0.5);
    }

    [Fact]
    public void Diverging_scale_is_centred_on_zero_with_mirrored_lightness_and_opposite_blue_yellow_sides()
    {
        var scale = ColourScale.Tidemark;
        Assert.Equal(0.5, scale.Position(0, -3, 7));
        Assert.Equal(1.0, scale.Position(7, -3, 7));
        Assert.Equal(0.5 - (3.0 / 14), scale.Position(-3, -3, 7), 12);
        for (var i = 0; i <= 128; i++)
        {
            var t = i / 256.0;
            var low = scale.LabAt(t);
            var high = scale.LabAt(1 - t);
            Tolerance.Near(low.L, high.L, 1e-12, "mirrored lightness");
            InGamut(low);
            InGamut(high);
            if (i < 120)
            {
                // Negative side yellow-orange (b > 0), positive side blue (b < 0): the blue–yellow axis survives red–green deficiencies.
                Assert.True(low.B > 0 && high.B < 0, $"sides at t = {t}");
                Assert.True(scale.LabAt(0.5).L > low.L);
            }
        }
    }

    private static void InGamut(OkLab lab)
    {
        // Linear sRGB components within 0…1 (0.002 slack for the anchors' rounding).
        var (r, g, b) = OkLabConvert.ToLinearSrgb(lab);
        foreach (var v in new[] { r, g, b })
        {
            Assert.InRange(v, -0.002, 1.002);
        }
    }
}

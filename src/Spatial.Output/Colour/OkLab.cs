namespace Spatial.Output.Colour;

/// <summary>A colour in OKLab (lightness L 0…1, opponent axes a green–red, b blue–yellow).</summary>
public readonly record struct OkLab(double L, double A, double B);

/// <summary>An 8-bit sRGB colour (IEC 61966-2-1 transfer function).</summary>
public readonly record struct Rgb8(byte R, byte G, byte B)
{
    /// <summary>CSS/SVG hex form, e.g. <c>#1a2b3c</c>.</summary>
    public string Hex => $"#{R:x2}{G:x2}{B:x2}";
}

/// <summary>
/// Conversions between sRGB and OKLab (Björn Ottosson, "A perceptual color space for image processing", 2020,
/// https://bottosson.github.io/posts/oklab/). The matrices are those published there for linear sRGB ↔ LMS and
/// for XYZ (D65) ↔ LMS.
/// </summary>
public static class OkLabConvert
{
    /// <summary>Linear-light sRGB (0…1 per channel, may be out of gamut) to OKLab.</summary>
    public static OkLab FromLinearSrgb(double r, double g, double b)
    {
        var l = (0.4122214708 * r) + (0.5363325363 * g) + (0.0514459929 * b);
        var m = (0.2119034982 * r) + (0.6806995451 * g) + (0.1073969566 * b);
        var s = (0.0883024619 * r) + (0.2817188376 * g) + (0.6299787005 * b);
        return FromLms(l, m, s);
    }

    /// <summary>OKLab to linear-light sRGB (unclipped; components outside 0…1 mean the colour is out of the sRGB gamut).</summary>
    public static (double R, double G, double B) ToLinearSrgb(OkLab c)
    {
        var l_ = c.L + (0.3963377774 * c.A) + (0.2158037573 * c.B);
        var m_ = c.L - (0.1055613458 * c.A) - (0.0638541728 * c.B);
        var s_ = c.L - (0.0894841775 * c.A) - (1.2914855480 * c.B);
        var l = l_ * l_ * l_;
        var m = m_ * m_ * m_;
        var s = s_ * s_ * s_;
        return (
            (4.0767416621 * l) - (3.3077115913 * m) + (0.2309699292 * s),
            (-1.2684380046 * l) + (2.6097574011 * m) - (0.3413193965 * s),
            (-0.0041960863 * l) - (0.7034186147 * m) + (1.7076147010 * s));
    }

    /// <summary>CIE XYZ (D65, Y of white = 1) to OKLab, through Ottosson's M1 and M2.</summary>
    public static OkLab FromXyz(double x, double y, double z)
    {
        var l = (0.8189330101 * x) + (0.3618667424 * y) - (0.1288597137 * z);
        var m = (0.0329845436 * x) + (0.9293118715 * y) + (0.0361456387 * z);
        var s = (0.0482003018 * x) + (0.2643662691 * y) + (0.6338517070 * z);
        return FromLms(l, m, s);
    }

    /// <summary>sRGB transfer function, encoded (0…1) to linear (IEC 61966-2-1).</summary>
    public static double ToLinear(double v) => v <= 0.04045 ? v / 12.92 : Math.Pow((v + 0.055) / 1.055, 2.4);

    /// <summary>sRGB transfer function, linear (0…1) to encoded (IEC 61966-2-1).</summary>
    public static double FromLinear(double v) => v <= 0.0031308 ? 12.92 * v : (1.055 * Math.Pow(v, 1 / 2.4)) - 0.055;

    /// <summary>8-bit sRGB to OKLab.</summary>
    public static OkLab FromSrgb8(Rgb8 c) => FromLinearSrgb(ToLinear(c.R / 255.0), ToLinear(c.G / 255.0), ToLinear(c.B / 255.0));

    /// <summary>OKLab to 8-bit sRGB, clipping each channel to the gamut.</summary>
    public static Rgb8 ToSrgb8(OkLab c)
    {
        var (r, g, b) = ToLinearSrgb(c);
        return new Rgb8(Byte(r), Byte(g), Byte(b));
    }

    /// <summary>OKLab from lightness, chroma and hue angle in degrees (the polar form, "OKLCh").</summary>
    public static OkLab FromLch(double l, double chroma, double hueDeg)
    {
        var h = hueDeg * Math.PI / 180.0;
        return new OkLab(l, chroma * Math.Cos(h), chroma * Math.Sin(h));
    }

    private static byte Byte(double linear) => (byte)Math.Round(Math.Clamp(FromLinear(Math.Clamp(linear, 0, 1)), 0, 1) * 255.0);

    private static OkLab FromLms(double l, double m, double s)
    {
        var l_ = Math.Cbrt(l);
        var m_ = Math.Cbrt(m);
        var s_ = Math.Cbrt(s);
        return new OkLab(
            (0.2104542553 * l_) + (0.7936177850 * m_) - (0.0040720468 * s_),
            (1.9779984951 * l_) - (2.4285922050 * m_) + (0.4505937099 * s_),
            (0.0259040371 * l_) + (0.7827717662 * m_) - (0.8086757660 * s_));
    }
}

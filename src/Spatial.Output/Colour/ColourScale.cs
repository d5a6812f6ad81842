namespace Spatial.Output.Colour;

/// <summary>
/// A colour scale of our own design: a few anchor colours given in OKLCh, interpolated linearly in OKLab
/// (Ottosson 2020) so that equal steps of the value look like equal steps of colour. <see cref="Fellside"/> is
/// sequential (lightness falls monotonically from pale to dark, for amounts and lengths); <see cref="Tidemark"/>
/// is diverging and centred on zero (brown-orange below, near-white at zero, blue above, with mirrored
/// lightness), for anomalies, trends and residuals. Both separate their ends along the blue–yellow axis and by
/// lightness, which survive the common red–green colour-vision deficiencies (common practice).
/// </summary>
public sealed class ColourScale
{
    private readonly (double T, OkLab Colour)[] stops;

    private ColourScale(string name, bool diverging, (double T, OkLab Colour)[] stops)
    {
        Name = name;
        Diverging = diverging;
        this.stops = stops;
    }

    /// <summary>Sequential scale for amounts and lengths: pale straw → green → teal → blue → deep indigo.</summary>
    public static ColourScale Fellside { get; } = new("fellside", false,
    [
        (0.00, OkLabConvert.FromLch(0.965, 0.060, 100)),
        (0.25, OkLabConvert.FromLch(0.830, 0.105, 140)),
        (0.50, OkLabConvert.FromLch(0.665, 0.100, 190)),
        (0.75, OkLabConvert.FromLch(0.495, 0.100, 250)),
        (1.00, OkLabConvert.FromLch(0.320, 0.100, 290)),
    ]);

    /// <summary>Diverging scale centred on zero: dark brown-orange (negative) → near-white (0) → dark blue (positive).</summary>
    public static ColourScale Tidemark { get; } = new("tidemark", true,
    [
        (0.00, OkLabConvert.FromLch(0.420, 0.110, 45)),
        (0.25, OkLabConvert.FromLch(0.700, 0.110, 65)),
        (0.50, OkLabConvert.FromLch(0.965, 0.005, 90)),
        (0.75, OkLabConvert.FromLch(0.700, 0.090, 240)),
        (1.00, OkLabConvert.FromLch(0.420, 0.110, 255)),
    ]);

    /// <summary>The scale's name as shown in legends and side files.</summary>
    public string Name { get; }

    /// <summary>True for a diverging scale (centred on zero).</summary>
    public bool Diverging { get; }

    /// <summary>The scale by name (<c>fellside</c>, <c>tidemark</c>), or null.</summary>
    public static ColourScale? ByName(string name) =>
        string.Equals(name, Fellside.Name, StringComparison.OrdinalIgnoreCase) ? Fellside
        : string.Equals(name, Tidemark.Name, StringComparison.OrdinalIgnoreCase) ? Tidemark
        : null;

    /// <summary>The OKLab colour at position <paramref name="t"/> (clamped to 0…1; NaN gives the 0.5 colour).</summary>
    public OkLab LabAt(double t)
    {
        if (double.IsNaN(t))
        {
            t = 0.5;
        }

        t = Math.Clamp(t, 0, 1);
        for (var i = 1; i < stops.Length; i++)
        {
            if (t <= stops[i].T)
            {
                var (t0, c0) = stops[i - 1];
                var (t1, c1) = stops[i];
                var f = (t - t0) / (t1 - t0);
                return new OkLab(c0.L + ((c1.L - c0.L) * f), c0.A + ((c1.A - c0.A) * f), c0.B + ((c1.B - c0.B) * f));
            }
        }

        return stops[^1].Colour;
    }

    /// <summary>The 8-bit sRGB colour at position <paramref name="t"/> (0…1).</summary>
    public Rgb8 At(double t) => OkLabConvert.ToSrgb8(LabAt(t));

    /// <summary>
    /// The scale position of <paramref name="value"/> for data spanning <paramref name="min"/>…<paramref name="max"/>:
    /// linear for a sequential scale; for a diverging one, zero maps to 0.5 and ±max(|min|, |max|) to the ends.
    /// NaN stays NaN.
    /// </summary>
    public double Position(double value, double min, double max)
    {
        if (double.IsNaN(value))
        {
            return double.NaN;
        }

        if (Diverging)
        {
            var m = Math.Max(Math.Abs(min), Math.Abs(max));
            return m > 0 ? 0.5 + (value / (2 * m)) : 0.5;
        }

        return max > min ? (value - min) / (max - min) : 0.5;
    }

    /// <summary>A diverging scale for data that cross zero, else the sequential one.</summary>
    public static ColourScale For(double min, double max) => min < 0 && max > 0 ? Tidemark : Fellside;
}

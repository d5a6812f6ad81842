namespace Spatial.Core;

/// <summary>Units in which snow depth may be reported.</summary>
public enum DepthUnit
{
    /// <summary>Millimetres (the stored unit).</summary>
    Millimetre,

    /// <summary>Centimetres.</summary>
    Centimetre,

    /// <summary>Metres.</summary>
    Metre,

    /// <summary>International inch, exactly 25.4 mm (NIST SP 811, appendix B).</summary>
    Inch,
}

/// <summary>Conversions and spellings of <see cref="DepthUnit"/>.</summary>
public static class DepthUnits
{
    /// <summary>Millimetres per unit: 1, 10, 1000, 25.4 (exact by definition; NIST SP 811).</summary>
    public static double MillimetresPer(DepthUnit unit) => unit switch
    {
        DepthUnit.Millimetre => 1.0,
        DepthUnit.Centimetre => 10.0,
        DepthUnit.Metre => 1000.0,
        DepthUnit.Inch => 25.4,
        _ => throw new ArgumentOutOfRangeException(nameof(unit), unit, "unknown depth unit"),
    };

    /// <summary>Converts <paramref name="value"/> in <paramref name="unit"/> to millimetres. NaN stays NaN.</summary>
    public static double ToMillimetres(double value, DepthUnit unit) => value * MillimetresPer(unit);

    /// <summary>
    /// Parses a unit spelling (case-insensitive): mm, millimetre(s), millimeter(s); cm, …; m, metre(s), meter(s); in, inch, inches, ".
    /// </summary>
    public static bool TryParse(ReadOnlySpan<char> text, out DepthUnit unit)
    {
        var t = text.Trim();
        unit = DepthUnit.Millimetre;
        if (Is(t, "mm") || Is(t, "millimetre") || Is(t, "millimetres") || Is(t, "millimeter") || Is(t, "millimeters"))
        {
            unit = DepthUnit.Millimetre;
            return true;
        }

        if (Is(t, "cm") || Is(t, "centimetre") || Is(t, "centimetres") || Is(t, "centimeter") || Is(t, "centimeters"))
        {
            unit = DepthUnit.Centimetre;
            return true;
        }

        if (Is(t, "m") || Is(t, "metre") || Is(t, "metres") || Is(t, "meter") || Is(t, "meters"))
        {
            unit = DepthUnit.Metre;
            return true;
        }

        if (Is(t, "in") || Is(t, "inch") || Is(t, "inches") || Is(t, "\""))
        {
            unit = DepthUnit.Inch;
            return true;
        }

        return false;
    }

    /// <summary>The short symbol: mm, cm, m, in.</summary>
    public static string Symbol(DepthUnit unit) => unit switch
    {
        DepthUnit.Millimetre => "mm",
        DepthUnit.Centimetre => "cm",
        DepthUnit.Metre => "m",
        DepthUnit.Inch => "in",
        _ => throw new ArgumentOutOfRangeException(nameof(unit), unit, "unknown depth unit"),
    };

    private static bool Is(ReadOnlySpan<char> t, string s) => t.Equals(s, StringComparison.OrdinalIgnoreCase);
}

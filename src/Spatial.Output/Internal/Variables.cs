using System.Text.RegularExpressions;
using Spatial.Output.Colour;

namespace Spatial.Output.Internal;

/// <summary>Units and colour scales of the result columns, from the column names of the file contracts.</summary>
internal static partial class Variables
{
    /// <summary>The unit of a column, e.g. "mm", "days", "km"; empty when unitless or unknown.</summary>
    public static string Unit(string name)
    {
        foreach (var prefix in new[] { "median_", "iqr_", "predicted_" })
        {
            if (name.StartsWith(prefix, StringComparison.Ordinal))
            {
                return Unit(name[prefix.Length..]);
            }
        }

        if (name.StartsWith("sen_per_decade_", StringComparison.Ordinal))
        {
            var u = Unit(name["sen_per_decade_".Length..]);
            return u.Length == 0 ? "per decade" : $"{u} per decade";
        }

        if (name.StartsWith("mk_", StringComparison.Ordinal) || name.StartsWith("residual_", StringComparison.Ordinal))
        {
            return string.Empty;
        }

        if (ComponentName().IsMatch(name))
        {
            return "mm";
        }

        return name switch
        {
            _ when name.EndsWith("_mm", StringComparison.Ordinal) => "mm",
            _ when name.EndsWith("_m", StringComparison.Ordinal) => "m",
            _ when name.EndsWith("_km", StringComparison.Ordinal) => "km",
            _ when name.EndsWith("_deg", StringComparison.Ordinal) => "°",
            _ when name.EndsWith("_days", StringComparison.Ordinal) || name == "seasons" || name == "observed_days" => "days",
            _ when name.EndsWith("_day", StringComparison.Ordinal) => "day of season",
            "longitude" => "° E",
            "latitude" => "° N",
            _ => string.Empty,
        };
    }

    /// <summary>
    /// The scale for a column: diverging (zero-centred) for trends, test statistics, residuals, component scores and
    /// any column whose values cross zero; sequential otherwise.
    /// </summary>
    public static ColourScale Scale(string name, double min, double max)
    {
        var n = name.StartsWith("median_", StringComparison.Ordinal) ? name["median_".Length..] : name;
        if (name.StartsWith("sen_per_decade_", StringComparison.Ordinal) || name.StartsWith("mk_z_", StringComparison.Ordinal)
            || name.EndsWith("_residual", StringComparison.Ordinal) || ComponentName().IsMatch(n) || name.StartsWith("local_", StringComparison.Ordinal))
        {
            return ColourScale.Tidemark;
        }

        return ColourScale.For(min, max);
    }

    /// <summary>A label for people: the name with underscores as spaces, and its unit in brackets.</summary>
    public static string Label(string name)
    {
        var unit = Unit(name);
        var text = name.Replace('_', ' ');
        return unit.Length == 0 ? text : $"{text} ({unit})";
    }

    [GeneratedRegex("^c[0-9]+$")]
    private static partial Regex ComponentName();
}

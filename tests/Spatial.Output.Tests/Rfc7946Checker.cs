using System.Globalization;
using System.Text.Json;

namespace Spatial.Output.Tests;

/// <summary>
/// Structural checks of RFC 7946 (The GeoJSON Format, IETF 2016) on a written file: a FeatureCollection of
/// Features (§3.2, §3.3), no "crs" member anywhere (§4: not part of the format), positions of two numbers in
/// longitude −180…180 and latitude −90…90 (§3.1.1, §4), polygon rings closed with ≥ 4 positions, exteriors
/// counterclockwise and holes clockwise (§3.1.6), coordinates with at most the given decimals.
/// </summary>
internal static class Rfc7946Checker
{
    public static List<string> Check(string path, int maxDecimals)
    {
        var problems = new List<string>();
        var text = File.ReadAllText(path);
        if (text.Contains("\"crs\"", StringComparison.Ordinal))
        {
            problems.Add("a 'crs' member is present (RFC 7946 §4)");
        }

        foreach (var m in System.Text.RegularExpressions.Regex.Matches(text, "\"coordinates\":(\\[[-0-9.,\\[\\]eE+]*\\])").Cast<System.Text.RegularExpressions.Match>())
        {
            foreach (var num in m.Groups[1].Value.Split([',', '[', ']'], StringSplitOptions.RemoveEmptyEntries))
            {
                var dot = num.IndexOf('.', StringComparison.Ordinal);
                if (num.Contains('e', StringComparison.OrdinalIgnoreCase) || (dot >= 0 && num.Length - dot - 1 > maxDecimals))
                {
                    problems.Add($"coordinate {num} has more than {maxDecimals} decimals");
                }
            }
        }

        using var doc = JsonDocument.Parse(text);
        var root = doc.RootElement;
        if (root.GetProperty("type").GetString() != "FeatureCollection")
        {
            problems.Add("root is not a FeatureCollection");
        }

        foreach (var f in root.GetProperty("features").EnumerateArray())
        {
            if (f.GetProperty("type").GetString() != "Feature")
            {
                problems.Add("a member of features is not a Feature");
            }

            if (!f.TryGetProperty("properties", out var props) || props.ValueKind is not (JsonValueKind.Object or JsonValueKind.Null))
            {
                problems.Add("a Feature has no properties member");
            }

            var g = f.GetProperty("geometry");
            var type = g.GetProperty("type").GetString();
            var coords = g.GetProperty("coordinates");
            switch (type)
            {
                case "Point":
                    Position(coords, problems);
                    break;
                case "LineString":
                    foreach (var p in coords.EnumerateArray())
                    {
                        Position(p, problems);
                    }

                    break;
                case "MultiLineString":
                    foreach (var l in coords.EnumerateArray())
                    {
                        foreach (var p in l.EnumerateArray())
                        {
                            Position(p, problems);
                        }
                    }

                    break;
                case "Polygon":
                    Polygon(coords, problems);
                    break;
                case "MultiPolygon":
                    foreach (var poly in coords.EnumerateArray())
                    {
                        Polygon(poly, problems);
                    }

                    break;
                default:
                    problems.Add($"unexpected geometry type {type}");
                    break;
            }
        }

        return problems;
    }

    private static void Position(JsonElement p, List<string> problems)
    {
        if (p.GetArrayLength() < 2 || p[0].ValueKind != JsonValueKind.Number || p[1].ValueKind != JsonValueKind.Number)
        {
            problems.Add("a position is not an array of numbers");
            return;
        }

        var lon = p[0].GetDouble();
        var lat = p[1].GetDouble();
        if (lon is < -180 or > 180 || lat is < -90 or > 90)
        {
            problems.Add(string.Create(CultureInfo.InvariantCulture, $"position ({lon}, {lat}) is not longitude/latitude"));
        }
    }

    private static void Polygon(JsonElement rings, List<string> problems)
    {
        var i = 0;
        foreach (var ring in rings.EnumerateArray())
        {
            var pts = ring.EnumerateArray().Select(p => (X: p[0].GetDouble(), Y: p[1].GetDouble())).ToArray();
            if (pts.Length < 4 || pts[0] != pts[^1])
            {
                problems.Add("a linear ring is not closed or has fewer than 4 positions (RFC 7946 §3.1.6)");
            }

            // Shoelace signed area: positive = counterclockwise.
            double area = 0;
            for (var k = 0; k + 1 < pts.Length; k++)
            {
                area += (pts[k].X * pts[k + 1].Y) - (pts[k + 1].X * pts[k].Y);
            }

            if (i == 0 && area <= 0)
            {
                problems.Add("an exterior ring is not counterclockwise (RFC 7946 §3.1.6)");
            }

            if (i > 0 && area >= 0)
            {
                problems.Add("a hole is not clockwise (RFC 7946 §3.1.6)");
            }

            i++;
        }
    }
}

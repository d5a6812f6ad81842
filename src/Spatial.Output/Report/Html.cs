using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace Spatial.Output.Report;

/// <summary>A tiny writer of XHTML-compatible HTML (every element closed, attributes quoted, text escaped).</summary>
internal sealed class Html
{
    private readonly StringBuilder sb = new();

    public override string ToString() => sb.ToString();

    public Html Raw(string markup)
    {
        sb.Append(markup);
        return this;
    }

    public Html Text(string text)
    {
        sb.Append(Esc(text));
        return this;
    }

    public Html El(string tag, string text, string? cls = null)
    {
        sb.Append('<').Append(tag);
        if (cls is not null)
        {
            sb.Append(" class=\"").Append(Esc(cls)).Append('"');
        }

        sb.Append('>').Append(Esc(text)).Append("</").Append(tag).Append('>');
        return this;
    }

    public Html P(string text, string? cls = null) => El("p", text, cls);

    public Html Note(string text) => El("p", text, "note");

    public Html Open(string tagWithAttributes)
    {
        sb.Append('<').Append(tagWithAttributes).Append('>');
        return this;
    }

    public Html Close(string tag)
    {
        sb.Append("</").Append(tag).Append('>');
        return this;
    }

    /// <summary>A table with a header row; each cell is text (null = unknown, shown as an en dash).</summary>
    public Html Table(IReadOnlyList<string> header, IEnumerable<IReadOnlyList<string?>> rows, string? caption = null, bool numericFromColumn1 = true)
    {
        sb.Append("<table>");
        if (caption is not null)
        {
            sb.Append("<caption>").Append(Esc(caption)).Append("</caption>");
        }

        sb.Append("<thead><tr>");
        foreach (var h in header)
        {
            sb.Append("<th scope=\"col\">").Append(Esc(h)).Append("</th>");
        }

        sb.Append("</tr></thead><tbody>");
        foreach (var row in rows)
        {
            sb.Append("<tr>");
            for (var i = 0; i < row.Count; i++)
            {
                var num = numericFromColumn1 && i > 0 ? " class=\"num\"" : string.Empty;
                sb.Append("<td").Append(num).Append('>').Append(Esc(row[i] ?? "–")).Append("</td>");
            }

            sb.Append("</tr>");
        }

        sb.Append("</tbody></table>");
        return this;
    }

    /// <summary>Any JSON value as nested HTML: objects as two-column tables, arrays of objects as tables, scalars as text.</summary>
    public Html Json(JsonNode? node, int depth = 0)
    {
        switch (node)
        {
            case null:
                sb.Append('–');
                break;
            case JsonObject o:
                sb.Append("<table class=\"kv\"><tbody>");
                foreach (var (k, v) in o)
                {
                    sb.Append("<tr><th scope=\"row\">").Append(Esc(k.Replace('_', ' '))).Append("</th><td>");
                    Json(v, depth + 1);
                    sb.Append("</td></tr>");
                }

                sb.Append("</tbody></table>");
                break;
            case JsonArray a when a.Count > 0 && a.All(x => x is JsonObject):
                // One row per item; a nested object of scalars becomes columns of its own ("removed: spike"),
                // so a per-station table stays one line per station.
                var columns = new List<(string Key, string? Sub)>();
                foreach (var item in a.OfType<JsonObject>())
                {
                    foreach (var (k, v) in item)
                    {
                        if (v is JsonObject inner && inner.All(kv => kv.Value is JsonValue or null))
                        {
                            foreach (var (ik, _) in inner)
                            {
                                if (!columns.Contains((k, ik)))
                                {
                                    columns.Add((k, ik));
                                }
                            }
                        }
                        else if (!columns.Contains((k, null)))
                        {
                            columns.Add((k, null));
                        }
                    }
                }

                sb.Append("<table><thead><tr>");
                foreach (var (k, sub) in columns)
                {
                    var label = sub is null ? k : $"{k}: {sub}";
                    sb.Append("<th scope=\"col\">").Append(Esc(label.Replace('_', ' '))).Append("</th>");
                }

                sb.Append("</tr></thead><tbody>");
                foreach (var item in a.OfType<JsonObject>())
                {
                    sb.Append("<tr>");
                    foreach (var (k, sub) in columns)
                    {
                        sb.Append("<td>");
                        Json(sub is null ? item[k] : (item[k] as JsonObject)?[sub], depth + 1);
                        sb.Append("</td>");
                    }

                    sb.Append("</tr>");
                }

                sb.Append("</tbody></table>");
                break;
            case JsonArray a:
                if (a.Count > 24 && a.All(x => x is JsonValue))
                {
                    sb.Append(Esc($"[{a.Count} values: {string.Join(", ", a.Take(6).Select(Scalar))}, …]"));
                }
                else
                {
                    sb.Append(Esc(string.Join(", ", a.Select(x => x is JsonValue ? Scalar(x) : x?.ToJsonString() ?? "–"))));
                }

                break;
            default:
                sb.Append(Esc(Scalar(node)));
                break;
        }

        return this;
    }

    public static string Scalar(JsonNode? n) => n switch
    {
        null => "–",
        JsonValue v when v.GetValueKind() == JsonValueKind.Number => Num(v.GetValue<double>()),
        JsonValue v when v.GetValueKind() == JsonValueKind.String => v.GetValue<string>(),
        JsonValue v when v.GetValueKind() is JsonValueKind.True or JsonValueKind.False => v.GetValue<bool>() ? "yes" : "no",
        _ => n.ToJsonString(),
    };

    /// <summary>A number for people: 4 significant digits, whole numbers as such; NaN as an en dash.</summary>
    public static string Num(double v)
    {
        if (!double.IsFinite(v))
        {
            return "–";
        }

        if (v == Math.Round(v) && Math.Abs(v) < 1e9)
        {
            return v.ToString("0", CultureInfo.InvariantCulture);
        }

        var a = Math.Abs(v);
        return a is >= 0.001 and < 1e6 ? v.ToString(a >= 100 ? "0.#" : a >= 1 ? "0.###" : "0.####", CultureInfo.InvariantCulture) : v.ToString("0.###E+0", CultureInfo.InvariantCulture);
    }

    /// <summary>A p-value: below 0.001 as "&lt; 0.001".</summary>
    public static string P(double p) => !double.IsFinite(p) ? "–" : p < 0.001 ? "< 0.001" : p.ToString("0.###", CultureInfo.InvariantCulture);

    public static string Esc(string s) => s.Replace("&", "&amp;", StringComparison.Ordinal).Replace("<", "&lt;", StringComparison.Ordinal)
        .Replace(">", "&gt;", StringComparison.Ordinal).Replace("\"", "&quot;", StringComparison.Ordinal);
}

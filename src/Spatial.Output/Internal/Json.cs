using System.Globalization;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace Spatial.Output.Internal;

/// <summary>Tolerant reads of JSON values written by the stages: numbers may also be written as "NaN" strings.</summary>
internal static class Json
{
    /// <summary>The node as a double; NaN when absent, null, or not a number.</summary>
    public static double Num(JsonNode? node)
    {
        if (node is not JsonValue v)
        {
            return double.NaN;
        }

        if (v.GetValueKind() == JsonValueKind.Number)
        {
            return v.GetValue<double>();
        }

        if (v.GetValueKind() == JsonValueKind.String
            && double.TryParse(v.GetValue<string>(), NumberStyles.Float, CultureInfo.InvariantCulture, out var d))
        {
            return d;
        }

        return double.NaN;
    }

    /// <summary>The node as text; null when absent. Numbers and booleans are written invariantly.</summary>
    public static string? Text(JsonNode? node) => node switch
    {
        null => null,
        JsonValue v when v.GetValueKind() == JsonValueKind.String => v.GetValue<string>(),
        JsonValue v when v.GetValueKind() == JsonValueKind.Number => v.GetValue<double>().ToString("R", CultureInfo.InvariantCulture),
        _ => node.ToJsonString(),
    };

    /// <summary>An array of numbers (NaN for unknown entries); empty when absent.</summary>
    public static double[] Nums(JsonNode? node) =>
        node is JsonArray a ? a.Select(Num).ToArray() : [];

    /// <summary>An array of strings; empty when absent.</summary>
    public static string[] Texts(JsonNode? node) =>
        node is JsonArray a ? a.Select(n => Text(n) ?? string.Empty).ToArray() : [];

    /// <summary>A K × N array of numbers; empty when absent.</summary>
    public static double[][] Matrix(JsonNode? node) =>
        node is JsonArray a ? a.Select(Nums).ToArray() : [];

    /// <summary>Elements of an array, or none.</summary>
    public static IEnumerable<JsonNode> Items(JsonNode? node) =>
        node is JsonArray a ? a.OfType<JsonNode>() : [];
}

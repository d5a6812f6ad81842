using System.Reflection;
using System.Text.Json.Nodes;
using Spatial.Core.IO;

namespace Spatial.Cli;

/// <summary>
/// The provenance file of a results folder (<c>manifest.json</c>): one entry per verb run, each with its inputs
/// (path as given, SHA-256, size), parameters, tool version and UTC time. A later run of the same verb replaces
/// its entry; entries of other verbs stay.
/// </summary>
internal static class RunManifest
{
    public static string ToolVersion =>
        typeof(RunManifest).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion.Split('+')[0] ?? "0.0.0";

    public static void Record(string folder, string verb, IEnumerable<string> inputs, IReadOnlyDictionary<string, string?> parameters)
    {
        var path = Path.Combine(folder, ResultLayout.Manifest);
        JsonObject root;
        try
        {
            root = File.Exists(path) ? (JsonNode.Parse(File.ReadAllText(path)) as JsonObject ?? []) : [];
        }
        catch (System.Text.Json.JsonException)
        {
            root = [];
        }

        root["tool"] = "spatial";
        root["version"] = ToolVersion;
        var runs = root["runs"] as JsonObject ?? [];
        var inputArray = new JsonArray();
        foreach (var input in inputs)
        {
            if (File.Exists(input))
            {
                inputArray.Add(new JsonObject
                {
                    ["path"] = input,
                    ["sha256"] = Sha256File.Of(input),
                    ["bytes"] = new FileInfo(input).Length,
                });
            }
        }

        var p = new JsonObject();
        foreach (var (k, v) in parameters.OrderBy(kv => kv.Key, StringComparer.Ordinal))
        {
            p[k] = v;
        }

        runs[verb] = new JsonObject
        {
            ["time_utc"] = DateTime.UtcNow.ToString("yyyy-MM-ddTHH:mm:ssZ", System.Globalization.CultureInfo.InvariantCulture),
            ["version"] = ToolVersion,
            ["inputs"] = inputArray,
            ["parameters"] = p,
        };
        root["runs"] = runs;
        AtomicFile.WriteAllText(path, root.ToJsonString(CliOutput.JsonOptions) + "\n");
    }
}

using System.Globalization;

namespace Spatial.Terrain.Tests;

/// <summary>Reads the small reference CSV files in data/ (header row, comma, optional double quotes).</summary>
internal static class ReferenceCsv
{
    public static List<Dictionary<string, string>> Read(params string[] path)
    {
        var lines = File.ReadAllLines(Spatial.Testing.TestData.Path(path));
        var header = Split(lines[0]);
        var rows = new List<Dictionary<string, string>>();
        foreach (var line in lines.Skip(1).Where(l => l.Length > 0))
        {
            var f = Split(line);
            var row = new Dictionary<string, string>(StringComparer.Ordinal);
            for (var i = 0; i < header.Count; i++)
            {
                row[header[i]] = i < f.Count ? f[i] : string.Empty;
            }

            rows.Add(row);
        }

        return rows;
    }

    public static double D(this Dictionary<string, string> row, string key) => double.Parse(row[key], CultureInfo.InvariantCulture);

    private static List<string> Split(string line)
    {
        var fields = new List<string>();
        var sb = new System.Text.StringBuilder();
        var quoted = false;
        foreach (var c in line)
        {
            if (c == '"')
            {
                quoted = !quoted;
            }
            else if (c == ',' && !quoted)
            {
                fields.Add(sb.ToString());
                sb.Clear();
            }
            else
            {
                sb.Append(c);
            }
        }

        fields.Add(sb.ToString());
        return fields;
    }
}

using System.Globalization;
using System.Text;
using Spatial.Core;

namespace Spatial.Output.Internal;

/// <summary>A small RFC 4180 CSV reader and writer (comma, double-quote escaping, "\n" or "\r\n" line ends).</summary>
internal static class Csv
{
    /// <summary>Reads a CSV file with a header row. Throws <see cref="SpatialDataException"/> on a ragged row.</summary>
    public static DataTable Read(string path)
    {
        var text = File.ReadAllText(path, Encoding.UTF8);
        var rows = Parse(text, path);
        if (rows.Count == 0)
        {
            throw new SpatialDataException(path, 1, "the file is empty; expected a header row", "write the file again with the stage that produces it");
        }

        var header = rows[0];
        var body = new List<string[]>(rows.Count - 1);
        for (var i = 1; i < rows.Count; i++)
        {
            var r = rows[i];
            if (r.Length == 1 && r[0].Length == 0)
            {
                continue;
            }

            if (r.Length != header.Length)
            {
                throw new SpatialDataException(path, i + 1, $"expected {header.Length} fields as in the header, found {r.Length}", "check the file for a broken line");
            }

            body.Add(r);
        }

        return new DataTable(Path.GetFileName(path), header, body);
    }

    private static List<string[]> Parse(string text, string path)
    {
        var rows = new List<string[]>();
        var fields = new List<string>();
        var field = new StringBuilder();
        var inQuotes = false;
        var line = 1;
        var i = 0;
        if (text.Length > 0 && text[0] == '\uFEFF')
        {
            i = 1;
        }

        var any = false;
        for (; i < text.Length; i++)
        {
            var c = text[i];
            any = true;
            if (inQuotes)
            {
                if (c == '"')
                {
                    if (i + 1 < text.Length && text[i + 1] == '"')
                    {
                        field.Append('"');
                        i++;
                    }
                    else
                    {
                        inQuotes = false;
                    }
                }
                else
                {
                    if (c == '\n')
                    {
                        line++;
                    }

                    field.Append(c);
                }

                continue;
            }

            switch (c)
            {
                case '"':
                    inQuotes = true;
                    break;
                case ',':
                    fields.Add(field.ToString());
                    field.Clear();
                    break;
                case '\r':
                    break;
                case '\n':
                    fields.Add(field.ToString());
                    field.Clear();
                    rows.Add([.. fields]);
                    fields.Clear();
                    line++;
                    any = false;
                    break;
                default:
                    field.Append(c);
                    break;
            }
        }

        if (inQuotes)
        {
            throw new SpatialDataException(path, line, "a quoted field is not closed", "close the quote or remove it");
        }

        if (any)
        {
            fields.Add(field.ToString());
            rows.Add([.. fields]);
        }

        return rows;
    }

    /// <summary>Quotes a field when it holds a comma, quote or line break.</summary>
    public static string Field(string value) =>
        value.AsSpan().IndexOfAny(",\"\r\n") >= 0 ? "\"" + value.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : value;

    /// <summary>A double in round-trip-short invariant form; empty for NaN or infinity.</summary>
    public static string Number(double value) =>
        double.IsFinite(value) ? value.ToString("R", CultureInfo.InvariantCulture) : string.Empty;
}

/// <summary>A table read from a CSV file: header and rows of text fields (empty = unknown).</summary>
internal sealed class DataTable
{
    private readonly Dictionary<string, int> index;

    public DataTable(string name, IReadOnlyList<string> columns, IReadOnlyList<string[]> rows)
    {
        Name = name;
        Columns = columns;
        Rows = rows;
        index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var i = 0; i < columns.Count; i++)
        {
            index.TryAdd(columns[i], i);
        }
    }

    /// <summary>File name (for messages).</summary>
    public string Name { get; }

    public IReadOnlyList<string> Columns { get; }

    public IReadOnlyList<string[]> Rows { get; }

    public int IndexOf(string column) => index.TryGetValue(column, out var i) ? i : -1;

    public bool Has(string column) => index.ContainsKey(column);

    /// <summary>Index of a column that must exist; throws a located data error otherwise.</summary>
    public int Require(string column)
    {
        var i = IndexOf(column);
        if (i < 0)
        {
            throw new SpatialDataException(Name, 1, $"the header has no column '{column}'", "write the file with the stage that produces it (see DEVELOPERS.md, file contracts)");
        }

        return i;
    }

    /// <summary>Field as a double (invariant); NaN when empty or not a number.</summary>
    public static double ToDouble(string field) =>
        double.TryParse(field, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) ? v : double.NaN;

    /// <summary>Values of a column as doubles (NaN for unknown).</summary>
    public double[] Doubles(string column)
    {
        var i = Require(column);
        var result = new double[Rows.Count];
        for (var r = 0; r < Rows.Count; r++)
        {
            result[r] = ToDouble(Rows[r][i]);
        }

        return result;
    }

    public string[] Texts(string column)
    {
        var i = Require(column);
        return Rows.Select(r => r[i]).ToArray();
    }
}

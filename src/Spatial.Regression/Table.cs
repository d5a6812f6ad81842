using System.Globalization;
using System.Text;
using Spatial.Core;

namespace Spatial.Regression;

/// <summary>
/// A table of text cells read from a CSV file (comma separated, first row a header, double quotes around
/// fields that contain commas or quotes). Cells stay text until a model asks for numeric columns by name;
/// every row remembers its 1-based line in the file, so that errors can say where. Immutable.
/// </summary>
public sealed class Table
{
    private readonly Dictionary<string, int> index;
    private readonly string[][] rows;
    private readonly long[] lines;

    private Table(string source, IReadOnlyList<string> columns, string[][] rows, long[] lines)
    {
        Source = source;
        Columns = columns;
        this.rows = rows;
        this.lines = lines;
        index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var i = 0; i < columns.Count; i++)
        {
            index.TryAdd(columns[i], i);
        }
    }

    /// <summary>Where the table came from (file path as given, or a label).</summary>
    public string Source { get; }

    /// <summary>Column names in file order.</summary>
    public IReadOnlyList<string> Columns { get; }

    /// <summary>Number of data rows.</summary>
    public int RowCount => rows.Length;

    /// <summary>True when the table has a column named <paramref name="name"/> (exact, case-sensitive).</summary>
    public bool HasColumn(string name) => index.ContainsKey(name);

    /// <summary>The text of a cell (trimmed; empty when the row is short).</summary>
    public string Cell(int row, string column)
    {
        if (!index.TryGetValue(column, out var c))
        {
            throw new ArgumentException($"no column '{column}'", nameof(column));
        }

        var r = rows[row];
        return c < r.Length ? r[c] : string.Empty;
    }

    /// <summary>1-based line of row <paramref name="row"/> in the source file.</summary>
    public long LineOf(int row) => lines[row];

    /// <summary>
    /// Reads a CSV file. Throws <see cref="SpatialDataException"/> when the file is missing, empty, has an
    /// empty or duplicated column name, or an unterminated quote.
    /// </summary>
    public static Table ReadCsv(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "table file not found", "check the path given to --table");
        }

        using var reader = new StreamReader(path, Encoding.UTF8, detectEncodingFromByteOrderMarks: true);
        return Read(reader, path);
    }

    /// <summary>Reads CSV text (for tables built in memory); <paramref name="label"/> names it in errors.</summary>
    public static Table ParseCsv(string text, string label)
    {
        ArgumentNullException.ThrowIfNull(text);
        using var reader = new StringReader(text);
        return Read(reader, label);
    }

    /// <summary>A table from named numeric columns of equal length (numbers written in round-trip form).</summary>
    public static Table FromColumns(string label, IReadOnlyDictionary<string, double[]> columns)
    {
        ArgumentNullException.ThrowIfNull(columns);
        var names = columns.Keys.ToList();
        var n = names.Count == 0 ? 0 : columns[names[0]].Length;
        var rows = new string[n][];
        var lines = new long[n];
        for (var i = 0; i < n; i++)
        {
            rows[i] = names.Select(k => double.IsNaN(columns[k][i]) ? string.Empty : columns[k][i].ToString("R", CultureInfo.InvariantCulture)).ToArray();
            lines[i] = i + 2;
        }

        return new Table(label, names, rows, lines);
    }

    /// <summary>
    /// A table from text cells (e.g. a join of two CSV files made by the caller); rows are numbered as lines
    /// 2, 3, … for messages. Cells are trimmed; short rows read as empty cells. Throws <see cref="SpatialDataException"/>
    /// for an empty or duplicated column name.
    /// </summary>
    public static Table FromCells(string label, IReadOnlyList<string> columns, IReadOnlyList<IReadOnlyList<string>> rows)
    {
        ArgumentNullException.ThrowIfNull(columns);
        ArgumentNullException.ThrowIfNull(rows);
        var seen = new HashSet<string>(StringComparer.Ordinal);
        for (var c = 0; c < columns.Count; c++)
        {
            if (string.IsNullOrWhiteSpace(columns[c]) || !seen.Add(columns[c]))
            {
                throw new SpatialDataException(label, 1, $"column {c + 1} ('{columns[c]}') is empty or appears twice", "give every column a distinct name", c + 1);
            }
        }

        var cells = rows.Select(r => r.Select(v => (v ?? string.Empty).Trim()).ToArray()).ToArray();
        var lines = Enumerable.Range(0, cells.Length).Select(i => (long)i + 2).ToArray();
        return new Table(label, columns.ToArray(), cells, lines);
    }

    private static Table Read(TextReader reader, string source)
    {
        long lineNo = 0;
        string[]? header = null;
        var rows = new List<string[]>();
        var lines = new List<long>();
        while (true)
        {
            var startLine = lineNo + 1;
            var fields = ReadRecord(reader, ref lineNo, source);
            if (fields is null)
            {
                break;
            }

            if (fields.Length == 1 && fields[0].Length == 0)
            {
                continue; // blank line
            }

            if (header is null)
            {
                header = fields;
                var seen = new HashSet<string>(StringComparer.Ordinal);
                for (var c = 0; c < header.Length; c++)
                {
                    if (header[c].Length == 0)
                    {
                        throw new SpatialDataException(source, startLine, $"column {c + 1} of the header has no name", "give every column a name in the first row", c + 1);
                    }

                    if (!seen.Add(header[c]))
                    {
                        throw new SpatialDataException(source, startLine, $"column name '{header[c]}' appears twice in the header", "rename one of the columns", c + 1);
                    }
                }

                continue;
            }

            rows.Add(fields);
            lines.Add(startLine);
        }

        if (header is null)
        {
            throw new SpatialDataException(source, 0, "the table is empty (no header row)", "the first row must name the columns");
        }

        return new Table(source, header, [.. rows], [.. lines]);
    }

    private static string[]? ReadRecord(TextReader reader, ref long lineNo, string source)
    {
        var line = reader.ReadLine();
        if (line is null)
        {
            return null;
        }

        lineNo++;
        if (line.IndexOf('"', StringComparison.Ordinal) < 0)
        {
            var parts = line.Split(',');
            for (var i = 0; i < parts.Length; i++)
            {
                parts[i] = parts[i].Trim();
            }

            return parts;
        }

        var fields = new List<string>();
        var sb = new StringBuilder();
        var inQuotes = false;
        var start = lineNo;
        while (true)
        {
            for (var i = 0; i < line.Length; i++)
            {
                var ch = line[i];
                if (inQuotes)
                {
                    if (ch == '"')
                    {
                        if (i + 1 < line.Length && line[i + 1] == '"')
                        {
                            sb.Append('"');
                            i++;
                        }
                        else
                        {
                            inQuotes = false;
                        }
                    }
                    else
                    {
                        sb.Append(ch);
                    }
                }
                else if (ch == '"')
                {
                    inQuotes = true;
                }
                else if (ch == ',')
                {
                    fields.Add(sb.ToString().Trim());
                    sb.Clear();
                }
                else
                {
                    sb.Append(ch);
                }
            }

            if (!inQuotes)
            {
                break;
            }

            var next = reader.ReadLine();
            if (next is null)
            {
                throw new SpatialDataException(source, start, "a quoted field is not closed before the end of the file", "close the double quote");
            }

            lineNo++;
            sb.Append('\n');
            line = next;
        }

        fields.Add(sb.ToString().Trim());
        return [.. fields];
    }
}

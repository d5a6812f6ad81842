using System.Globalization;
using System.Text;
using Spatial.Core;

namespace Spatial.Viewer.Internal;

/// <summary>
/// A small CSV table read whole into memory (RFC 4180: comma separator, double-quoted fields with "" escapes,
/// CRLF or LF line ends, a header row). Enough for the result tables the viewer reads; not a general reader.
/// </summary>
internal sealed class CsvTable
{
    private readonly Dictionary<string, int> index;

    private CsvTable(string file, string[] header, List<string[]> rows, List<long> lines)
    {
        File = file;
        Header = header;
        Rows = rows;
        Lines = lines;
        index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var i = 0; i < header.Length; i++)
        {
            index.TryAdd(header[i], i);
        }
    }

    /// <summary>Name of the file, for messages.</summary>
    public string File { get; }

    /// <summary>Column names in file order.</summary>
    public string[] Header { get; }

    /// <summary>Data rows (each as long as the header).</summary>
    public List<string[]> Rows { get; }

    /// <summary>1-based line number of each row in the file.</summary>
    public List<long> Lines { get; }

    /// <summary>Column index of <paramref name="name"/>, or −1.</summary>
    public int Column(string name) => index.TryGetValue(name, out var i) ? i : -1;

    /// <summary>Column index of <paramref name="name"/>; throws a located data error when absent.</summary>
    public int RequireColumn(string name)
    {
        var i = Column(name);
        if (i < 0)
        {
            throw new SpatialDataException(File, 1, $"the header has no column '{name}'", "write the file with the column names of the results-folder contract (DEVELOPERS.md)");
        }

        return i;
    }

    /// <summary>
    /// Parses the field as an invariant-culture double; an empty field is NaN (unknown); <c>true</c>/<c>false</c> are 1/0.
    /// Throws a located data error when the text is none of these.
    /// </summary>
    public double Number(int row, int column)
    {
        if (column < 0)
        {
            return double.NaN;
        }

        var text = Rows[row][column];
        if (text.Length == 0)
        {
            return double.NaN;
        }

        if (double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var value))
        {
            return value;
        }

        // Flags written by the stages (e.g. seasons.csv below_min_days) read as 1 and 0.
        if (text.Equals("true", StringComparison.OrdinalIgnoreCase))
        {
            return 1;
        }

        if (text.Equals("false", StringComparison.OrdinalIgnoreCase))
        {
            return 0;
        }

        throw new SpatialDataException(File, Lines[row], $"column '{Header[column]}' holds '{Shorten(text)}', expected a number", "use invariant-culture numbers (a dot for decimals) or leave the field empty for unknown", column + 1);
    }

    /// <summary>Reads <paramref name="path"/> (UTF-8, optional byte-order mark).</summary>
    public static CsvTable Read(string path)
    {
        var name = Path.GetFileName(path);
        var text = System.IO.File.ReadAllText(path, Encoding.UTF8);
        var records = new List<string[]>();
        var lines = new List<long>();
        var fields = new List<string>();
        var field = new StringBuilder();
        long line = 1;
        long recordLine = 1;
        var pos = 0;
        var quoted = false;
        var afterQuote = false;
        while (pos <= text.Length)
        {
            var end = pos == text.Length;
            var c = end ? '\n' : text[pos];
            if (quoted)
            {
                if (end)
                {
                    throw new SpatialDataException(name, recordLine, "a quoted field is not closed", "close the field with a double quote");
                }

                if (c == '"')
                {
                    if (pos + 1 < text.Length && text[pos + 1] == '"')
                    {
                        field.Append('"');
                        pos += 2;
                        continue;
                    }

                    quoted = false;
                    afterQuote = true;
                }
                else
                {
                    if (c == '\n')
                    {
                        line++;
                    }

                    field.Append(c);
                }

                pos++;
                continue;
            }

            if (c == ',')
            {
                fields.Add(field.ToString());
                field.Clear();
                afterQuote = false;
            }
            else if (c == '\n' || c == '\r')
            {
                if (c == '\r' && pos + 1 < text.Length && text[pos + 1] == '\n')
                {
                    pos++;
                }

                fields.Add(field.ToString());
                field.Clear();
                afterQuote = false;
                if (!(fields.Count == 1 && fields[0].Length == 0))
                {
                    records.Add([.. fields]);
                    lines.Add(recordLine);
                }

                fields.Clear();
                line++;
                recordLine = line;
            }
            else if (c == '"' && field.Length == 0 && !afterQuote)
            {
                quoted = true;
            }
            else if (afterQuote)
            {
                throw new SpatialDataException(name, recordLine, $"text '{c}' follows a closing quote", "quote the whole field or none of it");
            }
            else
            {
                field.Append(c);
            }

            pos++;
        }

        if (records.Count == 0)
        {
            throw new SpatialDataException(name, 1, "the file is empty, expected a header row", "write the header row of the results-folder contract");
        }

        var header = records[0];
        if (header.Length > 0 && header[0].Length > 0 && header[0][0] == '\uFEFF')
        {
            header[0] = header[0][1..];
        }

        var rows = new List<string[]>(records.Count - 1);
        var rowLines = new List<long>(records.Count - 1);
        for (var r = 1; r < records.Count; r++)
        {
            if (records[r].Length != header.Length)
            {
                throw new SpatialDataException(name, lines[r], $"the row has {records[r].Length} fields, expected {header.Length} as in the header", "give every row one field per header column");
            }

            rows.Add(records[r]);
            rowLines.Add(lines[r]);
        }

        return new CsvTable(name, header, rows, rowLines);
    }

    private static string Shorten(string text) => text.Length <= 40 ? text : text[..40] + "…";
}

using System.Globalization;
using System.Text;

namespace Spatial.Records.Csv;

/// <summary>Number parsing from UTF-8 fields and CSV field writing, invariant culture.</summary>
internal static class CsvText
{
    /// <summary>
    /// Parses a finite decimal number (optional sign, digits, optional fraction, optional exponent; surrounding
    /// spaces allowed). When <paramref name="decimalComma"/> is true a single comma is read as the decimal mark
    /// (for semicolon- or tab-separated files from locales that write 1,5). NaN and infinities are refused.
    /// </summary>
    public static bool TryParseDouble(ReadOnlySpan<byte> field, bool decimalComma, out double value)
    {
        field = Trim(field);
        if (field.IsEmpty || field.Length > 64)
        {
            value = double.NaN;
            return false;
        }

        // Fast path: plain integers (the common daily-record form, depth in mm).
        if (TryParseSmallInteger(field, out var whole))
        {
            value = whole;
            return true;
        }

        Span<byte> copy = stackalloc byte[field.Length];
        field.CopyTo(copy);
        foreach (var c in copy)
        {
            // Refuse words like NaN, Infinity, and hex; double.TryParse would accept the first two.
            if (!(c is >= (byte)'0' and <= (byte)'9' or (byte)'.' or (byte)'-' or (byte)'+' or (byte)'e' or (byte)'E' or (byte)','))
            {
                value = double.NaN;
                return false;
            }
        }

        if (decimalComma)
        {
            var comma = copy.IndexOf((byte)',');
            if (comma >= 0)
            {
                if (copy.IndexOf((byte)'.') >= 0 || copy[(comma + 1)..].IndexOf((byte)',') >= 0)
                {
                    value = double.NaN;
                    return false;
                }

                copy[comma] = (byte)'.';
            }
        }
        else if (copy.IndexOf((byte)',') >= 0)
        {
            value = double.NaN;
            return false;
        }

        if (!double.TryParse(copy, NumberStyles.AllowLeadingSign | NumberStyles.AllowDecimalPoint | NumberStyles.AllowExponent, CultureInfo.InvariantCulture, out value)
            || !double.IsFinite(value))
        {
            value = double.NaN;
            return false;
        }

        return true;
    }

    /// <summary>Parses an optional sign and up to 9 digits.</summary>
    public static bool TryParseSmallInteger(ReadOnlySpan<byte> field, out int value)
    {
        value = 0;
        var i = 0;
        var negative = false;
        if (field.Length > 0 && (field[0] == (byte)'-' || field[0] == (byte)'+'))
        {
            negative = field[0] == (byte)'-';
            i = 1;
        }

        if (field.Length - i is < 1 or > 9)
        {
            return false;
        }

        var v = 0;
        for (; i < field.Length; i++)
        {
            var d = field[i] - (byte)'0';
            if ((uint)d > 9)
            {
                return false;
            }

            v = (v * 10) + d;
        }

        value = negative ? -v : v;
        return true;
    }

    /// <summary>Removes leading and trailing spaces and tabs.</summary>
    public static ReadOnlySpan<byte> Trim(ReadOnlySpan<byte> field)
    {
        var a = 0;
        var b = field.Length;
        while (a < b && field[a] is (byte)' ' or (byte)'\t')
        {
            a++;
        }

        while (b > a && field[b - 1] is (byte)' ' or (byte)'\t')
        {
            b--;
        }

        return field[a..b];
    }

    /// <summary>Shows a field in a message: trimmed, at most 40 characters, control characters escaped.</summary>
    public static string Show(ReadOnlySpan<byte> field)
    {
        var text = Encoding.UTF8.GetString(Trim(field.Length > 120 ? field[..120] : field));
        var sb = new StringBuilder();
        foreach (var c in text)
        {
            if (sb.Length >= 40)
            {
                sb.Append('…');
                break;
            }

            sb.Append(char.IsControl(c) || c == '\uFFFD' ? '?' : c);
        }

        return sb.ToString();
    }

    /// <summary>Writes a CSV field (comma-delimited), quoting it when it holds a comma, quote, or line end.</summary>
    public static string Field(string value)
    {
        if (value.AsSpan().IndexOfAny(",\"\r\n") < 0)
        {
            return value;
        }

        return "\"" + value.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"";
    }

    /// <summary>A double in round-trip-short form, invariant culture.</summary>
    public static string Number(double value) => value.ToString("R", CultureInfo.InvariantCulture);
}

using System.Globalization;
using System.Runtime.CompilerServices;
using System.Text;

namespace Spatial.Fitting.Internal;

/// <summary>
/// One block of CSV lines formatted straight into UTF-8 bytes, with the text the <c>fit</c> files use: invariant
/// culture, comma separated, "\n" line ends, doubles in round-trip form (<c>double.ToString("R")</c>), empty for a
/// value that is not finite, a field quoted when it holds a comma, quote or line break.
/// </summary>
/// <remarks>The appenders are compiled optimised at once: they run millions of times in one call of the fit verb, too
/// soon for the runtime to have promoted them from unoptimised code.</remarks>
internal sealed class Utf8Csv
{
    private static readonly Encoding Utf8 = new UTF8Encoding(encoderShouldEmitUTF8Identifier: false);

    private byte[] buffer = new byte[1 << 16];
    private string? lastText;
    private byte[] lastTextBytes = [];

    /// <summary>The bytes formatted so far.</summary>
    public ReadOnlySpan<byte> Written => buffer.AsSpan(0, Length);

    /// <summary>Number of bytes formatted so far.</summary>
    public int Length { get; private set; }

    /// <summary>Forgets what was formatted (the buffer is kept).</summary>
    public void Clear() => Length = 0;

    /// <summary>Appends one ASCII character.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public void Char(char c)
    {
        Reserve(1);
        buffer[Length++] = (byte)c;
    }

    /// <summary>Appends bytes of ASCII text as they are.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Ascii(ReadOnlySpan<byte> text)
    {
        Reserve(text.Length);
        text.CopyTo(buffer.AsSpan(Length));
        Length += text.Length;
    }

    /// <summary>Appends a text field, quoted as CSV needs (the encoding of the last text is kept: rows of one station repeat it).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Text(string s)
    {
        if (!ReferenceEquals(s, lastText))
        {
            var field = s.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : s;
            lastTextBytes = Utf8.GetBytes(field);
            lastText = s;
        }

        Reserve(lastTextBytes.Length);
        lastTextBytes.CopyTo(buffer.AsSpan(Length));
        Length += lastTextBytes.Length;
    }

    /// <summary>Appends <paramref name="value"/> as <c>ToString(CultureInfo.InvariantCulture)</c> writes it.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Int(int value)
    {
        Reserve(11);
        value.TryFormat(buffer.AsSpan(Length), out var n, default, CultureInfo.InvariantCulture);
        Length += n;
    }

    /// <summary>Appends <paramref name="value"/> as <c>ToString("R", CultureInfo.InvariantCulture)</c> writes it; nothing when it is not finite.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Number(double value)
    {
        if (!double.IsFinite(value))
        {
            return;
        }

        Reserve(32);
        var target = buffer.AsSpan(Length);
        int n;
        if (value == Math.Floor(value) && Math.Abs(value) < 1e15 && !(value == 0 && double.IsNegative(value)))
        {
            // A whole number below 10^15 is written by "R" as its integer digits (−0 aside).
            ((long)value).TryFormat(target, out n, default, CultureInfo.InvariantCulture);
        }
        else
        {
            value.TryFormat(target, out n, "R", CultureInfo.InvariantCulture);
        }

        Length += n;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private void Reserve(int bytes)
    {
        if (Length + bytes > buffer.Length)
        {
            Array.Resize(ref buffer, Math.Max(buffer.Length * 2, Length + bytes));
        }
    }

    /// <summary>
    /// Writes rows 0…<paramref name="rows"/>−1 in order to <paramref name="stream"/>, each formatted by
    /// <paramref name="formatRow"/> (which ends it with "\n"); blocks of rows are formatted in parallel, a batch at a time.
    /// </summary>
    public static void WriteRows(Stream stream, int rows, Action<int, Utf8Csv> formatRow)
    {
        const int blockRows = 4096;
        var workers = Environment.ProcessorCount;
        var blocks = (rows + blockRows - 1) / blockRows;
        var batch = Math.Max(1, Math.Min(blocks, 4 * workers));
        var lines = new Utf8Csv[batch];
        for (var i = 0; i < batch; i++)
        {
            lines[i] = new Utf8Csv();
        }

        var po = new ParallelOptions { MaxDegreeOfParallelism = workers };
        for (var first = 0; first < blocks; first += batch)
        {
            var count = Math.Min(batch, blocks - first);
            Parallel.For(0, count, po, i =>
            {
                var line = lines[i];
                line.Clear();
                var start = (first + i) * blockRows;
                var end = Math.Min(rows, start + blockRows);
                for (var r = start; r < end; r++)
                {
                    formatRow(r, line);
                }
            });
            for (var i = 0; i < count; i++)
            {
                stream.Write(lines[i].Written);
            }
        }
    }
}

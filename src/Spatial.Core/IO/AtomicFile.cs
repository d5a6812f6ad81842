namespace Spatial.Core.IO;

/// <summary>
/// Writes files atomically: the content goes to a temporary file in the destination's folder, is
/// flushed to disk, then renamed over the destination. A failure leaves the destination as it was
/// and removes the temporary file.
/// </summary>
public static class AtomicFile
{
    /// <summary>Writes <paramref name="path"/> through <paramref name="write"/>, atomically. Creates the folder when needed.</summary>
    public static void Write(string path, Action<Stream> write)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(write);
        var full = Path.GetFullPath(path);
        var folder = Path.GetDirectoryName(full) ?? ".";
        Directory.CreateDirectory(folder);
        var temp = Path.Combine(folder, $".{Path.GetFileName(full)}.{Environment.ProcessId}.{Guid.NewGuid():N}.tmp");
        try
        {
            using (var stream = new FileStream(temp, FileMode.CreateNew, FileAccess.ReadWrite, FileShare.None, 1 << 16))
            {
                write(stream);
                stream.Flush(flushToDisk: true);
            }

            File.Move(temp, full, overwrite: true);
        }
        catch
        {
            TryDelete(temp);
            throw;
        }
    }

    /// <summary>Writes <paramref name="bytes"/> to <paramref name="path"/> atomically.</summary>
    public static void WriteAllBytes(string path, ReadOnlySpan<byte> bytes)
    {
        var copy = bytes.ToArray();
        Write(path, s => s.Write(copy));
    }

    /// <summary>Writes <paramref name="text"/> as UTF-8 without a byte-order mark, atomically.</summary>
    public static void WriteAllText(string path, string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        Write(path, s =>
        {
            using var w = new StreamWriter(s, new System.Text.UTF8Encoding(false), 1 << 16, leaveOpen: true);
            w.Write(text);
        });
    }

    /// <summary>Writes text through a <see cref="TextWriter"/> (UTF-8, no BOM, "\n" line ends), atomically.</summary>
    public static void WriteText(string path, Action<TextWriter> write)
    {
        ArgumentNullException.ThrowIfNull(write);
        Write(path, s =>
        {
            using var w = new StreamWriter(s, new System.Text.UTF8Encoding(false), 1 << 16, leaveOpen: true) { NewLine = "\n" };
            write(w);
        });
    }

    private static void TryDelete(string path)
    {
        try
        {
            File.Delete(path);
        }
        catch (IOException)
        {
            // Best effort: the temporary file is hidden and named uniquely.
        }
        catch (UnauthorizedAccessException)
        {
            // Same.
        }
    }
}

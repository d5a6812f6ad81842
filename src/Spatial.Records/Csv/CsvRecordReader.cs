using System.IO.Compression;
using System.Text;
using CsvHelper;
using Spatial.Core;

namespace Spatial.Records.Csv;

/// <summary>
/// A streaming CSV record reader over UTF-8 bytes, backed by CsvHelper 34's reader (RFC 4180 quoting; comma,
/// semicolon or tab detected; byte-order marks honoured; blank lines skipped; records up to
/// <see cref="MaxRecordBytes"/>). The first record is the header and is returned like any other. Every failure
/// is a located <see cref="SpatialDataException"/> naming the file and the line on which the record starts.
/// </summary>
/// <remarks>
/// Chosen over our own span-based tokenizer by the import benchmark (CsvHelper tokenised the 20-million-row
/// file about 2.5 times faster, with the same line numbers and quoting errors).
/// </remarks>
internal sealed class CsvRecordReader : IDisposable
{
    /// <summary>Longest record accepted, in bytes (1 MiB).</summary>
    public const int MaxRecordBytes = 1 << 20;

    private readonly CsvReader reader;
    private readonly FileStream? file;

    /// <summary>Reads CSV from <paramref name="stream"/>; <paramref name="fileName"/> names it in messages. Takes ownership of the stream.</summary>
    public CsvRecordReader(Stream stream, string fileName, FileStream? file = null)
    {
        FileName = fileName;
        this.file = file;
        var options = CsvReaderOptions.Default with
        {
            HasHeader = false,
            TrackLineNumbers = true,
            MalformedData = CsvMalformedDataHandling.Throw,
            MaxRecordSize = MaxRecordBytes,
            DetectSeparatorHint = false,
            BufferSize = 1 << 18,
        };
        reader = CsvReader.Create(stream, options, false);
    }

    /// <summary>The file name used in messages.</summary>
    public string FileName { get; }

    /// <summary>The delimiter (detected from the first lines).</summary>
    public byte Delimiter => (byte)reader.Separator;

    /// <summary>1-based line on which the current record starts.</summary>
    public long Line => reader.LineNumber;

    /// <summary>Fields in the current record.</summary>
    public int FieldCount => reader.FieldCount;

    /// <summary>Share of the file read so far (0…1), from the position in the (possibly compressed) file; 0 when unknown.</summary>
    public double Fraction => file is { CanSeek: true, Length: > 0 } f ? Math.Clamp((double)f.Position / f.Length, 0, 1) : 0;

    /// <summary>Opens <paramref name="path"/> for reading: gzip is recognised by its magic bytes (whatever the extension).</summary>
    public static CsvRecordReader Open(string path, string? displayName = null)
    {
        var name = displayName ?? path;
        var file = OpenFile(path, name);
        Stream s = file;
        var gzip = IsGzip(file);
        if (gzip)
        {
            s = new GZipStream(file, CompressionMode.Decompress);
        }

        return new CsvRecordReader(new GuardedStream(s, name, gzip ? path : null), name, file);
    }

    /// <summary>Opens <paramref name="path"/> for a sequential read; a missing or unreadable file is a located error naming <paramref name="name"/>.</summary>
    internal static FileStream OpenFile(string path, string name)
    {
        try
        {
            return new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan);
        }
        catch (FileNotFoundException)
        {
            throw new SpatialDataException(name, 0, "file not found", "check the path");
        }
        catch (DirectoryNotFoundException)
        {
            throw new SpatialDataException(name, 0, "folder not found", "check the path");
        }
        catch (UnauthorizedAccessException)
        {
            throw new SpatialDataException(name, 0, "permission denied", "check the file's permissions");
        }
        catch (IOException e)
        {
            throw new SpatialDataException(name, 0, $"cannot open the file ({e.Message})", "check the path");
        }
    }

    /// <summary>True when a seekable <paramref name="file"/> starts with the gzip magic bytes (RFC 1952); the position is left at 0.</summary>
    internal static bool IsGzip(FileStream file)
    {
        if (!file.CanSeek)
        {
            return false;
        }

        Span<byte> magic = stackalloc byte[2];
        var n = file.ReadAtLeast(magic, 2, throwOnEndOfStream: false);
        file.Position = 0;
        return n == 2 && magic[0] == 0x1f && magic[1] == 0x8b;
    }

    /// <summary>The bytes of field <paramref name="index"/> of the current record (unescaped, not trimmed).</summary>
    public ReadOnlySpan<byte> Field(int index) => reader.GetSpan(index);

    /// <summary>Field <paramref name="index"/> as a string (UTF-8, trimmed); throws a located error on invalid UTF-8.</summary>
    public string FieldString(int index)
    {
        var bytes = Field(index);
        if (!System.Text.Unicode.Utf8.IsValid(bytes))
        {
            throw Error("the text is not valid UTF-8", "give a CSV text file saved as UTF-8", index);
        }

        return Encoding.UTF8.GetString(bytes).Trim();
    }

    /// <summary>A located error at the current record (and field, 0-based, when given).</summary>
    public SpatialDataException Error(string message, string hint, int field = -1) =>
        new(FileName, Line, field >= 0 ? $"column {field + 1}: {message}" : message, hint);

    /// <summary>Reads the next record, skipping lines that hold only spaces. Returns false at the end of the file.</summary>
    public bool Read()
    {
        try
        {
            while (reader.Read())
            {
                if (reader.FieldCount == 1 && IsBlank(reader.GetSpan(0)))
                {
                    continue;
                }

                return true;
            }

            return false;
        }
        catch (CsvFormatException e)
        {
            var line = e.LineNumber > 0 ? e.LineNumber : Math.Max(1, reader.LineNumber);
            var what = e.Message;
            var hint = "check the quoting: a quoted field must be closed, and a quote inside it doubled (\"\")";
            if (what.Contains("MaxRecordSize", StringComparison.Ordinal))
            {
                what = $"the record is longer than {MaxRecordBytes >> 20} MiB";
                hint = "check that this is a CSV file with one record per line (and no unclosed quote)";
            }
            else
            {
                var colon = what.IndexOf("): ", StringComparison.Ordinal);
                what = colon >= 0 ? what[(colon + 3)..] : what;
                var offset = what.IndexOf(" (byte offset", StringComparison.Ordinal);
                what = offset >= 0 ? what[..offset] : what;
            }

            throw new SpatialDataException(FileName, line, what, hint);
        }
        catch (SpatialDataException e) when (e.Diagnostic.Line == 0)
        {
            // A damaged compressed stream: say where reading stopped.
            throw new SpatialDataException(e.Diagnostic with { Line = Math.Max(1, reader.LineNumber + 1) });
        }
    }

    /// <inheritdoc />
    public void Dispose() => reader.Dispose();

    private static bool IsBlank(ReadOnlySpan<byte> field)
    {
        foreach (var c in field)
        {
            if (c is not ((byte)' ' or (byte)'\t' or (byte)'\r'))
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>
    /// Turns read failures of the underlying (gzip) stream into data errors, and checks at the end of a gzip file
    /// that the decompressed length matches the length the file states in its last four bytes (RFC 1952 ISIZE,
    /// modulo 2^32): .NET's decompressor ends silently on a truncated file.
    /// </summary>
    /// <remarks>A file of several concatenated gzip members states only the last member's length; such files are refused too.</remarks>
    private sealed class GuardedStream(Stream inner, string name, string? gzipPath) : Stream
    {
        private long produced;
        private bool checkedEnd;

        public override bool CanRead => true;

        public override bool CanSeek => false;

        public override bool CanWrite => false;

        public override long Length => throw new NotSupportedException();

        public override long Position
        {
            get => throw new NotSupportedException();
            set => throw new NotSupportedException();
        }

        public override int Read(byte[] buffer, int offset, int count) => Read(buffer.AsSpan(offset, count));

        public override int Read(Span<byte> buffer)
        {
            try
            {
                var n = inner.Read(buffer);
                produced += n;
                if (n == 0 && buffer.Length > 0 && gzipPath is not null && !checkedEnd)
                {
                    checkedEnd = true;
                    CheckGzipLength();
                }

                return n;
            }
            catch (InvalidDataException e)
            {
                throw new SpatialDataException(name, 0, $"the compressed data are damaged ({e.Message})", "download or compress the file again");
            }
            catch (IOException e)
            {
                throw new SpatialDataException(name, 0, $"cannot read the file ({e.Message})", "check the file");
            }
        }

        public override void Flush()
        {
        }

        private void CheckGzipLength()
        {
            using var f = new FileStream(gzipPath!, FileMode.Open, FileAccess.Read, FileShare.Read);
            Span<byte> tail = stackalloc byte[4];
            var ok = f.Length >= 18;
            if (ok)
            {
                f.Position = f.Length - 4;
                ok = f.ReadAtLeast(tail, 4, throwOnEndOfStream: false) == 4
                    && System.Buffers.Binary.BinaryPrimitives.ReadUInt32LittleEndian(tail) == unchecked((uint)produced);
            }

            if (!ok)
            {
                throw new SpatialDataException(name, 0, "the gzip file is incomplete: it ends before its data do (a truncated download or copy?)", "download or compress the file again");
            }
        }

        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();

        protected override void Dispose(bool disposing)
        {
            if (disposing)
            {
                inner.Dispose();
            }

            base.Dispose(disposing);
        }
    }
}

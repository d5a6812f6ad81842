using System.Runtime.InteropServices;
using Microsoft.Win32.SafeHandles;
using Parquet;
using Parquet.Meta;
using Parquet.Schema;

namespace Spatial.Records;

/// <summary>
/// Reads a required float column chunk straight from the file when it is what <see cref="SeasonMatrixFile"/> writes:
/// one uncompressed data page (version 1) of PLAIN values, no dictionary. Such a page is its header followed by the
/// values as little-endian float32 (a required column has no definition or repetition levels), so the values are
/// copied as they lie. Anything else is left to Parquet.Net.
/// </summary>
/// <remarks>
/// The page header (Thrift compact protocol, Apache Parquet format <c>parquet.thrift</c>) is parsed in full to find
/// its length, and the page is accepted only when its type, sizes, value count and encoding say the above and the
/// header and values fill the column chunk exactly.
/// </remarks>
internal static class PlainFloatPages
{
    /// <summary>Longest page header read (ours are about 50 bytes; statistics of a float column are short).</summary>
    private const int MaxHeaderBytes = 1024;

    /// <summary>Fills <paramref name="destination"/> with the column's values and returns true, or returns false (nothing read) when the chunk is not one plain page of exactly that many floats.</summary>
    public static bool TryRead(SafeFileHandle file, ParquetRowGroupReader group, DataField field, Span<float> destination)
    {
        if (field.IsNullable || field.ClrType != typeof(float) || !BitConverter.IsLittleEndian)
        {
            return false;
        }

        var meta = group.GetMetadata(field)?.MetaData;
        var n = destination.Length;
        var valueBytes = 4L * n;
        if (meta is null || meta.Codec != CompressionCodec.UNCOMPRESSED || meta.DictionaryPageOffset is not null || meta.NumValues != n)
        {
            return false;
        }

        var headerBytes = meta.TotalCompressedSize - valueBytes;
        if (headerBytes <= 0 || headerBytes > MaxHeaderBytes)
        {
            return false;
        }

        Span<byte> header = stackalloc byte[(int)headerBytes];
        if (!ReadFully(file, header, meta.DataPageOffset))
        {
            return false;
        }

        if (!IsPlainDataPage(header, n, out var length) || length != headerBytes)
        {
            return false;
        }

        return ReadFully(file, MemoryMarshal.AsBytes(destination), meta.DataPageOffset + headerBytes);
    }

    /// <summary>
    /// True when <paramref name="header"/> starts with a page header of a version-1 data page holding
    /// <paramref name="values"/> PLAIN values in 4 × values bytes, uncompressed; <paramref name="length"/> is the header's
    /// length in bytes.
    /// </summary>
    internal static bool IsPlainDataPage(ReadOnlySpan<byte> header, int values, out int length)
    {
        length = 0;
        var reader = new CompactReader(header);
        long type = -1, uncompressed = -1, compressed = -1, count = -1, encoding = -1;
        var field = 0;
        while (reader.NextField(ref field, out var kind))
        {
            if (kind == CompactReader.I32 && field is 1 or 2 or 3)
            {
                var v = reader.Integer();
                switch (field)
                {
                    case 1:
                        type = v;
                        break;
                    case 2:
                        uncompressed = v;
                        break;
                    default:
                        compressed = v;
                        break;
                }
            }
            else if (kind == CompactReader.Struct && field == 5)
            {
                // DataPageHeader: 1 num_values, 2 encoding, 3 and 4 level encodings, 5 statistics.
                var inner = 0;
                while (reader.NextField(ref inner, out var innerKind))
                {
                    if (innerKind == CompactReader.I32 && inner == 1)
                    {
                        count = reader.Integer();
                    }
                    else if (innerKind == CompactReader.I32 && inner == 2)
                    {
                        encoding = reader.Integer();
                    }
                    else
                    {
                        reader.Skip(innerKind);
                    }
                }
            }
            else
            {
                reader.Skip(kind);
            }
        }

        length = reader.Position;
        const int dataPage = 0;
        const int plain = 0;
        return !reader.Failed && type == dataPage && uncompressed == 4L * values && compressed == 4L * values && count == values && encoding == plain;
    }

    private static bool ReadFully(SafeFileHandle file, Span<byte> buffer, long offset)
    {
        while (buffer.Length > 0)
        {
            var n = RandomAccess.Read(file, buffer, offset);
            if (n <= 0)
            {
                return false;
            }

            buffer = buffer[n..];
            offset += n;
        }

        return true;
    }

    /// <summary>Just enough of the Thrift compact protocol to walk a struct: field headers, integers, and skipping any value.</summary>
    private ref struct CompactReader(ReadOnlySpan<byte> bytes)
    {
        public const int I32 = 5;
        public const int Struct = 12;

        private const int MaxDepth = 16;

        private readonly ReadOnlySpan<byte> bytes = bytes;
        private int depth;

        public int Position { get; private set; }

        public bool Failed { get; private set; }

        /// <summary>Reads the next field header of the current struct; false at its end (or on malformed input, see <see cref="Failed"/>).</summary>
        public bool NextField(ref int field, out int kind)
        {
            kind = 0;
            if (Failed || Position >= bytes.Length)
            {
                Failed = true;
                return false;
            }

            var b = bytes[Position++];
            kind = b & 0x0F;
            if (kind == 0)
            {
                return false;
            }

            var delta = b >> 4;
            field = delta != 0 ? field + delta : (int)ZigZag(Varint());
            return !Failed;
        }

        /// <summary>A zigzag varint (i16, i32, i64).</summary>
        public long Integer() => ZigZag(Varint());

        /// <summary>Skips a value of compact type <paramref name="kind"/>.</summary>
        public void Skip(int kind)
        {
            if (Failed || ++depth > MaxDepth)
            {
                Failed = true;
                return;
            }

            switch (kind)
            {
                case 1 or 2:
                    // Boolean in a field header: no payload.
                    break;
                case 3:
                    Advance(1);
                    break;
                case 4 or 5 or 6:
                    _ = Varint();
                    break;
                case 7:
                    Advance(8);
                    break;
                case 8:
                    Advance(Varint());
                    break;
                case 9 or 10:
                    SkipList();
                    break;
                case 11:
                    SkipMap();
                    break;
                case 12:
                    var field = 0;
                    while (NextField(ref field, out var inner))
                    {
                        Skip(inner);
                    }

                    break;
                default:
                    Failed = true;
                    break;
            }

            depth--;
        }

        private void SkipList()
        {
            if (Position >= bytes.Length)
            {
                Failed = true;
                return;
            }

            var b = bytes[Position++];
            var size = (long)(b >> 4);
            var element = b & 0x0F;
            if (size == 15)
            {
                size = Varint();
            }

            for (var i = 0L; i < size && !Failed; i++)
            {
                // Booleans in a list take one byte each.
                if (element is 1 or 2)
                {
                    Advance(1);
                }
                else
                {
                    Skip(element);
                }
            }
        }

        private void SkipMap()
        {
            var size = Varint();
            if (size == 0 || Failed)
            {
                return;
            }

            if (Position >= bytes.Length)
            {
                Failed = true;
                return;
            }

            var b = bytes[Position++];
            for (var i = 0L; i < size && !Failed; i++)
            {
                Skip(b >> 4);
                Skip(b & 0x0F);
            }
        }

        private void Advance(long count)
        {
            if (count < 0 || Position + count > bytes.Length)
            {
                Failed = true;
                return;
            }

            Position += (int)count;
        }

        private long Varint()
        {
            ulong value = 0;
            for (var shift = 0; shift < 64; shift += 7)
            {
                if (Position >= bytes.Length)
                {
                    Failed = true;
                    return 0;
                }

                var b = bytes[Position++];
                value |= (ulong)(b & 0x7F) << shift;
                if ((b & 0x80) == 0)
                {
                    return (long)value;
                }
            }

            Failed = true;
            return 0;
        }

        private static long ZigZag(long v) => (long)((ulong)v >> 1) ^ -(v & 1);
    }
}

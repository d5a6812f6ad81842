using System.IO.Compression;

namespace Spatial.Scenario.Internal;

/// <summary>
/// A gzip member (RFC 1952) with a fixed header — no file name, modification time 0, extra flags 0, operating system
/// 255 "unknown" — around a raw deflate stream (RFC 1951) from System.IO.Compression at a fixed zlib level, so that the
/// same bytes in give the same file out on every platform running the same runtime.
/// </summary>
internal sealed class GzipWriter : Stream
{
    private static readonly uint[] CrcTable = BuildCrcTable();
    private readonly Stream inner;
    private readonly DeflateStream deflate;
    private uint crc = 0xFFFFFFFFu;
    private long length;
    private bool finished;

    /// <summary>Starts a gzip member on <paramref name="inner"/> with zlib compression level <paramref name="level"/> (0–9).</summary>
    public GzipWriter(Stream inner, int level)
    {
        this.inner = inner;
        ReadOnlySpan<byte> header = [0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 0xff];
        inner.Write(header);
        deflate = new DeflateStream(inner, new ZLibCompressionOptions { CompressionLevel = level }, leaveOpen: true);
    }

    public override bool CanRead => false;

    public override bool CanSeek => false;

    public override bool CanWrite => true;

    public override long Length => length;

    public override long Position
    {
        get => length;
        set => throw new NotSupportedException();
    }

    /// <summary>CRC-32 of <paramref name="data"/> (ISO 3309 / ITU-T V.42 polynomial, as gzip uses).</summary>
    public static uint Crc32(ReadOnlySpan<byte> data) => ~Update(0xFFFFFFFFu, data);

    public override void Write(byte[] buffer, int offset, int count) => Write(buffer.AsSpan(offset, count));

    public override void Write(ReadOnlySpan<byte> buffer)
    {
        ObjectDisposedException.ThrowIf(finished, this);
        crc = Update(crc, buffer);
        length += buffer.Length;
        deflate.Write(buffer);
    }

    /// <summary>Ends the deflate stream and writes the CRC-32 and the length modulo 2³² (little-endian).</summary>
    public void Finish()
    {
        if (finished)
        {
            return;
        }

        deflate.Dispose();
        Span<byte> trailer = stackalloc byte[8];
        System.Buffers.Binary.BinaryPrimitives.WriteUInt32LittleEndian(trailer, ~crc);
        System.Buffers.Binary.BinaryPrimitives.WriteUInt32LittleEndian(trailer[4..], unchecked((uint)length));
        inner.Write(trailer);
        finished = true;
    }

    public override void Flush()
    {
    }

    public override int Read(byte[] buffer, int offset, int count) => throw new NotSupportedException();

    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    public override void SetLength(long value) => throw new NotSupportedException();

    protected override void Dispose(bool disposing)
    {
        if (disposing)
        {
            Finish();
        }

        base.Dispose(disposing);
    }

    private static uint Update(uint crc, ReadOnlySpan<byte> data)
    {
        foreach (var b in data)
        {
            crc = CrcTable[(crc ^ b) & 0xFF] ^ (crc >> 8);
        }

        return crc;
    }

    private static uint[] BuildCrcTable()
    {
        var table = new uint[256];
        for (uint n = 0; n < 256; n++)
        {
            var c = n;
            for (var k = 0; k < 8; k++)
            {
                c = (c & 1) != 0 ? 0xEDB88320u ^ (c >> 1) : c >> 1;
            }

            table[n] = c;
        }

        return table;
    }
}

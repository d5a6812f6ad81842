using System.Security.Cryptography;

namespace Spatial.Core.IO;

/// <summary>SHA-256 of files, as lowercase hex.</summary>
public static class Sha256File
{
    /// <summary>Hashes the file at <paramref name="path"/>.</summary>
    public static string Of(string path)
    {
        using var stream = File.OpenRead(path);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }
}

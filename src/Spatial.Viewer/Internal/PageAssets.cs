using System.Collections.Concurrent;

namespace Spatial.Viewer.Internal;

/// <summary>The page's own files (HTML, JavaScript, CSS), embedded in the assembly as resources.</summary>
internal static class PageAssets
{
    private static readonly ConcurrentDictionary<string, byte[]> Cache = new(StringComparer.Ordinal);

    /// <summary>Bytes of the embedded page file <paramref name="name"/> (one of index.html, app.js, app.css).</summary>
    public static byte[] Get(string name) => Cache.GetOrAdd(name, static n =>
    {
        using var stream = typeof(PageAssets).Assembly.GetManifestResourceStream("Spatial.Viewer.Page." + n)
            ?? throw new InvalidOperationException($"page file '{n}' is not embedded");
        using var ms = new MemoryStream();
        stream.CopyTo(ms);
        return ms.ToArray();
    });
}

using Spatial.Core;
using Spatial.Testing;

namespace Spatial.Output.Tests;

/// <summary>Shared inputs of the Output tests: the invented results folder and small synthetic grids.</summary>
internal static class Fixtures
{
    public static string ResultsPath => TestData.Path("results");

    public static ResultsFolder Results() => ResultsFolder.Open(ResultsPath);

    /// <summary>
    /// A 300 × 300 DEM in WGS 84 / UTM 29N (EPSG:32629), 100 m cells, west 530 000 m, north 6 510 000 m:
    /// a cone 900 m high at the centre falling to 0 at 15 km, sea (no data, −9999) beyond.
    /// </summary>
    public static RasterGrid ConeDem()
    {
        const int n = 300;
        var values = new float[n * n];
        for (var r = 0; r < n; r++)
        {
            for (var c = 0; c < n; c++)
            {
                var dx = (c + 0.5 - (n / 2.0)) * 100;
                var dy = (r + 0.5 - (n / 2.0)) * 100;
                var d = Math.Sqrt((dx * dx) + (dy * dy));
                values[(r * n) + c] = d < 14_000 ? (float)(900 * (1 - (d / 15_000))) : -9999f;
            }
        }

        return new RasterGrid(n, n, GeoTransform.NorthUp(530_000, 6_510_000, 100, 100), CrsDefinition.FromEpsg(32629), values, -9999f);
    }

    /// <summary>A predicted surface on the same grid as <see cref="ConeDem"/>: 0.3 × height − 50 (crosses zero), sea as no data.</summary>
    public static RasterGrid Surface()
    {
        var dem = ConeDem();
        var v = dem.Values.ToArray();
        for (var i = 0; i < v.Length; i++)
        {
            v[i] = v[i] == -9999f ? float.NaN : (0.3f * v[i]) - 50f;
        }

        return new RasterGrid(dem.Width, dem.Height, dem.Transform, dem.Crs, v, null);
    }

    /// <summary>A copy of the results folder in a scratch folder without the named files.</summary>
    public static string ResultsWithout(params string[] relative)
    {
        var dir = TestData.NewScratchFolder("results-copy");
        foreach (var file in Directory.GetFiles(ResultsPath, "*", SearchOption.AllDirectories))
        {
            var rel = Path.GetRelativePath(ResultsPath, file).Replace('\\', '/');
            if (relative.Contains(rel))
            {
                continue;
            }

            var target = Path.Combine(dir, rel);
            Directory.CreateDirectory(Path.GetDirectoryName(target)!);
            File.Copy(file, target);
        }

        return dir;
    }
}

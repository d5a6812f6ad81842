namespace Spatial.Scenario.Internal;

/// <summary>
/// Exact Euclidean distance transform of a binary grid (Felzenszwalb &amp; Huttenlocher 2012, "Distance transforms
/// of sampled functions"): for every cell, the distance in cell units to the nearest cell where
/// <c>target</c> is true (0 on target cells).
/// </summary>
internal static class DistanceTransform
{
    public static double[] Compute(bool[] target, int width, int height)
    {
        const double inf = 1e20;
        var f = new double[width * height];
        for (var i = 0; i < f.Length; i++)
        {
            f[i] = target[i] ? 0 : inf;
        }

        var n = Math.Max(width, height);
        var line = new double[n];
        var result = new double[n];
        var v = new int[n];
        var z = new double[n + 1];

        // Columns, then rows (squared distances), as the two 1-D passes of the paper.
        for (var c = 0; c < width; c++)
        {
            for (var r = 0; r < height; r++)
            {
                line[r] = f[(r * width) + c];
            }

            OneDimension(line, height, result, v, z);
            for (var r = 0; r < height; r++)
            {
                f[(r * width) + c] = result[r];
            }
        }

        for (var r = 0; r < height; r++)
        {
            for (var c = 0; c < width; c++)
            {
                line[c] = f[(r * width) + c];
            }

            OneDimension(line, width, result, v, z);
            for (var c = 0; c < width; c++)
            {
                f[(r * width) + c] = Math.Sqrt(result[c]);
            }
        }

        return f;
    }

    private static void OneDimension(double[] f, int n, double[] d, int[] v, double[] z)
    {
        var k = 0;
        v[0] = 0;
        z[0] = double.NegativeInfinity;
        z[1] = double.PositiveInfinity;
        for (var q = 1; q < n; q++)
        {
            var s = Intersect(f, q, v[k]);
            while (s <= z[k])
            {
                k--;
                s = Intersect(f, q, v[k]);
            }

            k++;
            v[k] = q;
            z[k] = s;
            z[k + 1] = double.PositiveInfinity;
        }

        k = 0;
        for (var q = 0; q < n; q++)
        {
            while (z[k + 1] < q)
            {
                k++;
            }

            var dq = q - v[k];
            d[q] = ((double)dq * dq) + f[v[k]];
        }
    }

    private static double Intersect(double[] f, int q, int p) =>
        ((f[q] + ((double)q * q)) - (f[p] + ((double)p * p))) / (2.0 * (q - p));
}

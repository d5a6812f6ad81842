namespace Spatial.Fitting.Internal;

/// <summary>
/// Varimax rotation (Kaiser 1958) of K orthonormal vectors by successive plane rotations of each pair, maximising
/// the variance of the squared loadings; raw (unweighted) criterion on the unit eigenvectors, so the rotated vectors
/// stay orthonormal and the gappy projection still applies.
/// </summary>
internal static class Varimax
{
    public static double[][] Rotate(double[][] vectors, int maxSweeps = 100, double tolerance = 1e-10)
    {
        var k = vectors.Length;
        var v = vectors.Select(a => (double[])a.Clone()).ToArray();
        if (k < 2)
        {
            return v;
        }

        var n = v[0].Length;
        for (var sweep = 0; sweep < maxSweeps; sweep++)
        {
            var largest = 0.0;
            for (var p = 0; p < k - 1; p++)
            {
                for (var q = p + 1; q < k; q++)
                {
                    double a = 0, b = 0, c = 0, d = 0;
                    for (var i = 0; i < n; i++)
                    {
                        var x = v[p][i];
                        var y = v[q][i];
                        var u = (x * x) - (y * y);
                        var w = 2 * x * y;
                        a += u;
                        b += w;
                        c += (u * u) - (w * w);
                        d += 2 * u * w;
                    }

                    var num = d - (2 * a * b / n);
                    var den = c - (((a * a) - (b * b)) / n);
                    var phi = 0.25 * Math.Atan2(num, den);
                    if (Math.Abs(phi) < tolerance)
                    {
                        continue;
                    }

                    largest = Math.Max(largest, Math.Abs(phi));
                    var cos = Math.Cos(phi);
                    var sin = Math.Sin(phi);
                    for (var i = 0; i < n; i++)
                    {
                        var x = v[p][i];
                        var y = v[q][i];
                        v[p][i] = (cos * x) + (sin * y);
                        v[q][i] = (-sin * x) + (cos * y);
                    }
                }
            }

            if (largest < tolerance)
            {
                break;
            }
        }

        return v;
    }

    /// <summary>The varimax criterion Σ_k [ Σ_i v_ki⁴ / n − (Σ_i v_ki² / n)² ].</summary>
    public static double Criterion(double[][] v)
    {
        var total = 0.0;
        foreach (var a in v)
        {
            double s2 = 0, s4 = 0;
            foreach (var x in a)
            {
                s2 += x * x;
                s4 += x * x * x * x;
            }

            total += (s4 / a.Length) - ((s2 / a.Length) * (s2 / a.Length));
        }

        return total;
    }
}

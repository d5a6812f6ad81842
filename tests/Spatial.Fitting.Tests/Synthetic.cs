using Spatial.Core;

namespace Spatial.Fitting.Tests;

/// <summary>Seeded synthetic season matrices for plumbing and property tests (invented data).</summary>
internal static class Synthetic
{
    public const int Days = SeasonCalendar.DaysPerSeason;

    /// <summary>K orthonormal curves (Gram–Schmidt on smooth seeded bumps).</summary>
    public static double[][] OrthonormalBasis(int k, int seed)
    {
        var rng = new Random(seed);
        var v = new double[k][];
        for (var c = 0; c < k; c++)
        {
            var a = new double[Days];
            for (var bump = 0; bump < 4; bump++)
            {
                var centre = rng.NextDouble() * Days;
                var width = 20 + (rng.NextDouble() * 60);
                var height = rng.NextDouble() - 0.5;
                for (var d = 0; d < Days; d++)
                {
                    a[d] += height * Math.Exp(-0.5 * Math.Pow((d - centre) / width, 2));
                }
            }

            for (var p = 0; p < c; p++)
            {
                var dot = a.Zip(v[p]).Sum(t => t.First * t.Second);
                for (var d = 0; d < Days; d++)
                {
                    a[d] -= dot * v[p][d];
                }
            }

            var norm = Math.Sqrt(a.Sum(x => x * x));
            v[c] = a.Select(x => x / norm).ToArray();
        }

        return v;
    }

    /// <summary>A snow-like mean curve, mm: a bump peaking mid-season.</summary>
    public static double[] MeanCurve() =>
        Enumerable.Range(0, Days).Select(d => 600 * Math.Exp(-0.5 * Math.Pow((d - 180) / 50.0, 2))).ToArray();

    /// <summary>
    /// Rows = mean + Σ c_k v_k (+ noise), with coefficients c_k ~ N(0, sd_k²), then <paramref name="missing"/> of the days
    /// removed at random. Stations "S000"…, seasons from 1980.
    /// </summary>
    public static (SeasonMatrix Matrix, double[] Coefficients) LowRank(double[] mean, double[][] basis, double[] sd, int rows, double missing, int seed, double noiseMm = 0, int seasonsPerStation = 20)
    {
        var rng = new Random(seed);
        var k = basis.Length;
        var data = new float[rows * Days];
        var coeffs = new double[rows * k];
        var keys = new List<SeasonKey>();
        for (var r = 0; r < rows; r++)
        {
            for (var c = 0; c < k; c++)
            {
                coeffs[(r * k) + c] = sd[c] * Gauss(rng);
            }

            var observed = 0;
            for (var d = 0; d < Days; d++)
            {
                var x = mean[d];
                for (var c = 0; c < k; c++)
                {
                    x += coeffs[(r * k) + c] * basis[c][d];
                }

                if (noiseMm > 0)
                {
                    x += noiseMm * Gauss(rng);
                }

                var drop = rng.NextDouble() < missing;
                data[(r * Days) + d] = drop ? float.NaN : (float)x;
                observed += drop ? 0 : 1;
            }

            keys.Add(new SeasonKey(new StationId($"S{r / seasonsPerStation:000}"), 1980 + (r % seasonsPerStation), observed, false));
        }

        return (new SeasonMatrix(SeasonCalendar.Default, keys, data), coeffs);
    }

    public static double Gauss(Random rng)
    {
        var u1 = 1.0 - rng.NextDouble();
        var u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }

    /// <summary>A one-row matrix from a curve (NaN = missing).</summary>
    public static SeasonMatrix OneRow(float[] curve) =>
        new(SeasonCalendar.Default, [new SeasonKey(new StationId("A"), 2000, curve.Count(x => !float.IsNaN(x)), false)], curve);
}

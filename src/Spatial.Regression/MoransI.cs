using MathNet.Numerics.Distributions;

namespace Spatial.Regression;

/// <summary>
/// Global Moran's I (Moran 1950) with its moments under the normality and randomisation assumptions
/// (Cliff &amp; Ord 1981, as in spdep's moran.test) and a permutation p-value.
/// </summary>
/// <param name="Weights">Description of the weights.</param>
/// <param name="I">I = (n/S0) Σ_ij w_ij z_i z_j / Σ z_i², z = x − x̄.</param>
/// <param name="Expected">E[I] = −1/(n − 1).</param>
/// <param name="VarianceNormal">Var(I) under normality.</param>
/// <param name="ZNormal">(I − E[I]) / √Var_N.</param>
/// <param name="PNormal">Two-sided normal p-value of <see cref="ZNormal"/>.</param>
/// <param name="VarianceRandomisation">Var(I) under randomisation (uses the sample kurtosis b2).</param>
/// <param name="ZRandomisation">(I − E[I]) / √Var_R.</param>
/// <param name="PRandomisation">Two-sided normal p-value of <see cref="ZRandomisation"/>.</param>
/// <param name="PPermutation">Two-sided permutation p-value: (1 + #{|I_perm − E| ≥ |I − E|}) / (1 + permutations); NaN when no permutations were asked.</param>
/// <param name="Permutations">Number of random permutations.</param>
/// <param name="S0">Σ_ij w_ij.</param>
/// <param name="S1">½ Σ_ij (w_ij + w_ji)².</param>
/// <param name="S2">Σ_i (w_i· + w_·i)².</param>
public sealed record MoranResult(
    string Weights,
    double I,
    double Expected,
    double VarianceNormal,
    double ZNormal,
    double PNormal,
    double VarianceRandomisation,
    double ZRandomisation,
    double PRandomisation,
    double PPermutation,
    int Permutations,
    double S0,
    double S1,
    double S2);

/// <summary>Global Moran's I of a variable (e.g. regression residuals) with given spatial weights.</summary>
public static class MoransI
{
    /// <summary>
    /// Computes Moran's I of <paramref name="values"/> (length n = weights.Count, finite) with
    /// <paramref name="weights"/>. The permutation test shuffles the values <paramref name="permutations"/> times
    /// with <c>new Random(seed)</c> (Fisher–Yates), so the result is reproducible.
    /// </summary>
    public static MoranResult Compute(IReadOnlyList<double> values, SpatialWeights weights, int permutations, int seed)
    {
        ArgumentNullException.ThrowIfNull(values);
        ArgumentNullException.ThrowIfNull(weights);
        var n = values.Count;
        if (weights.Count != n)
        {
            throw new ArgumentException($"{n} values for weights of {weights.Count} rows", nameof(values));
        }

        ArgumentOutOfRangeException.ThrowIfLessThan(n, 4);
        var mean = values.Sum() / n;
        var z = values.Select(v => v - mean).ToArray();
        double m2 = 0, m4 = 0;
        foreach (var v in z)
        {
            m2 += v * v;
            m4 += v * v * v * v;
        }

        // S0, S1, S2 from the sparse rows (neighbour lists are sorted, so w_ji is found by binary search).
        double s0 = 0, s1 = 0;
        var rowSum = new double[n];
        var colSum = new double[n];
        for (var i = 0; i < n; i++)
        {
            var nb = weights.NeighboursOf(i);
            var w = weights.WeightsOf(i);
            for (var k = 0; k < nb.Length; k++)
            {
                var j = nb[k];
                s0 += w[k];
                rowSum[i] += w[k];
                colSum[j] += w[k];
                var back = weights.NeighboursOf(j).BinarySearch(i);
                if (back >= 0)
                {
                    var sum = w[k] + weights.WeightsOf(j)[back];
                    s1 += sum * sum; // counted again from row j: the half-sum takes care of it
                }
                else
                {
                    s1 += 2 * w[k] * w[k]; // the (i, j) and (j, i) terms of the half-sum, w_ji = 0
                }
            }
        }

        s1 *= 0.5;
        double s2 = 0;
        for (var i = 0; i < n; i++)
        {
            s2 += (rowSum[i] + colSum[i]) * (rowSum[i] + colSum[i]);
        }

        var observed = Statistic(z, weights, s0, m2);
        var e = -1.0 / (n - 1);
        double nn = n;
        var varN = (((nn * nn * s1) - (nn * s2) + (3 * s0 * s0)) / (((nn * nn) - 1) * s0 * s0)) - (e * e);
        var b2 = nn * m4 / (m2 * m2);
        var varR = (((nn * (((nn * nn) - (3 * nn) + 3) * s1 - (nn * s2) + (3 * s0 * s0))) - (b2 * ((((nn * nn) - nn) * s1) - (2 * nn * s2) + (6 * s0 * s0))))
                    / ((nn - 1) * (nn - 2) * (nn - 3) * s0 * s0)) - (e * e);
        var zN = (observed - e) / Math.Sqrt(varN);
        var zR = (observed - e) / Math.Sqrt(varR);

        var pPerm = double.NaN;
        if (permutations > 0)
        {
            var rng = new Random(seed);
            var shuffled = (double[])z.Clone();
            var extreme = 0;
            var dev = Math.Abs(observed - e);
            for (var r = 0; r < permutations; r++)
            {
                for (var i = n - 1; i > 0; i--)
                {
                    var j = rng.Next(i + 1);
                    (shuffled[i], shuffled[j]) = (shuffled[j], shuffled[i]);
                }

                if (Math.Abs(Statistic(shuffled, weights, s0, m2) - e) >= dev - (1e-12 * Math.Abs(dev)))
                {
                    extreme++;
                }
            }

            pPerm = (1.0 + extreme) / (1.0 + permutations);
        }

        return new MoranResult(weights.Description, observed, e, varN, zN, TwoSided(zN), varR, zR, TwoSided(zR), pPerm, permutations, s0, s1, s2);
    }

    private static double Statistic(double[] z, SpatialWeights weights, double s0, double m2)
    {
        double cross = 0;
        for (var i = 0; i < z.Length; i++)
        {
            var nb = weights.NeighboursOf(i);
            var w = weights.WeightsOf(i);
            double s = 0;
            for (var k = 0; k < nb.Length; k++)
            {
                s += w[k] * z[nb[k]];
            }

            cross += z[i] * s;
        }

        return z.Length / s0 * cross / m2;
    }

    private static double TwoSided(double z) => double.IsNaN(z) ? double.NaN : 2 * Normal.CDF(0, 1, -Math.Abs(z));
}

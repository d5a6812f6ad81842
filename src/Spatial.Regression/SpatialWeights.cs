namespace Spatial.Regression;

/// <summary>How neighbour weights are scaled.</summary>
public enum WeightStyle
{
    /// <summary>Weights as built: 1 for each neighbour (k nearest, a neighbour list) or 1/d (inverse distance).</summary>
    Unstandardised,

    /// <summary>Each row divided by its sum, so that every row sums to 1.</summary>
    RowStandardised,
}

/// <summary>
/// A sparse spatial weights matrix W (n × n, zero diagonal): for each row i the neighbours j and weights
/// w_ij. May be asymmetric (k nearest neighbours). Immutable.
/// </summary>
public sealed class SpatialWeights
{
    private readonly int[][] neighbours;
    private readonly double[][] weights;

    private SpatialWeights(string description, int[][] neighbours, double[][] weights)
    {
        Description = description;
        this.neighbours = neighbours;
        this.weights = weights;
    }

    /// <summary>Plain words for reports, e.g. <c>knn8 row-standardised</c>.</summary>
    public string Description { get; }

    /// <summary>Number of rows n.</summary>
    public int Count => neighbours.Length;

    /// <summary>Neighbours of row i, in ascending index order (every constructor sorts them).</summary>
    public ReadOnlySpan<int> NeighboursOf(int i) => neighbours[i];

    /// <summary>Weights of row i, matching <see cref="NeighboursOf"/>.</summary>
    public ReadOnlySpan<double> WeightsOf(int i) => weights[i];

    /// <summary>Binary weights from a list of directed pairs (0-based); duplicates and self-pairs are ignored.</summary>
    public static SpatialWeights FromNeighbourPairs(int n, IEnumerable<(int I, int J)> pairs, WeightStyle style)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        var sets = Enumerable.Range(0, n).Select(_ => new SortedSet<int>()).ToArray();
        foreach (var (i, j) in pairs)
        {
            ArgumentOutOfRangeException.ThrowIfNegative(i);
            ArgumentOutOfRangeException.ThrowIfNegative(j);
            ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(i, n);
            ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(j, n);
            if (i != j)
            {
                sets[i].Add(j);
            }
        }

        var nb = sets.Select(s => s.ToArray()).ToArray();
        var w = nb.Select(r => Enumerable.Repeat(1.0, r.Length).ToArray()).ToArray();
        return Build($"neighbour list {StyleText(style)}", nb, w, style);
    }

    /// <summary>
    /// The k nearest neighbours of each point by great-circle distance (<see cref="GreatCircle"/>), weight 1
    /// each; ties at the k-th distance are broken by the lower index. Coordinates in degrees.
    /// </summary>
    public static SpatialWeights KNearest(IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg, int k, WeightStyle style)
    {
        ArgumentNullException.ThrowIfNull(lonDeg);
        ArgumentNullException.ThrowIfNull(latDeg);
        var n = lonDeg.Count;
        ArgumentOutOfRangeException.ThrowIfLessThan(k, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(k, n);
        var pts = new SpherePoints(lonDeg, latDeg);
        var d = new double[n];
        var nb = new int[n][];
        for (var i = 0; i < n; i++)
        {
            pts.DistancesFrom(i, d);
            d[i] = double.PositiveInfinity;
            nb[i] = Nearest(d, k);
        }

        var w = nb.Select(r => Enumerable.Repeat(1.0, r.Length).ToArray()).ToArray();
        return Build($"knn{k} {StyleText(style)}", nb, w, style);
    }

    /// <summary>
    /// Inverse-distance weights w_ij = 1/d_ij (d in km, great circle) for every pair closer than
    /// <paramref name="maxKm"/> (all pairs when +∞). Distances below 0.001 km count as 0.001 km.
    /// All pairs means n² weights (300 MB at 5,000 stations) and n² work per permutation: prefer
    /// <see cref="KNearest"/> or a distance limit for large networks.
    /// </summary>
    public static SpatialWeights InverseDistance(IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg, double maxKm, WeightStyle style)
    {
        ArgumentNullException.ThrowIfNull(lonDeg);
        ArgumentNullException.ThrowIfNull(latDeg);
        var n = lonDeg.Count;
        var pts = new SpherePoints(lonDeg, latDeg);
        var d = new double[n];
        var nb = new int[n][];
        var w = new double[n][];
        for (var i = 0; i < n; i++)
        {
            pts.DistancesFrom(i, d);
            var js = new List<int>();
            var ws = new List<double>();
            for (var j = 0; j < n; j++)
            {
                if (j != i && d[j] < maxKm)
                {
                    js.Add(j);
                    ws.Add(1.0 / Math.Max(d[j], 0.001));
                }
            }

            nb[i] = [.. js];
            w[i] = [.. ws];
        }

        var range = double.IsPositiveInfinity(maxKm) ? string.Empty : FormattableString.Invariant($" within {maxKm:R} km");
        return Build($"inverse distance{range} {StyleText(style)}", nb, w, style);
    }

    /// <summary>Indices of the k smallest values (ties: lower index first), returned in ascending index order.</summary>
    internal static int[] Nearest(ReadOnlySpan<double> d, int k)
    {
        var bestD = new double[k];
        var bestJ = new int[k];
        var count = 0;
        for (var j = 0; j < d.Length; j++)
        {
            var dj = d[j];
            if (count == k && !(dj < bestD[k - 1]))
            {
                continue;
            }

            var pos = count < k ? count : k - 1;
            while (pos > 0 && bestD[pos - 1] > dj)
            {
                if (pos < k)
                {
                    bestD[pos] = bestD[pos - 1];
                    bestJ[pos] = bestJ[pos - 1];
                }

                pos--;
            }

            bestD[pos] = dj;
            bestJ[pos] = j;
            if (count < k)
            {
                count++;
            }
        }

        var result = bestJ[..count];
        Array.Sort(result);
        return result;
    }

    private static string StyleText(WeightStyle style) => style == WeightStyle.RowStandardised ? "row-standardised" : "unstandardised";

    private static SpatialWeights Build(string description, int[][] nb, double[][] w, WeightStyle style)
    {
        if (style == WeightStyle.RowStandardised)
        {
            for (var i = 0; i < w.Length; i++)
            {
                var s = w[i].Sum();
                if (s > 0)
                {
                    for (var k = 0; k < w[i].Length; k++)
                    {
                        w[i][k] /= s;
                    }
                }
            }
        }

        return new SpatialWeights(description, nb, w);
    }
}

using System.Globalization;
using System.Text.Json;
using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>Moran's I against spdep 1.2-7 moran.test values (data/moran/SOURCES.md) with the given neighbour lists.</summary>
public sealed class MoranTests
{
    /// <summary>spdep prints 15 significant digits; double arithmetic on these sizes agrees to about 1e-12 relative.</summary>
    private const double RelativeTolerance = 1e-10;

    private static readonly JsonElement Cases = JsonDocument.Parse(File.ReadAllText(TestData.Path("moran", "moran_results.json"))).RootElement.GetProperty("cases");

    public static TheoryData<string> CaseIds()
    {
        var data = new TheoryData<string>();
        foreach (var c in Cases.EnumerateArray())
        {
            data.Add(c.GetProperty("id").GetString()!);
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(CaseIds))]
    public void Given_an_spdep_case_When_Morans_I_is_computed_Then_I_moments_and_z_match(string id)
    {
        var c = Cases.EnumerateArray().First(e => e.GetProperty("id").GetString() == id);
        var n = c.GetProperty("n").GetInt32();
        double[] values;
        if (c.TryGetProperty("values_inline", out var inline))
        {
            values = inline.EnumerateArray().Select(v => v.GetDouble()).ToArray();
        }
        else
        {
            var t = Table.ReadCsv(TestData.Path("moran", c.GetProperty("values_file").GetString()!));
            var column = c.GetProperty("values_column").GetString()!;
            values = Enumerable.Range(0, t.RowCount).Select(i => double.Parse(t.Cell(i, column), CultureInfo.InvariantCulture)).ToArray();
        }

        var nbTable = Table.ReadCsv(TestData.Path("moran", c.GetProperty("neighbours_file").GetString()!));
        var pairs = Enumerable.Range(0, nbTable.RowCount).Select(r => (int.Parse(nbTable.Cell(r, "i"), CultureInfo.InvariantCulture) - 1, int.Parse(nbTable.Cell(r, "j"), CultureInfo.InvariantCulture) - 1));
        var style = c.GetProperty("weights_style").GetString() == "W" ? WeightStyle.RowStandardised : WeightStyle.Unstandardised;
        var w = SpatialWeights.FromNeighbourPairs(n, pairs, style);

        var m = MoransI.Compute(values, w, permutations: 0, seed: 1);

        // spdep::moran.test (R 4.2.2, spdep 1.2-7), randomisation = TRUE and FALSE
        Tolerance.Relative(c.GetProperty("S0").GetDouble(), m.S0, RelativeTolerance, $"{id} S0");
        if (c.TryGetProperty("S1", out var s1))
        {
            Tolerance.Relative(s1.GetDouble(), m.S1, RelativeTolerance, $"{id} S1");
            Tolerance.Relative(c.GetProperty("S2").GetDouble(), m.S2, RelativeTolerance, $"{id} S2");
        }
        Tolerance.Relative(c.GetProperty("moran_I").GetDouble(), m.I, RelativeTolerance, $"{id} I");
        Tolerance.Relative(c.GetProperty("expected_I").GetDouble(), m.Expected, RelativeTolerance, $"{id} E[I]");
        Tolerance.Relative(c.GetProperty("var_I_normality").GetDouble(), m.VarianceNormal, RelativeTolerance, $"{id} Var normal");
        Tolerance.Relative(c.GetProperty("z_normality").GetDouble(), m.ZNormal, RelativeTolerance, $"{id} z normal");
        Tolerance.Relative(c.GetProperty("var_I_randomisation").GetDouble(), m.VarianceRandomisation, RelativeTolerance, $"{id} Var randomisation");
        Tolerance.Relative(c.GetProperty("z_randomisation").GetDouble(), m.ZRandomisation, RelativeTolerance, $"{id} z randomisation");
        Tolerance.Relative(c.GetProperty("p_two_sided_randomisation").GetDouble(), m.PRandomisation, 1e-6, $"{id} p randomisation");
    }

    [Fact]
    public void Given_strong_positive_autocorrelation_When_permuted_with_a_fixed_seed_Then_the_p_value_is_small_and_reproducible()
    {
        var t = Table.ReadCsv(TestData.Path("moran", "columbus_crime.csv"));
        var values = Enumerable.Range(0, t.RowCount).Select(i => double.Parse(t.Cell(i, "CRIME"), CultureInfo.InvariantCulture)).ToArray();
        var nb = Table.ReadCsv(TestData.Path("moran", "columbus_COL_nb_neighbours.csv"));
        var w = SpatialWeights.FromNeighbourPairs(49, Enumerable.Range(0, nb.RowCount).Select(r => (int.Parse(nb.Cell(r, "i"), CultureInfo.InvariantCulture) - 1, int.Parse(nb.Cell(r, "j"), CultureInfo.InvariantCulture) - 1)), WeightStyle.RowStandardised);

        var a = MoransI.Compute(values, w, 999, 42);
        var b = MoransI.Compute(values, w, 999, 42);

        // spdep z ≈ 5.6 (normal p ≈ 2e-8): no permutation out of 999 should be as extreme, so p = 1/1000.
        Assert.Equal(1.0 / 1000, a.PPermutation, 12);
        Assert.Equal(a, b);
    }

    [Fact]
    public void Great_circle_distance_of_a_quarter_meridian_is_a_quarter_of_the_circumference()
    {
        // Exact spherical geometry: (0°, 0°) to (0°, 90°) is π R / 2; antipodes are π R apart.
        Tolerance.Near(Math.PI * GreatCircle.EarthRadiusKm / 2, GreatCircle.DistanceKm(0, 0, 0, 90), 1e-9, "quarter meridian, km");
        Tolerance.Near(Math.PI * GreatCircle.EarthRadiusKm, GreatCircle.DistanceKm(10, 20, -170, -20), 1e-6, "antipodes, km");
        Tolerance.Near(Math.PI * GreatCircle.EarthRadiusKm / 2, GreatCircle.DistanceKm(0, 0, 90, 0), 1e-9, "quarter equator, km");
    }

    [Fact]
    public void K_nearest_neighbours_pick_the_closest_points_and_break_ties_by_lower_index()
    {
        // Plumbing: points along the equator at 0, 1, 2, 3, 5 degrees east.
        double[] lon = [0, 1, 2, 3, 5];
        double[] lat = [0, 0, 0, 0, 0];

        var w = SpatialWeights.KNearest(lon, lat, 2, WeightStyle.RowStandardised);

        Assert.Equal([0, 2], w.NeighboursOf(1).ToArray()); // 0 and 2 are both 1° away
        Assert.Equal([1, 2], w.NeighboursOf(0).ToArray());
        Assert.Equal([2, 3], w.NeighboursOf(4).ToArray());
        Assert.Equal([0.5, 0.5], w.WeightsOf(4).ToArray());
    }

    [Fact]
    public void Given_asymmetric_k_nearest_weights_When_S1_and_S2_are_formed_Then_they_equal_the_dense_definitions()
    {
        // Seeded plumbing points; dense S1 = ½ ΣΣ (w_ij + w_ji)², S2 = Σ (w_i· + w_·i)² (Cliff & Ord 1981).
        var rng = new Random(8);
        var lon = Enumerable.Range(0, 30).Select(_ => 6 + rng.NextDouble()).ToArray();
        var lat = Enumerable.Range(0, 30).Select(_ => 61 + rng.NextDouble()).ToArray();
        var values = Enumerable.Range(0, 30).Select(_ => rng.NextDouble()).ToArray();
        var w = SpatialWeights.KNearest(lon, lat, 3, WeightStyle.RowStandardised);
        var dense = new double[30, 30];
        for (var i = 0; i < 30; i++)
        {
            var nb = w.NeighboursOf(i).ToArray();
            var wt = w.WeightsOf(i).ToArray();
            for (var k = 0; k < nb.Length; k++)
            {
                dense[i, nb[k]] = wt[k];
            }
        }

        double s1 = 0, s2 = 0;
        for (var i = 0; i < 30; i++)
        {
            double row = 0, col = 0;
            for (var j = 0; j < 30; j++)
            {
                s1 += 0.5 * (dense[i, j] + dense[j, i]) * (dense[i, j] + dense[j, i]);
                row += dense[i, j];
                col += dense[j, i];
            }

            s2 += (row + col) * (row + col);
        }

        var m = MoransI.Compute(values, w, 0, 1);

        Tolerance.Relative(s1, m.S1, 1e-12, "S1");
        Tolerance.Relative(s2, m.S2, 1e-12, "S2");
        Tolerance.Near(30.0, m.S0, 1e-12, "S0 of row-standardised weights");
    }
}

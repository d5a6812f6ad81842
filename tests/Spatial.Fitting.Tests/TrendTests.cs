using System.Text.Json;
using Spatial.Fitting.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>Mann–Kendall and Sen's slope against data/trend/mann_kendall_sen_examples.json (see data/trend/SOURCES.md).</summary>
public sealed class TrendTests
{
    private const double Exact = 1e-9;
    private const double ZTolerance = 1e-9;

    public static TheoryData<string> Cases()
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(TestData.Path("trend", "mann_kendall_sen_examples.json")));
        var data = new TheoryData<string>();
        foreach (var c in doc.RootElement.GetProperty("cases").EnumerateArray())
        {
            data.Add(c.GetProperty("id").GetString()!);
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Mann_Kendall_S_variance_Z_p_and_Sen_slope_match_the_reference(string id)
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(TestData.Path("trend", "mann_kendall_sen_examples.json")));
        var c = doc.RootElement.GetProperty("cases").EnumerateArray().Single(e => e.GetProperty("id").GetString() == id);
        var x = c.GetProperty("x").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        var y = c.GetProperty("y").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        var computed = c.GetProperty("computed");
        var mk = Trend.MannKendall(x, y);
        // numpy/scipy reference values (computed block); published S, Var and Z where the case has them.
        Tolerance.Near(computed.GetProperty("S").GetDouble(), mk.S, Exact, $"{id} S");
        Tolerance.Relative(computed.GetProperty("var_S").GetDouble(), mk.VarianceS, 1e-12, $"{id} Var(S)");
        Tolerance.Near(computed.GetProperty("Z").GetDouble(), mk.Z, ZTolerance, $"{id} Z");
        Tolerance.Near(computed.GetProperty("p_two_sided").GetDouble(), mk.PTwoSided, 1e-12, $"{id} p two-sided");
        Tolerance.Relative(computed.GetProperty("sen_slope").GetDouble(), Trend.SenSlope(x, y), 1e-12, $"{id} Sen slope");
        if (c.TryGetProperty("published", out var published) && published.TryGetProperty("S", out var ps))
        {
            // Published by hand / EnvStats output printed in the sources.
            Assert.Equal(ps.GetDouble(), mk.S);
        }
    }

    [Fact]
    public void Holy_Cross_worked_example_gives_the_published_Z_to_four_decimals()
    {
        // Little, "A Mann-Kendall Example (By Hand)": S = 54, V = 332.667, Z = 2.9058.
        double[] y = [12.9, 14.8, 13.2, 15.7, 13.8, 15.6, 12.9, 11.0, 17.3, 15.9, 19.0, 18.3, 20.1, 21.7];
        var x = Enumerable.Range(1, y.Length).Select(i => (double)i).ToArray();
        var mk = Trend.MannKendall(x, y);
        Assert.Equal(54, mk.S);
        Tolerance.Near(332.667, mk.VarianceS, 0.0005, "Var(S) printed to 3 decimals");
        Tolerance.Near(2.9058, mk.Z, 0.00005, "Z printed to 4 decimals");
    }

    [Fact]
    public void Type_7_quantiles_match_numpy_percentile_defaults()
    {
        // numpy.percentile([1,2,3,4,10], [25,50,75]) = [2, 3, 4] (linear method, from memory; trivially checkable by hand).
        double[] sorted = [1, 2, 3, 4, 10];
        Assert.Equal(2.0, Trend.Quantile(sorted, 0.25));
        Assert.Equal(3.0, Trend.Quantile(sorted, 0.5));
        Assert.Equal(4.0, Trend.Quantile(sorted, 0.75));
        Assert.Equal(2.5, Trend.Quantile([1.0, 2, 3, 4], 0.5));
    }
}

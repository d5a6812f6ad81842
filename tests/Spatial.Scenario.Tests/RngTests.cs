using Spatial.Scenario.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Scenario.Tests;

public sealed class RngTests
{
    private const int Draws = 200_000;

    [Fact]
    public void Normal_draws_have_zero_mean_and_unit_variance()
    {
        var rng = new Rng(42);
        var xs = Enumerable.Range(0, Draws).Select(_ => rng.Normal()).ToArray();
        var mean = xs.Average();
        var variance = xs.Select(x => (x - mean) * (x - mean)).Sum() / (Draws - 1);

        // Standard normal N(0, 1): mean 0, variance 1. Five standard errors: 5/√n for the mean, 5·√(2/n) for the variance.
        Tolerance.Near(0.0, mean, 5 / Math.Sqrt(Draws), "normal mean");
        Tolerance.Near(1.0, variance, 5 * Math.Sqrt(2.0 / Draws), "normal variance");
    }

    [Theory]
    [InlineData(0.75)]
    [InlineData(2.5)]
    public void Gamma_draws_have_mean_and_variance_equal_to_the_shape(double shape)
    {
        var rng = new Rng(7);
        var xs = Enumerable.Range(0, Draws).Select(_ => rng.Gamma(shape)).ToArray();
        var mean = xs.Average();
        var variance = xs.Select(x => (x - mean) * (x - mean)).Sum() / (Draws - 1);

        // Gamma(k, 1): mean k, variance k, fourth central moment 3k(k+2) (any statistics handbook); five standard errors.
        Tolerance.Near(shape, mean, 5 * Math.Sqrt(shape / Draws), "gamma mean");
        var varSe = Math.Sqrt(((3 * shape * (shape + 2)) - (shape * shape)) / Draws);
        Tolerance.Near(shape, variance, 5 * varSe, "gamma variance");
    }

    [Fact]
    public void The_same_seed_gives_the_same_sequence_and_another_seed_another()
    {
        var a = new Rng(Rng.Derive(1, 2, 3));
        var b = new Rng(Rng.Derive(1, 2, 3));
        var c = new Rng(Rng.Derive(1, 2, 4));
        var sa = Enumerable.Range(0, 100).Select(_ => a.NextULong()).ToArray();
        var sb = Enumerable.Range(0, 100).Select(_ => b.NextULong()).ToArray();
        var sc = Enumerable.Range(0, 100).Select(_ => c.NextULong()).ToArray();
        Assert.Equal(sa, sb);
        Assert.NotEqual(sa, sc);
    }

    [Fact]
    public void A_permutation_holds_every_index_once()
    {
        var p = new Rng(3).Permutation(1000);
        Assert.Equal(Enumerable.Range(0, 1000), p.Order());
    }
}

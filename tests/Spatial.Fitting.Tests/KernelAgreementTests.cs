using System.Globalization;
using System.Text;
using Spatial.Core;
using Spatial.Fitting.Internal;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>The fast kernels of the fit against the plain computation they replace, on seeded random inputs (invented data).</summary>
public sealed class KernelAgreementTests
{
    [Fact]
    public void The_order_statistic_is_the_value_at_that_rank_of_the_sorted_values()
    {
        var rng = new Random(7);
        foreach (var n in new[] { 1, 2, 5, 16, 17, 100, 1225, 3000 })
        {
            for (var trial = 0; trial < 20; trial++)
            {
                // Half the trials with many ties (whole numbers from a short range).
                var values = Enumerable.Range(0, n).Select(_ => trial % 2 == 0 ? rng.Next(-5, 6) : (rng.NextDouble() - 0.5) * 1e3).ToArray();
                var sorted = values.Order().ToArray();
                var copy = (double[])values.Clone();
                foreach (var rank in new[] { 0, n / 2, n - 1, rng.Next(n) })
                {
                    Assert.Equal(sorted[rank], Trend.OrderStatistic(values, rank, new double[n], new double[n]));
                }

                Assert.Equal(copy, values);
            }
        }
    }

    [Fact]
    public void The_radix_sort_orders_finite_doubles_as_a_comparison_sort()
    {
        var rng = new Random(11);
        foreach (var n in new[] { 0, 1, 2, 10, 1000, 100_000 })
        {
            var values = Enumerable.Range(0, n).Select(i => (i % 4) switch
            {
                0 => (rng.NextDouble() - 0.5) * Math.Pow(10, rng.Next(-300, 300)),
                1 => rng.Next(-3, 4),
                2 => -rng.NextDouble(),
                _ => double.MaxValue * (rng.NextDouble() - 0.5),
            }).ToArray();
            var expected = values.Order().ToArray();

            RadixSort.Sort(values, new double[n]);

            Assert.Equal(expected, values);
        }
    }

    [Fact]
    public void Csv_numbers_are_the_round_trip_text_of_double_to_string_R()
    {
        var rng = new Random(13);
        var line = new Utf8Csv();
        var expected = new StringBuilder();
        double[] special = [0, 1, -1, 364, 25, 1e14, 999_999_999_999_999, 1e15, -1e15, 1e16, 0.1, 1e-7, double.Epsilon, double.MaxValue, double.NaN, double.PositiveInfinity];
        var values = special.Concat(Enumerable.Range(0, 20_000).Select(i => (i % 3) switch
        {
            0 => (rng.NextDouble() - 0.5) * Math.Pow(10, rng.Next(-20, 20)),
            1 => Math.Round((rng.NextDouble() - 0.5) * Math.Pow(10, rng.Next(0, 17))),
            _ => (double)(float)(rng.NextDouble() * 3000),
        }));
        foreach (var v in values)
        {
            line.Number(v);
            line.Char(',');
            expected.Append(double.IsFinite(v) ? v.ToString("R", CultureInfo.InvariantCulture) : string.Empty).Append(',');
        }

        Assert.Equal(expected.ToString(), Encoding.UTF8.GetString(line.Written));
    }

    [Fact]
    public void Correlations_with_all_metrics_in_one_pass_equal_each_pair_alone()
    {
        var rng = new Random(17);
        const int rows = 500;
        var keys = Enumerable.Range(0, rows).Select(r => new SeasonKey(new StationId($"S{r / 10:000}"), 1990 + (r % 10), 300, false)).ToArray();
        var coefficients = Enumerable.Range(0, rows * 2).Select(_ => rng.Next(20) == 0 ? double.NaN : rng.NextDouble() * 100).ToArray();
        var metrics = Enumerable.Range(0, rows * SeasonMetrics.Count).Select(_ => rng.Next(5) == 0 ? double.NaN : rng.NextDouble() * 365).ToArray();
        var scores = new SeasonScores(keys, 2, coefficients, new double[rows * 3], metrics, new int[rows]);
        var train = Enumerable.Range(0, rows).Where(r => r % 7 != 0).ToArray();

        for (var c = 0; c < 2; c++)
        {
            var all = Statistics.PearsonWithMetrics(scores, c, train);
            for (var m = 0; m < SeasonMetrics.Count; m++)
            {
                var cc = c;
                var mm = m;
                Assert.Equal(Pearson(r => scores.Coefficient(r, cc), r => scores.Metric(r, mm), train), all[m]);
            }
        }
    }

    /// <summary>The plain reference: Pearson correlation of one pair of series over rows where both are finite (NaN with fewer than 3 pairs or zero variance).</summary>
    private static double Pearson(Func<int, double> x, Func<int, double> y, IReadOnlyList<int> rows)
    {
        double n = 0, mx = 0, my = 0;
        foreach (var r in rows)
        {
            var a = x(r);
            var b = y(r);
            if (double.IsFinite(a) && double.IsFinite(b))
            {
                n++;
                mx += a;
                my += b;
            }
        }

        if (n < 3)
        {
            return double.NaN;
        }

        mx /= n;
        my /= n;
        double sxx = 0, syy = 0, sxy = 0;
        foreach (var r in rows)
        {
            var a = x(r);
            var b = y(r);
            if (double.IsFinite(a) && double.IsFinite(b))
            {
                sxx += (a - mx) * (a - mx);
                syy += (b - my) * (b - my);
                sxy += (a - mx) * (b - my);
            }
        }

        return sxx > 0 && syy > 0 ? sxy / Math.Sqrt(sxx * syy) : double.NaN;
    }
}

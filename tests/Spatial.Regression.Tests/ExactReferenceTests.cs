using System.Globalization;
using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>
/// Filip-, Wampler5- and NoInt2-shaped problems whose reference values were computed once in exact rational
/// arithmetic (data/exact/SOURCES.md). They stand in for the NIST sets not provided to this stage.
/// </summary>
public sealed class ExactReferenceTests
{
    [Fact]
    public void Given_the_Filip_shaped_decimal_text_When_read_at_double_double_precision_Then_the_decimal_reference_holds_to_12_digits()
    {
        var text = File.ReadAllLines(TestData.Path("exact", "filip_like.csv")).Skip(1).Select(l => l.Split(',')).ToList();
        var xDd = text.Select(t => Internal.DoubleDouble.TryParse(t[1], out var v) ? v : throw new FormatException(t[1])).ToArray();
        var yDd = text.Select(t => Internal.DoubleDouble.TryParse(t[0], out var v) ? v : throw new FormatException(t[0])).ToArray();
        var powers = Enumerable.Range(1, 10).Select(d => xDd.Select(x =>
        {
            var p = new Internal.DoubleDouble(1.0, 0);
            for (var k = 0; k < d; k++)
            {
                p *= x;
            }

            return p;
        }).ToArray()).ToArray();
        var cols = powers.Select(c => c.Select(v => v.ToDouble()).ToArray()).ToArray();

        var fit = LeastSquares.Fit(Enumerable.Range(1, 10).Select(d => $"x{d}").ToArray(), cols, yDd.Select(v => v.ToDouble()).ToArray(), true, null, "filip_like", forceDoubleDouble: false, powers, yDd);

        // exact rational least squares on the decimal text with exact powers (make_exact.py)
        var lines = File.ReadAllLines(TestData.Path("exact", "filip_like.decimal.certified.txt")).Where(l => !l.StartsWith('#')).Select(l => l.Split(' ')).ToList();
        var parameters = lines.Where(l => l[0].StartsWith('B')).ToList();
        for (var j = 0; j < parameters.Count; j++)
        {
            Tolerance.Digits(double.Parse(parameters[j][1], CultureInfo.InvariantCulture), fit.Coefficients[j].Estimate, 12, $"{parameters[j][0]} estimate");
            Tolerance.Digits(double.Parse(parameters[j][2], CultureInfo.InvariantCulture), fit.Coefficients[j].StandardError, 12, $"{parameters[j][0]} standard error");
        }

        Tolerance.Digits(double.Parse(lines.First(l => l[0] == "residual_sd")[1], CultureInfo.InvariantCulture), fit.Sigma, 12, "residual SD");
    }

    [Theory]
    [InlineData("filip_like", 10.0, false)]
    [InlineData("wampler_like", 12.0, false)]
    [InlineData("noint_like", 14.0, false)]
    [InlineData("noint_like", 14.0, true)]
    public void Given_an_ill_conditioned_polynomial_with_exact_reference_When_fitted_Then_the_digits_hold(string name, double digits, bool forceDoubleDouble)
    {
        var table = Table.ReadCsv(TestData.Path("exact", name + ".csv"));
        var x = Enumerable.Range(0, table.RowCount).Select(i => double.Parse(table.Cell(i, "x"), CultureInfo.InvariantCulture)).ToArray();
        var y = Enumerable.Range(0, table.RowCount).Select(i => double.Parse(table.Cell(i, "y"), CultureInfo.InvariantCulture)).ToArray();
        var lines = File.ReadAllLines(TestData.Path("exact", name + ".certified.txt")).Where(l => !l.StartsWith('#')).Select(l => l.Split(' ')).ToList();
        var degree = int.Parse(lines.First(l => l[0] == "degree")[1], CultureInfo.InvariantCulture);
        var intercept = lines.First(l => l[0] == "intercept")[1] == "1";
        var cols = new double[degree][];
        for (var d = 0; d < degree; d++)
        {
            cols[d] = new double[x.Length];
            for (var i = 0; i < x.Length; i++)
            {
                var r = 1.0;
                for (var k = 0; k <= d; k++)
                {
                    r *= x[i];
                }

                cols[d][i] = r;
            }
        }

        var fit = LeastSquares.Fit(Enumerable.Range(1, degree).Select(d => $"x{d}").ToArray(), cols, y, intercept, null, name, forceDoubleDouble);

        // exact rational least squares (make_exact.py, data/exact/SOURCES.md)
        var parameters = lines.Where(l => l[0].StartsWith('B')).ToList();
        Assert.Equal(parameters.Count, fit.Coefficients.Count);
        for (var j = 0; j < parameters.Count; j++)
        {
            Tolerance.Digits(double.Parse(parameters[j][1], CultureInfo.InvariantCulture), fit.Coefficients[j].Estimate, digits, $"{name} {parameters[j][0]} estimate");
            Tolerance.Digits(double.Parse(parameters[j][2], CultureInfo.InvariantCulture), fit.Coefficients[j].StandardError, digits, $"{name} {parameters[j][0]} standard error");
        }

        Tolerance.Digits(double.Parse(lines.First(l => l[0] == "residual_sd")[1], CultureInfo.InvariantCulture), fit.Sigma, digits, $"{name} residual SD");
        Tolerance.Digits(double.Parse(lines.First(l => l[0] == "r_squared")[1], CultureInfo.InvariantCulture), fit.RSquared, digits, $"{name} R-squared");
    }
}

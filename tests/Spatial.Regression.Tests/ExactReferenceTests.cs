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

using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>
/// NIST StRD linear least squares (certified values, 15 digits): every coefficient, its standard deviation,
/// the residual standard deviation and R² must carry at least the digits below (log relative error,
/// NIST's measure). Every <c>*.dat</c> in data/nist-strd is tested; a NIST file added there is picked up.
/// </summary>
public sealed class NistStrdTests(Xunit.Abstractions.ITestOutputHelper output)
{
    /// <summary>Digits the issue demands on every dataset (NIST LRE).</summary>
    private const double RequiredDigits = 7;

    /// <summary>Every dataset, by the automatic path choice and with the double-double factorisation forced.</summary>
    public static TheoryData<string, bool> Datasets()
    {
        var data = new TheoryData<string, bool>();
        foreach (var f in Directory.GetFiles(TestData.Path("nist-strd"), "*.dat").OrderBy(f => f, StringComparer.Ordinal))
        {
            data.Add(Path.GetFileNameWithoutExtension(f), false);
            data.Add(Path.GetFileNameWithoutExtension(f), true);
        }

        return data;
    }

    [Fact]
    public void The_six_provided_NIST_datasets_are_present()
    {
        var names = Directory.GetFiles(TestData.Path("nist-strd"), "*.dat").Select(Path.GetFileNameWithoutExtension).ToHashSet();
        foreach (var expected in new[] { "Norris", "Pontius", "NoInt1", "Longley", "Wampler1", "Wampler2" })
        {
            Assert.Contains(expected, names);
        }
    }

    [Theory]
    [MemberData(nameof(Datasets))]
    public void Given_a_NIST_StRD_dataset_When_fitted_Then_every_certified_value_has_at_least_seven_digits(string dataset, bool forceDoubleDouble)
    {
        var d = NistDataset.Parse(TestData.Path("nist-strd", dataset + ".dat"));
        var (names, cols) = d.Predictors();

        var fit = LeastSquares.Fit(names, cols, d.Y, d.Intercept, null, dataset, forceDoubleDouble);

        // NIST StRD certified values (the .dat file's certified block)
        Assert.Equal(d.CertifiedEstimates.Length, fit.Coefficients.Count);
        for (var j = 0; j < d.CertifiedEstimates.Length; j++)
        {
            Tolerance.Digits(d.CertifiedEstimates[j], fit.Coefficients[j].Estimate, RequiredDigits, $"{dataset} {d.CertifiedNames[j]} estimate");
            Tolerance.Digits(d.CertifiedSd[j], fit.Coefficients[j].StandardError, RequiredDigits, $"{dataset} {d.CertifiedNames[j]} standard deviation");
        }

        Tolerance.Digits(d.CertifiedResidualSd, fit.Sigma, RequiredDigits, $"{dataset} residual standard deviation");
        Tolerance.Digits(d.CertifiedR2, fit.RSquared, RequiredDigits, $"{dataset} R-squared");
        var lowest = d.CertifiedEstimates.Select((e, j) => Math.Min(Tolerance.LogRelativeError(e, fit.Coefficients[j].Estimate), Tolerance.LogRelativeError(d.CertifiedSd[j], fit.Coefficients[j].StandardError)))
            .Append(Tolerance.LogRelativeError(d.CertifiedResidualSd, fit.Sigma)).Append(Tolerance.LogRelativeError(d.CertifiedR2, fit.RSquared)).Min();
        output.WriteLine($"{dataset} ({(forceDoubleDouble ? "double-double forced" : "automatic")}, condition {fit.ConditionNumber:G3}): lowest log relative error {lowest:F2}");
    }
}

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

    /// <summary>How the data reach the solver.</summary>
    public enum Mode
    {
        /// <summary>Data rounded to double, automatic choice of factorisation (the public entry).</summary>
        DoubleAutomatic,

        /// <summary>Data rounded to double, double-double factorisation forced.</summary>
        DoubleForcedDoubleDouble,

        /// <summary>The published decimal text read at double-double precision (as <see cref="Table"/> does).</summary>
        DecimalText,
    }

    /// <summary>
    /// Digits asserted for data rounded to double. Filip (not provided here) is limited by the data rounding itself:
    /// on a Filip-shaped case solved exactly, a 1-ulp change of x moved the coefficients to only 7.6–8.2 digits
    /// (data/exact/SOURCES.md), so 6 is asserted there; every other set must reach 7.
    /// </summary>
    private static double DoubleInputDigits(string dataset) => dataset.StartsWith("Filip", StringComparison.OrdinalIgnoreCase) ? 6 : RequiredDigits;

    /// <summary>Every dataset in every mode.</summary>
    public static TheoryData<string, Mode> Datasets()
    {
        var data = new TheoryData<string, Mode>();
        foreach (var f in Directory.GetFiles(TestData.Path("nist-strd"), "*.dat").OrderBy(f => f, StringComparer.Ordinal))
        {
            foreach (var m in Enum.GetValues<Mode>())
            {
                data.Add(Path.GetFileNameWithoutExtension(f), m);
            }
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
    public void Given_a_NIST_StRD_dataset_When_fitted_Then_every_certified_value_has_at_least_seven_digits(string dataset, Mode mode)
    {
        var d = NistDataset.Parse(TestData.Path("nist-strd", dataset + ".dat"));
        var (names, cols) = d.Predictors();

        var fit = mode == Mode.DecimalText
            ? LeastSquares.Fit(names, cols, d.Y, d.Intercept, null, dataset, forceDoubleDouble: true, d.PredictorsExact(), d.YExact)
            : LeastSquares.Fit(names, cols, d.Y, d.Intercept, null, dataset, mode == Mode.DoubleForcedDoubleDouble);
        var digits = mode == Mode.DecimalText ? RequiredDigits : DoubleInputDigits(dataset);

        // NIST StRD certified values (the .dat file's certified block)
        Assert.Equal(d.CertifiedEstimates.Length, fit.Coefficients.Count);
        for (var j = 0; j < d.CertifiedEstimates.Length; j++)
        {
            Tolerance.Digits(d.CertifiedEstimates[j], fit.Coefficients[j].Estimate, digits, $"{dataset} {d.CertifiedNames[j]} estimate");
            Tolerance.Digits(d.CertifiedSd[j], fit.Coefficients[j].StandardError, digits, $"{dataset} {d.CertifiedNames[j]} standard deviation");
        }

        Tolerance.Digits(d.CertifiedResidualSd, fit.Sigma, digits, $"{dataset} residual standard deviation");
        Tolerance.Digits(d.CertifiedR2, fit.RSquared, digits, $"{dataset} R-squared");
        var lowest = d.CertifiedEstimates.Select((e, j) => Math.Min(Tolerance.LogRelativeError(e, fit.Coefficients[j].Estimate), Tolerance.LogRelativeError(d.CertifiedSd[j], fit.Coefficients[j].StandardError)))
            .Append(Tolerance.LogRelativeError(d.CertifiedResidualSd, fit.Sigma)).Append(Tolerance.LogRelativeError(d.CertifiedR2, fit.RSquared)).Min();
        output.WriteLine($"{dataset} ({mode}, condition {fit.ConditionNumber:G3}): lowest log relative error {lowest:F2}");
    }

    /// <summary>The NIST sets whose design is the data columns themselves (no powers to form): Norris, NoInt1/2, Longley.</summary>
    public static TheoryData<string> LinearDatasets()
    {
        var data = new TheoryData<string>();
        foreach (var f in Directory.GetFiles(TestData.Path("nist-strd"), "*.dat").OrderBy(f => f, StringComparer.Ordinal))
        {
            var d = NistDataset.Parse(f);
            if (d.PolynomialDegree <= 1)
            {
                data.Add(d.Name);
            }
        }

        return data;
    }

    [Theory]
    [MemberData(nameof(LinearDatasets))]
    public void Given_a_NIST_dataset_as_a_CSV_table_When_the_stage_entry_fits_it_Then_the_certified_digits_hold(string dataset)
    {
        var path = TestData.Path("nist-strd", dataset + ".dat");
        var d = NistDataset.Parse(path);
        var csv = new System.Text.StringBuilder(string.Join(",", d.DataColumns)).Append('\n');
        foreach (var row in d.DataText)
        {
            csv.Append(string.Join(",", row)).Append('\n');
        }

        var table = Table.ParseCsv(csv.ToString(), dataset + ".csv");

        var report = RegressionRun.Fit(table, new ModelSpec(d.DataColumns[0], d.DataColumns[1..], d.Intercept), new RegressionOptions());

        // NIST StRD certified values (the .dat file's certified block)
        for (var j = 0; j < d.CertifiedEstimates.Length; j++)
        {
            Tolerance.Digits(d.CertifiedEstimates[j], report.Fit.Coefficients[j].Estimate, RequiredDigits, $"{dataset} {d.CertifiedNames[j]} estimate");
            Tolerance.Digits(d.CertifiedSd[j], report.Fit.Coefficients[j].StandardError, RequiredDigits, $"{dataset} {d.CertifiedNames[j]} standard deviation");
        }

        Tolerance.Digits(d.CertifiedResidualSd, report.Fit.Sigma, RequiredDigits, $"{dataset} residual standard deviation");
        Tolerance.Digits(d.CertifiedR2, report.Fit.RSquared, RequiredDigits, $"{dataset} R-squared");
    }
}

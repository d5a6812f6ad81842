using System.Globalization;
using System.Text.Json;
using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>HC3, Breusch–Pagan, leverage, Cook's distance, VIF, condition number, AIC/BIC and WLS against numpy values (data/numpy/SOURCES.md).</summary>
public sealed class DiagnosticsTests
{
    /// <summary>numpy solves the same well-conditioned problem in double precision: agreement to 1e-9 relative.</summary>
    private const double RelativeTolerance = 1e-9;

    private static readonly JsonElement Reference = JsonDocument.Parse(File.ReadAllText(TestData.Path("numpy", "hetero_reference.json"))).RootElement;

    private static double[] Column(Table t, string name) =>
        Enumerable.Range(0, t.RowCount).Select(i => double.Parse(t.Cell(i, name), CultureInfo.InvariantCulture)).ToArray();

    private static double[] Array(string name) => Reference.GetProperty(name).EnumerateArray().Select(e => e.GetDouble()).ToArray();

    private static double Value(string name) => Reference.GetProperty(name).GetDouble();

    private static LeastSquaresFit FitHetero(bool weighted)
    {
        var t = Table.ReadCsv(TestData.Path("numpy", "hetero.csv"));
        return LeastSquares.Fit(["x1", "x2"], [Column(t, "x1"), Column(t, "x2")], Column(t, "y"), true, weighted ? Column(t, "w") : null, "hetero.csv");
    }

    [Fact]
    public void Given_a_heteroscedastic_case_When_fitted_Then_classical_and_HC3_errors_match_numpy()
    {
        var fit = FitHetero(weighted: false);

        // numpy 1.24 lstsq / inv with the MacKinnon & White (1985) HC3 sandwich
        var b = Array("coefficients");
        var se = Array("se");
        var hc3 = Array("se_hc3");
        for (var j = 0; j < 3; j++)
        {
            Tolerance.Relative(b[j], fit.Coefficients[j].Estimate, RelativeTolerance, $"coefficient {j}");
            Tolerance.Relative(se[j], fit.Coefficients[j].StandardError, RelativeTolerance, $"SE {j}");
            Tolerance.Relative(hc3[j], fit.Coefficients[j].StandardErrorHc3, RelativeTolerance, $"HC3 SE {j}");
        }
    }

    [Fact]
    public void Given_a_heteroscedastic_case_When_fitted_Then_Koenker_Breusch_Pagan_matches_numpy()
    {
        var fit = FitHetero(weighted: false);

        // numpy: n·R² of e² on [1, x1, x2] (Koenker 1981); p = exp(−stat/2) for 2 df
        Tolerance.Relative(Value("breusch_pagan_koenker"), fit.BreuschPagan.Statistic, RelativeTolerance, "BP statistic");
        Assert.Equal(2, fit.BreuschPagan.Df);
        Tolerance.Relative(Value("breusch_pagan_p"), fit.BreuschPagan.P, 1e-8, "BP p-value");
    }

    [Fact]
    public void Given_a_heteroscedastic_case_When_fitted_Then_leverage_Cook_VIF_and_condition_number_match_numpy()
    {
        var fit = FitHetero(weighted: false);

        // numpy: h = diag(X (XᵀX)⁻¹ Xᵀ), Cook (1977), VIF = 1/(1 − R_j²), cond of unit-length columns
        var h = Array("leverage");
        var cooks = Array("cooks_distance");
        for (var i = 0; i < h.Length; i++)
        {
            Tolerance.Relative(h[i], fit.Leverage[i], RelativeTolerance, $"leverage {i}");
            Tolerance.Relative(cooks[i], fit.CooksDistance[i], 1e-8, $"Cook's distance {i}");
        }

        var vif = Array("vif");
        Tolerance.Relative(vif[0], fit.Coefficients[1].Vif, RelativeTolerance, "VIF x1");
        Tolerance.Relative(vif[1], fit.Coefficients[2].Vif, RelativeTolerance, "VIF x2");
        Tolerance.Relative(Value("condition_number"), fit.ConditionNumber, 1e-8, "condition number");
    }

    [Fact]
    public void Given_a_heteroscedastic_case_When_fitted_Then_R2_F_and_information_criteria_match_numpy()
    {
        var fit = FitHetero(weighted: false);

        // numpy: R², adjusted R², F, logL = −n/2 (ln 2π + ln(RSS/n) + 1), AIC/BIC with p + 1 parameters (as R's AIC for lm)
        Tolerance.Relative(Value("sigma"), fit.Sigma, RelativeTolerance, "sigma");
        Tolerance.Relative(Value("r2"), fit.RSquared, RelativeTolerance, "R²");
        Tolerance.Relative(Value("adj_r2"), fit.AdjustedRSquared, RelativeTolerance, "adjusted R²");
        Tolerance.Relative(Value("f"), fit.F, RelativeTolerance, "F");
        Tolerance.Relative(Value("log_likelihood"), fit.LogLikelihood, RelativeTolerance, "log-likelihood");
        Tolerance.Relative(Value("aic"), fit.Aic, RelativeTolerance, "AIC");
        Tolerance.Relative(Value("bic"), fit.Bic, RelativeTolerance, "BIC");
    }

    [Fact]
    public void Given_weights_When_fitted_Then_the_weighted_least_squares_solution_matches_numpy()
    {
        var fit = FitHetero(weighted: true);

        // numpy lstsq on √w·y, √w·X
        var b = Array("wls_coefficients");
        var se = Array("wls_se");
        for (var j = 0; j < 3; j++)
        {
            Tolerance.Relative(b[j], fit.Coefficients[j].Estimate, RelativeTolerance, $"WLS coefficient {j}");
            Tolerance.Relative(se[j], fit.Coefficients[j].StandardError, RelativeTolerance, $"WLS SE {j}");
        }

        Tolerance.Relative(Value("wls_sigma"), fit.Sigma, RelativeTolerance, "WLS sigma");
    }

    [Fact]
    public void Given_a_predictor_that_is_the_sum_of_two_others_When_fitted_Then_the_error_names_the_collinear_predictors()
    {
        // Plumbing data (invented): c = a + b exactly.
        double[] a = [1, 2, 3, 4, 5, 6, 7, 8];
        double[] b = [2, 1, 4, 3, 6, 5, 8, 9];
        var c = a.Zip(b, (u, v) => u + v).ToArray();
        double[] y = [1, 3, 2, 5, 4, 6, 8, 7];

        var e = Assert.Throws<SpatialDataException>(() => LeastSquares.Fit(["a", "b", "c"], [a, b, c], y, true, null, "t.csv"));

        Assert.Contains("'c'", e.Message, StringComparison.Ordinal);
        Assert.Contains("a, b", e.Message, StringComparison.Ordinal);
        Assert.StartsWith("t.csv", e.Diagnostic.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void Given_a_constant_predictor_in_a_model_with_intercept_When_fitted_Then_it_is_reported_as_collinear_with_the_intercept()
    {
        double[] a = [1, 2, 3, 4, 5, 6];
        double[] k = [3, 3, 3, 3, 3, 3];
        double[] y = [1, 3, 2, 5, 4, 6];

        var e = Assert.Throws<SpatialDataException>(() => LeastSquares.Fit(["a", "k"], [a, k], y, true, null, "t.csv"));

        Assert.Contains("'k'", e.Message, StringComparison.Ordinal);
        Assert.Contains("intercept", e.Message, StringComparison.Ordinal);
    }
}

/// <summary>Decimal text read at double-double precision.</summary>
public sealed class DoubleDoubleParseTests
{
    [Theory]
    [InlineData("0.1", 1, -1)]
    [InlineData("-0.358191792925910E-01", -358191792925910, -16)]
    [InlineData("0.00123", 123, -5)]
    [InlineData("60323", 60323, 0)]
    [InlineData("1.5e3", 15, 2)]
    public void Decimal_text_is_read_to_about_31_digits(string text, long mantissa, int exponent)
    {
        Assert.True(Spatial.Regression.Internal.DoubleDouble.TryParse(text, out var v));

        // Exact decimal value m·10^e: v·10^(−e) − m must vanish to double-double rounding (relative 1e-30).
        var scaled = v;
        for (var k = 0; k < Math.Abs(exponent); k++)
        {
            scaled = exponent < 0 ? scaled * 10.0 : scaled / 10.0;
        }

        var diff = (scaled - (double)mantissa).ToDouble();
        Assert.True(Math.Abs(diff) <= 1e-30 * Math.Abs(mantissa) * 20, $"{text}: off by {diff:R}");
    }

    [Theory]
    [InlineData("abc")]
    [InlineData("")]
    [InlineData("1.2.3")]
    [InlineData("NaN")]
    public void Text_that_is_not_a_decimal_number_is_refused(string text) =>
        Assert.False(Spatial.Regression.Internal.DoubleDouble.TryParse(text, out _));
}

namespace Spatial.Regression;

/// <summary>One coefficient of a least-squares fit with its inference.</summary>
/// <param name="Name">Predictor name, or <c>intercept</c>.</param>
/// <param name="Estimate">Estimate, in response units per predictor unit.</param>
/// <param name="StandardError">Classical standard error (σ̂ √[(XᵀX)⁻¹]_jj).</param>
/// <param name="T">Estimate ÷ standard error (NaN when the standard error is 0 and the estimate 0).</param>
/// <param name="P">Two-sided p-value from Student's t with the residual degrees of freedom.</param>
/// <param name="CiLow">Lower end of the 95 % confidence interval.</param>
/// <param name="CiHigh">Upper end of the 95 % confidence interval.</param>
/// <param name="StandardErrorHc3">Heteroscedasticity-robust HC3 standard error (MacKinnon &amp; White 1985); NaN when a row has leverage 1.</param>
/// <param name="Standardised">Estimate × sd(predictor) ÷ sd(response) (sample standard deviations, unweighted); NaN for the intercept.</param>
/// <param name="Vif">Variance inflation factor; NaN for the intercept.</param>
public sealed record Coefficient(
    string Name,
    double Estimate,
    double StandardError,
    double T,
    double P,
    double CiLow,
    double CiHigh,
    double StandardErrorHc3,
    double Standardised,
    double Vif);

/// <summary>A Breusch–Pagan test result.</summary>
/// <param name="Statistic">Koenker's studentised statistic n·R² of the auxiliary regression of squared residuals on the predictors.</param>
/// <param name="Df">Degrees of freedom (number of non-constant regressors of the auxiliary regression).</param>
/// <param name="P">Upper-tail χ² p-value.</param>
public sealed record BreuschPaganTest(double Statistic, int Df, double P);

/// <summary>
/// A least-squares fit with full inference and per-row diagnostics. Per-row arrays follow the rows used
/// in the fit (after dropped rows were removed). With weights, residual-based quantities (σ, R², leverage,
/// Cook's distance, Breusch–Pagan, HC3) are those of the weighted problem √w·y on √w·X.
/// </summary>
/// <param name="N">Rows used.</param>
/// <param name="DfResidual">n − p.</param>
/// <param name="HasIntercept">True when the model has a constant term.</param>
/// <param name="Coefficients">Coefficients in design order (intercept first when present).</param>
/// <param name="Sigma">Residual standard error √(RSS/(n − p)).</param>
/// <param name="ResidualSumOfSquares">RSS (weighted when weights are given).</param>
/// <param name="RSquared">Centred R² = 1 − RSS/Σ(y − ȳ)²; for a model without intercept the uncentred 1 − RSS/Σy² (as NIST StRD and R do).</param>
/// <param name="AdjustedRSquared">1 − (1 − R²)(n − i)/(n − p), with i = 1 for an intercept model and 0 otherwise.</param>
/// <param name="F">Overall F statistic (regression mean square ÷ residual mean square); +∞ for an exact fit.</param>
/// <param name="FP">Upper-tail p-value of F.</param>
/// <param name="LogLikelihood">Gaussian log-likelihood at the maximum-likelihood σ² = RSS/n (plus ½Σ ln w with weights).</param>
/// <param name="Aic">−2 logL + 2(p + 1) (the error variance counts as a parameter, as R's AIC for lm).</param>
/// <param name="Bic">−2 logL + ln(n)(p + 1).</param>
/// <param name="ConditionNumber">Ratio of largest to smallest singular value of the design with columns scaled to unit length (Belsley, Kuh &amp; Welsch 1980).</param>
/// <param name="BreuschPagan">Breusch–Pagan test (Koenker 1981 studentised form).</param>
/// <param name="Fitted">Fitted values x_iᵀβ̂ (response units).</param>
/// <param name="Residuals">Raw residuals y − x_iᵀβ̂ (unweighted).</param>
/// <param name="Leverage">Diagonal of the hat matrix.</param>
/// <param name="CooksDistance">Cook's distance (Cook 1977): e_i² h_i ÷ (p s² (1 − h_i)²) with weighted residuals.</param>
/// <param name="InverseGram">(XᵀX)⁻¹ of the (weighted) design, p × p, row-major, for prediction intervals.</param>
public sealed record LeastSquaresFit(
    int N,
    int DfResidual,
    bool HasIntercept,
    IReadOnlyList<Coefficient> Coefficients,
    double Sigma,
    double ResidualSumOfSquares,
    double RSquared,
    double AdjustedRSquared,
    double F,
    double FP,
    double LogLikelihood,
    double Aic,
    double Bic,
    double ConditionNumber,
    BreuschPaganTest BreuschPagan,
    IReadOnlyList<double> Fitted,
    IReadOnlyList<double> Residuals,
    IReadOnlyList<double> Leverage,
    IReadOnlyList<double> CooksDistance,
    double[] InverseGram)
{
    /// <summary>Number of estimated coefficients p.</summary>
    public int ParameterCount => Coefficients.Count;

    /// <summary>Predicted value at design row <paramref name="x0"/> (intercept element included when the model has one).</summary>
    public double Predict(ReadOnlySpan<double> x0)
    {
        double s = 0;
        for (var j = 0; j < Coefficients.Count; j++)
        {
            s += Coefficients[j].Estimate * x0[j];
        }

        return s;
    }
}

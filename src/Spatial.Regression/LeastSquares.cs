using MathNet.Numerics.Distributions;
using Spatial.Core;
using Spatial.Regression.Internal;

namespace Spatial.Regression;

/// <summary>
/// Ordinary and weighted least squares by Householder QR in double-double arithmetic on power-of-two
/// scaled columns, with the solution refined by residuals recomputed in double-double (never the normal
/// equations). Meets the NIST StRD linear-regression certified values to at least 7 significant digits.
/// </summary>
public static class LeastSquares
{
    /// <summary>
    /// Fits y = Xβ + ε. <paramref name="predictors"/> are the columns (each of length n, finite), named by
    /// <paramref name="names"/>; an intercept column is put first when <paramref name="intercept"/> is true.
    /// <paramref name="weights"/> (optional, positive and finite) give weighted least squares. Inputs are not modified.
    /// </summary>
    /// <exception cref="SpatialDataException">The design is rank deficient (the message names the collinear predictors),
    /// or there are no more rows than coefficients. <paramref name="source"/> names the data in the message.</exception>
    public static LeastSquaresFit Fit(IReadOnlyList<string> names, IReadOnlyList<double[]> predictors, double[] y, bool intercept, double[]? weights, string source) =>
        Fit(names, predictors, y, intercept, weights, source, forceDoubleDouble: false);

    /// <summary>
    /// Designs whose column-scaled condition number (from a double-precision QR) is at most this are solved in
    /// double precision with corrected semi-normal refinement; worse ones are refactorised in double-double.
    /// </summary>
    internal const double DoublePathConditionLimit = 1e3;

    /// <param name="exactPredictors">Optional: the same predictors at double-double precision (decimal text read
    /// exactly); used, with <paramref name="exactY"/>, when the design needs the double-double factorisation and
    /// there are no weights, so that rounding the data to double does not limit the accuracy.</param>
    internal static LeastSquaresFit Fit(IReadOnlyList<string> names, IReadOnlyList<double[]> predictors, double[] y, bool intercept, double[]? weights, string source, bool forceDoubleDouble, DoubleDouble[][]? exactPredictors = null, DoubleDouble[]? exactY = null)
    {
        ArgumentNullException.ThrowIfNull(names);
        ArgumentNullException.ThrowIfNull(predictors);
        ArgumentNullException.ThrowIfNull(y);
        if (names.Count != predictors.Count)
        {
            throw new ArgumentException($"{names.Count} names for {predictors.Count} predictor columns", nameof(names));
        }

        var n = y.Length;
        var colNames = new List<string>();
        var cols = new List<double[]>();
        if (intercept)
        {
            colNames.Add("intercept");
            var one = new double[n];
            Array.Fill(one, 1.0);
            cols.Add(one);
        }

        for (var j = 0; j < predictors.Count; j++)
        {
            if (predictors[j].Length != n)
            {
                throw new ArgumentException($"predictor '{names[j]}' has {predictors[j].Length} values, the response {n}", nameof(predictors));
            }

            colNames.Add(names[j]);
            cols.Add(predictors[j]);
        }

        var p = cols.Count;
        if (p == 0)
        {
            throw new SpatialDataException(source, 0, "the model has no terms", "give at least one predictor or keep the intercept");
        }

        if (n <= p)
        {
            throw new SpatialDataException(source, 0, $"{n} usable rows for {p} coefficients", "a fit needs more rows than coefficients; check for dropped rows or use fewer predictors");
        }

        // Weighted problem: rows multiplied by √w.
        double[]? sw = null;
        if (weights is not null)
        {
            if (weights.Length != n)
            {
                throw new ArgumentException("weights and response differ in length", nameof(weights));
            }

            sw = new double[n];
            for (var i = 0; i < n; i++)
            {
                if (!(weights[i] > 0) || !double.IsFinite(weights[i]))
                {
                    throw new ArgumentException($"weight {i} is {weights[i]}: weights must be positive and finite", nameof(weights));
                }

                sw[i] = Math.Sqrt(weights[i]);
            }
        }

        var xw = sw is null ? cols.ToArray() : cols.Select(c => Mul(c, sw)).ToArray();
        var yw = sw is null ? y : Mul(y, sw);

        ILeastSquaresFactor qr = new DoubleQr(xw);
        DoubleDouble[]? ySolve = null;
        DoubleDouble[]? yResidual = null;
        CheckRank(qr, colNames, source);
        var conditionNumber = ConditionNumber(qr);
        if (forceDoubleDouble || !(conditionNumber <= DoublePathConditionLimit))
        {
            if (exactPredictors is not null && exactY is not null && weights is null)
            {
                var design = new List<DoubleDouble[]>();
                if (intercept)
                {
                    design.Add(Enumerable.Repeat((DoubleDouble)1.0, n).ToArray());
                }

                design.AddRange(exactPredictors);
                var exact = new DdQr([.. design]);
                qr = exact;
                ySolve = exact.Solve(exactY, 2);
                yResidual = exact.Residuals(exactY, ySolve);
            }
            else
            {
                qr = new DdQr(xw);
            }

            CheckRank(qr, colNames, source);
            conditionNumber = ConditionNumber(qr);
        }

        var bdd = ySolve ?? qr.Solve(yw, 2);
        var resDd = yResidual ?? qr.Residuals(yw, bdd);
        var rssDd = DoubleDouble.Zero;
        foreach (var r in resDd)
        {
            rssDd += r * r;
        }

        var rss = rssDd.ToDouble();
        var df = n - p;
        var sigma2 = rss / df;
        var sigma = Math.Sqrt(sigma2);

        // Total sum of squares in double-double: centred about the (weighted) mean, or uncentred.
        var tssDd = DoubleDouble.Zero;
        if (intercept)
        {
            var sumW = DoubleDouble.Zero;
            var sumWy = DoubleDouble.Zero;
            for (var i = 0; i < n; i++)
            {
                var w = weights?[i] ?? 1.0;
                sumW += w;
                sumWy += DoubleDouble.TwoProduct(w, y[i]);
            }

            var mean = sumWy / sumW;
            for (var i = 0; i < n; i++)
            {
                var d = (DoubleDouble)y[i] - mean;
                tssDd += d * d * (weights?[i] ?? 1.0);
            }
        }
        else
        {
            for (var i = 0; i < n; i++)
            {
                tssDd += DoubleDouble.TwoProduct(yw[i], yw[i]);
            }
        }

        var r2 = tssDd.Hi > 0 ? (1.0 - (rssDd / tssDd)).ToDouble() : double.NaN;
        var k0 = intercept ? 1 : 0;
        var adj = 1.0 - ((1.0 - r2) * (n - k0) / df);
        var dfModel = p - k0;
        var essDd = tssDd - rssDd;
        double f, fp;
        if (dfModel == 0)
        {
            f = double.NaN;
            fp = double.NaN;
        }
        else if (rss == 0)
        {
            f = double.PositiveInfinity;
            fp = 0;
        }
        else
        {
            f = (essDd.ToDouble() / dfModel) / sigma2;
            fp = f > 0 ? Math.Max(0, 1 - FisherSnedecor.CDF(dfModel, df, f)) : 1;
        }

        var sumLogW = 0.0;
        if (weights is not null)
        {
            foreach (var w in weights)
            {
                sumLogW += Math.Log(w);
            }
        }

        var logLik = (0.5 * sumLogW) - (0.5 * n * (Math.Log(2 * Math.PI) + Math.Log(rss / n) + 1));
        var aic = (-2 * logLik) + (2.0 * (p + 1));
        var bic = (-2 * logLik) + (Math.Log(n) * (p + 1));

        var g = qr.InverseGram();
        var rinv = qr.InverseR();
        var u = ThinQ(xw, rinv, n, p);

        var leverage = new double[n];
        var cooks = new double[n];
        var resw = new double[n];
        for (var i = 0; i < n; i++)
        {
            resw[i] = resDd[i].ToDouble();
            double h = 0;
            for (var j = 0; j < p; j++)
            {
                var v = u[(i * p) + j];
                h += v * v;
            }

            leverage[i] = Math.Min(h, 1.0);
            var oneMinus = 1 - leverage[i];
            cooks[i] = oneMinus > 0 && sigma2 > 0 ? resw[i] * resw[i] * leverage[i] / (p * sigma2 * oneMinus * oneMinus) : double.NaN;
        }

        var hc3 = Hc3Variances(u, rinv, resw, leverage, n, p);
        var bp = BreuschPagan(u, resw, xw, intercept, n, p);
        var tCrit = StudentT.InvCDF(0, 1, df, 0.975);
        var coefs = new List<Coefficient>(p);
        for (var j = 0; j < p; j++)
        {
            var b = bdd[j].ToDouble();
            var se = Math.Sqrt(sigma2 * g[j, j]);
            var t = b / se;
            var pv = double.IsNaN(t) ? double.NaN : 2 * (1 - StudentT.CDF(0, 1, df, Math.Abs(t)));
            if (!double.IsNaN(t) && pv < 1e-10)
            {
                pv = 2 * StudentT.CDF(0, 1, df, -Math.Abs(t));
            }

            var isIntercept = intercept && j == 0;
            var standardised = isIntercept ? double.NaN : b * SampleSd(cols[j]) / SampleSd(y);
            var vif = isIntercept || (p - k0) < 1 ? double.NaN : g[j, j] * SpreadSumOfSquares(cols[j], weights, intercept);
            coefs.Add(new Coefficient(colNames[j], b, se, t, pv, b - (tCrit * se), b + (tCrit * se), Math.Sqrt(hc3[j]), standardised, vif));
        }

        // Raw residuals from the double-double residuals of the (weighted) problem.
        var fitted = new double[n];
        var raw = new double[n];
        for (var i = 0; i < n; i++)
        {
            raw[i] = sw is null ? resw[i] : (resDd[i] / sw[i]).ToDouble();
            fitted[i] = y[i] - raw[i];
        }

        var gFlat = new double[p * p];
        for (var i = 0; i < p; i++)
        {
            for (var j = 0; j < p; j++)
            {
                gFlat[(i * p) + j] = g[i, j];
            }
        }

        return new LeastSquaresFit(n, df, intercept, coefs, sigma, rss, r2, adj, f, fp, logLik, aic, bic, conditionNumber, bp, fitted, raw, leverage, cooks, gFlat);
    }

    private static double[] Mul(double[] a, double[] b)
    {
        var r = new double[a.Length];
        for (var i = 0; i < a.Length; i++)
        {
            r[i] = a[i] * b[i];
        }

        return r;
    }

    private static void CheckRank(ILeastSquaresFactor qr, List<string> colNames, string source)
    {
        for (var j = 0; j < qr.P; j++)
        {
            if (qr.RelativeDiagonal(j) >= DdQr.RankTolerance)
            {
                continue;
            }

            if (qr.ColumnNormScaled[j] == 0)
            {
                throw new SpatialDataException(source, 0, $"predictor '{colNames[j]}' is zero in every used row", "remove it from --predictors");
            }

            var c = qr.DependenceOnEarlier(j);
            var involved = Enumerable.Range(0, j).Where(k => Math.Abs(c[k]) > 1e-8).Select(k => colNames[k]).ToList();
            var with = involved.Count == 0 ? "earlier terms" : string.Join(", ", involved);
            throw new SpatialDataException(
                source,
                0,
                $"the design is rank deficient: '{colNames[j]}' is (almost exactly) a linear combination of {with}",
                $"remove one of the collinear predictors ({string.Join(", ", involved.Append(colNames[j]).Where(s => s != "intercept"))})");
        }
    }

    private static double[] ThinQ(double[][] xw, double[,] rinv, int n, int p)
    {
        // U = X R⁻¹, row by row.
        var u = new double[n * p];
        for (var i = 0; i < n; i++)
        {
            for (var j = 0; j < p; j++)
            {
                double s = 0;
                for (var k = 0; k <= j; k++)
                {
                    s += xw[k][i] * rinv[k, j];
                }

                u[(i * p) + j] = s;
            }
        }

        return u;
    }

    /// <summary>HC3 variances (MacKinnon &amp; White 1985): diag of R⁻¹ [Σ e_i²/(1 − h_i)² u_i u_iᵀ] R⁻ᵀ.</summary>
    private static double[] Hc3Variances(double[] u, double[,] rinv, double[] e, double[] h, int n, int p)
    {
        var m = new double[p, p];
        for (var i = 0; i < n; i++)
        {
            var om = 1 - h[i];
            var w = om > 0 ? e[i] * e[i] / (om * om) : double.NaN;
            var off = i * p;
            for (var a = 0; a < p; a++)
            {
                var ua = u[off + a] * w;
                for (var b = a; b < p; b++)
                {
                    m[a, b] += ua * u[off + b];
                }
            }
        }

        var result = new double[p];
        for (var j = 0; j < p; j++)
        {
            // (R⁻¹ M R⁻ᵀ)_jj = Σ_ab Rinv[j,a] M[a,b] Rinv[j,b]
            double s = 0;
            for (var a = j; a < p; a++)
            {
                for (var b = j; b < p; b++)
                {
                    var mab = a <= b ? m[a, b] : m[b, a];
                    s += rinv[j, a] * mab * rinv[j, b];
                }
            }

            result[j] = s;
        }

        return result;
    }

    /// <summary>
    /// Koenker's (1981) studentised Breusch–Pagan (1979) statistic: n·R² of the regression of the squared
    /// residuals on a constant and the model's regressors; χ² with (number of non-constant regressors) df.
    /// </summary>
    private static BreuschPaganTest BreuschPagan(double[] u, double[] e, double[][] xw, bool intercept, int n, int p)
    {
        var e2 = new double[n];
        double mean = 0;
        for (var i = 0; i < n; i++)
        {
            e2[i] = e[i] * e[i];
            mean += e2[i];
        }

        mean /= n;
        double tss = 0;
        foreach (var v in e2)
        {
            tss += (v - mean) * (v - mean);
        }

        double rssAux;
        int dfAux;
        if (intercept)
        {
            // The constant is in the column space: fitted = U Uᵀ e².
            var c = new double[p];
            for (var i = 0; i < n; i++)
            {
                for (var j = 0; j < p; j++)
                {
                    c[j] += u[(i * p) + j] * e2[i];
                }
            }

            rssAux = 0;
            for (var i = 0; i < n; i++)
            {
                double fit = 0;
                for (var j = 0; j < p; j++)
                {
                    fit += u[(i * p) + j] * c[j];
                }

                rssAux += (e2[i] - fit) * (e2[i] - fit);
            }

            dfAux = p - 1;
        }
        else
        {
            var one = new double[n];
            Array.Fill(one, 1.0);
            var aux = new DdQr([one, .. xw]);
            var b = aux.Solve(e2, 1);
            var r = aux.Residuals(e2, b);
            rssAux = 0;
            foreach (var v in r)
            {
                rssAux += v.ToDouble() * v.ToDouble();
            }

            dfAux = p;
        }

        if (!(tss > 0) || dfAux == 0)
        {
            return new BreuschPaganTest(double.NaN, dfAux, double.NaN);
        }

        var r2 = 1 - (rssAux / tss);
        var stat = n * r2;
        var pv = 1 - ChiSquared.CDF(dfAux, Math.Max(stat, 0));
        return new BreuschPaganTest(stat, dfAux, pv);
    }

    private static double ConditionNumber(ILeastSquaresFactor qr)
    {
        var p = qr.P;
        var m = MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.Dense(p, p);
        for (var j = 0; j < p; j++)
        {
            for (var i = 0; i <= j; i++)
            {
                m[i, j] = qr.R(i, j) / qr.ColumnNormScaled[j];
            }
        }

        var sv = m.Svd(computeVectors: false).S;
        var min = sv.Minimum();
        return min > 0 ? sv.Maximum() / min : double.PositiveInfinity;
    }

    private static double SampleSd(double[] v)
    {
        double mean = 0;
        foreach (var x in v)
        {
            mean += x;
        }

        mean /= v.Length;
        double ss = 0;
        foreach (var x in v)
        {
            ss += (x - mean) * (x - mean);
        }

        return Math.Sqrt(ss / (v.Length - 1));
    }

    private static double SpreadSumOfSquares(double[] v, double[]? w, bool centred)
    {
        double sw = 0, swx = 0;
        for (var i = 0; i < v.Length; i++)
        {
            var wi = w?[i] ?? 1.0;
            sw += wi;
            swx += wi * v[i];
        }

        var mean = centred ? swx / sw : 0.0;
        double ss = 0;
        for (var i = 0; i < v.Length; i++)
        {
            var d = v[i] - mean;
            ss += (w?[i] ?? 1.0) * d * d;
        }

        return ss;
    }
}

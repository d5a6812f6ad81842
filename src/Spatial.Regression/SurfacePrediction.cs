using MathNet.Numerics.Distributions;

namespace Spatial.Regression;

/// <summary>Predictions with 95 % prediction intervals over cells (e.g. the land cells of a DEM).</summary>
/// <param name="Prediction">x0ᵀβ̂ per cell (response units); NaN where any predictor is NaN.</param>
/// <param name="Lower95">Lower end of the 95 % prediction interval.</param>
/// <param name="Upper95">Upper end of the 95 % prediction interval.</param>
public sealed record SurfacePredictionResult(double[] Prediction, double[] Lower95, double[] Upper95);

/// <summary>Applies a least-squares fit to per-cell predictor arrays.</summary>
public static class SurfacePrediction
{
    /// <summary>
    /// For every cell c: ŷ = x0ᵀβ̂ and ŷ ± t(0.975, n − p)·s·√(1 + x0ᵀ(XᵀX)⁻¹x0), x0 = (1, predictors at c) when
    /// the model has an intercept (the interval for one new observation with unit weight). <paramref name="cells"/>
    /// holds one array per predictor, in the model's order, all of the same length; a NaN in any of them gives NaN
    /// outputs for that cell (use it for sea or no-data). Inputs are not modified.
    /// </summary>
    public static SurfacePredictionResult Predict(LeastSquaresFit fit, IReadOnlyList<float[]> cells)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(cells);
        var p = fit.ParameterCount;
        var k0 = fit.HasIntercept ? 1 : 0;
        if (cells.Count != p - k0)
        {
            throw new ArgumentException($"{cells.Count} predictor arrays for a model with {p - k0} predictors", nameof(cells));
        }

        var m = cells.Count == 0 ? 0 : cells[0].Length;
        if (cells.Any(c => c.Length != m))
        {
            throw new ArgumentException("predictor arrays differ in length", nameof(cells));
        }

        var t = StudentT.InvCDF(0, 1, fit.DfResidual, 0.975);
        var g = fit.InverseGram;
        var beta = fit.Coefficients.Select(c => c.Estimate).ToArray();
        var pred = new double[m];
        var lo = new double[m];
        var hi = new double[m];
        Parallel.For(0, m, () => new double[p], (c, _, x0) =>
        {
            var ok = true;
            if (k0 == 1)
            {
                x0[0] = 1;
            }

            for (var j = 0; j < cells.Count; j++)
            {
                var v = cells[j][c];
                ok &= !float.IsNaN(v);
                x0[j + k0] = v;
            }

            if (!ok)
            {
                pred[c] = lo[c] = hi[c] = double.NaN;
                return x0;
            }

            double yhat = 0, q = 0;
            for (var a = 0; a < p; a++)
            {
                yhat += beta[a] * x0[a];
                double ga = 0;
                for (var b = 0; b < p; b++)
                {
                    ga += g[(a * p) + b] * x0[b];
                }

                q += x0[a] * ga;
            }

            var half = t * fit.Sigma * Math.Sqrt(1 + Math.Max(q, 0));
            pred[c] = yhat;
            lo[c] = yhat - half;
            hi[c] = yhat + half;
            return x0;
        }, _ => { });
        return new SurfacePredictionResult(pred, lo, hi);
    }
}

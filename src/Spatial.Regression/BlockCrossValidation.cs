namespace Spatial.Regression;

/// <summary>
/// Spatial block cross-validation (Roberts et al. 2017): stations are grouped into square blocks of
/// <see cref="BlockKm"/> on a side; each block in turn is left out, the model is refitted on the rest and
/// predicts the left-out block.
/// </summary>
/// <param name="BlockKm">Block side, km.</param>
/// <param name="Blocks">Number of non-empty blocks.</param>
/// <param name="BlocksNotPredicted">Blocks whose complement could not be fitted (too few rows or rank deficient); their rows are left out of the out-of-block figures.</param>
/// <param name="RmseInSample">√(RSS/n) of the fit on all rows.</param>
/// <param name="R2InSample">R² of the fit on all rows (as in the model).</param>
/// <param name="RmseOutOfBlock">√(mean of (y − ŷ_(−block))²) over predicted rows.</param>
/// <param name="R2OutOfBlock">1 − Σ(y − ŷ_(−block))² / Σ(y − ȳ)² over predicted rows.</param>
/// <param name="OutOfBlockPrediction">Per row: prediction from the fit without its block (NaN when not predicted).</param>
/// <param name="BlockOfRow">Per row: block index (0-based, in order of first appearance).</param>
public sealed record BlockCvResult(
    double BlockKm,
    int Blocks,
    int BlocksNotPredicted,
    double RmseInSample,
    double R2InSample,
    double RmseOutOfBlock,
    double R2OutOfBlock,
    IReadOnlyList<double> OutOfBlockPrediction,
    IReadOnlyList<int> BlockOfRow);

/// <summary>Leave-one-block-out cross-validation of a least-squares model.</summary>
public static class BlockCrossValidation
{
    /// <summary>
    /// Runs leave-one-block-out cross-validation. Positions are projected to km on an equirectangular
    /// projection about the centroid (x = R·Δλ·cos φ0, y = R·Δφ with R = <see cref="GreatCircle.EarthRadiusKm"/>,
    /// Δλ wrapped to ±180°); adequate for regional networks (a few hundred km), distorted for continental ones.
    /// Blocks are cells of a grid with origin at the lowest x and y. Coordinates in degrees; inputs unchanged.
    /// </summary>
    public static BlockCvResult Run(IReadOnlyList<string> names, IReadOnlyList<double[]> predictors, double[] y, bool intercept, double[]? weights, IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg, double blockKm, LeastSquaresFit full)
    {
        ArgumentNullException.ThrowIfNull(predictors);
        ArgumentNullException.ThrowIfNull(y);
        ArgumentNullException.ThrowIfNull(full);
        if (!(blockKm > 0) || !double.IsFinite(blockKm))
        {
            throw new ArgumentOutOfRangeException(nameof(blockKm), blockKm, "block size must be a positive number of km");
        }

        var n = y.Length;
        var (xKm, yKm) = LocalProjection.Equirectangular(lonDeg, latDeg);
        var minX = xKm.Min();
        var minY = yKm.Min();
        var blockIds = new Dictionary<(long, long), int>();
        var blockOfRow = new int[n];
        for (var i = 0; i < n; i++)
        {
            var key = ((long)Math.Floor((xKm[i] - minX) / blockKm), (long)Math.Floor((yKm[i] - minY) / blockKm));
            if (!blockIds.TryGetValue(key, out var b))
            {
                b = blockIds.Count;
                blockIds[key] = b;
            }

            blockOfRow[i] = b;
        }

        var prediction = new double[n];
        Array.Fill(prediction, double.NaN);
        var notPredicted = 0;
        for (var b = 0; b < blockIds.Count; b++)
        {
            var train = Enumerable.Range(0, n).Where(i => blockOfRow[i] != b).ToArray();
            var test = Enumerable.Range(0, n).Where(i => blockOfRow[i] == b).ToArray();
            LeastSquaresFit fit;
            try
            {
                fit = LeastSquares.Fit(names, predictors.Select(c => train.Select(i => c[i]).ToArray()).ToArray(), train.Select(i => y[i]).ToArray(), intercept, weights is null ? null : train.Select(i => weights[i]).ToArray(), "block cross-validation");
            }
            catch (Spatial.Core.SpatialDataException)
            {
                notPredicted++;
                continue;
            }

            var x0 = new double[fit.ParameterCount];
            foreach (var i in test)
            {
                var k = 0;
                if (intercept)
                {
                    x0[k++] = 1;
                }

                foreach (var c in predictors)
                {
                    x0[k++] = c[i];
                }

                prediction[i] = fit.Predict(x0);
            }
        }

        double ss = 0, tss = 0, mean = 0;
        var m = 0;
        for (var i = 0; i < n; i++)
        {
            if (!double.IsNaN(prediction[i]))
            {
                mean += y[i];
                m++;
            }
        }

        mean /= Math.Max(m, 1);
        for (var i = 0; i < n; i++)
        {
            if (!double.IsNaN(prediction[i]))
            {
                ss += (y[i] - prediction[i]) * (y[i] - prediction[i]);
                tss += (y[i] - mean) * (y[i] - mean);
            }
        }

        var rmseOut = m > 0 ? Math.Sqrt(ss / m) : double.NaN;
        var r2Out = m > 0 && tss > 0 ? 1 - (ss / tss) : double.NaN;
        var rssRaw = full.Residuals.Sum(e => e * e);
        return new BlockCvResult(blockKm, blockIds.Count, notPredicted, Math.Sqrt(rssRaw / n), full.RSquared, rmseOut, r2Out, prediction, blockOfRow);
    }
}

/// <summary>Local map projections used for blocks.</summary>
internal static class LocalProjection
{
    /// <summary>Equirectangular projection in km about the centroid (mean of unit vectors), longitudes wrapped to ±180° of it.</summary>
    public static (double[] X, double[] Y) Equirectangular(IReadOnlyList<double> lonDeg, IReadOnlyList<double> latDeg)
    {
        const double rad = Math.PI / 180;
        var n = lonDeg.Count;
        double sx = 0, sy = 0, sz = 0;
        for (var i = 0; i < n; i++)
        {
            var phi = latDeg[i] * rad;
            var lam = lonDeg[i] * rad;
            sx += Math.Cos(phi) * Math.Cos(lam);
            sy += Math.Cos(phi) * Math.Sin(lam);
            sz += Math.Sin(phi);
        }

        var lon0 = Math.Atan2(sy, sx) / rad;
        var lat0 = Math.Atan2(sz, Math.Sqrt((sx * sx) + (sy * sy))) / rad;
        var cos0 = Math.Cos(lat0 * rad);
        var x = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            var dl = lonDeg[i] - lon0;
            dl -= 360 * Math.Floor((dl + 180) / 360);
            x[i] = GreatCircle.EarthRadiusKm * dl * rad * cos0;
            y[i] = GreatCircle.EarthRadiusKm * (latDeg[i] - lat0) * rad;
        }

        return (x, y);
    }
}

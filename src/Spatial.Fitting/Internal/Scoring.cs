using Spatial.Core;

namespace Spatial.Fitting.Internal;

/// <summary>Projects every row of a matrix onto a basis and computes its metrics (the modelled-bare rule uses the row's own reconstruction, handed over by the projection), in parallel; each row is independent, so the result does not depend on the thread count.</summary>
internal static class Scoring
{
    public static SeasonScores Score(SeasonMatrix matrix, GappyProjector projector, MetricOptions metricOptions, ParallelOptions po, Action<double>? progress)
    {
        var k = projector.K;
        var rows = matrix.Rows;
        // Every row's slots are written below (NaN where a row gets no coefficients).
        var coefficients = LargeArrays.AllocateUninitialized<double>(rows * k);
        var residuals = LargeArrays.AllocateUninitialized<double>(rows * (k + 1));
        var metrics = LargeArrays.AllocateUninitialized<double>(rows * SeasonMetrics.Count);
        var modelledBare = LargeArrays.AllocateUninitialized<int>(rows);
        var chunks = Layout.Chunks(rows);
        var memory = matrix.DepthsMemory;
        long done = 0;
        Parallel.For(0, chunks.Length, po, c =>
        {
            var scratch = new double[projector.ScratchLength];
            var reconstruction = new double[MetricCalculator.ReconstructionLength];
            var span = memory.Span;
            for (var r = chunks[c].Start; r < chunks[c].End; r++)
            {
                var row = span.Slice(r * Layout.Days, Layout.Days);
                var coef = coefficients.AsSpan(r * k, k);
                projector.Project(row, coef, residuals.AsSpan(r * (k + 1), k + 1), scratch, out var misfit, reconstruction);
                var m = MetricCalculator.Compute(row, metricOptions, AllFinite(coef) ? reconstruction : default, misfit);
                m.CopyTo(metrics.AsSpan(r * SeasonMetrics.Count, SeasonMetrics.Count));
                modelledBare[r] = m.ModelledBareDays;
            }

            var total = Interlocked.Add(ref done, chunks[c].End - chunks[c].Start);
            progress?.Invoke((double)total / rows);
        });
        return new SeasonScores(matrix.Keys, k, coefficients, residuals, metrics, modelledBare);
    }

    private static bool AllFinite(ReadOnlySpan<double> values)
    {
        foreach (var v in values)
        {
            if (!double.IsFinite(v))
            {
                return false;
            }
        }

        return true;
    }
}

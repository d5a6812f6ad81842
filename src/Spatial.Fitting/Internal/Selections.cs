using Spatial.Core;

namespace Spatial.Fitting.Internal;

/// <summary>Season selections: per component, the highest and lowest coefficients among the seasons it describes well; the best and worst described seasons.</summary>
internal static class Selections
{
    public static Interpretation Build(SeasonMatrix matrix, SeasonScores scores, int[] train, Basis basis, ComponentLabel[] labels, FitOptions options)
    {
        var k = scores.K;
        var n = options.SelectionCount;
        var selections = new ComponentSelection[k];
        for (var c = 0; c < k; c++)
        {
            // One pass: the admitted seasons are counted and offered to both ends, in row order.
            var high = new TopRows(n);
            var low = new TopRows(n);
            var admitted = 0;
            foreach (var r in train)
            {
                var v = scores.Coefficient(r, c);
                if (scores.Residual(r, c + 1) < options.SelectionResidual && double.IsFinite(v))
                {
                    admitted++;
                    high.Offer(-v, r);
                    low.Offer(v, r);
                }
            }

            var cc = c;
            selections[c] = new ComponentSelection(
                c + 1,
                options.SelectionResidual,
                admitted,
                high.Rows().Select(r => Pick(scores, r, scores.Coefficient(r, cc), scores.Residual(r, cc + 1))).ToArray(),
                low.Rows().Select(r => Pick(scores, r, scores.Coefficient(r, cc), scores.Residual(r, cc + 1))).ToArray());
        }

        var bestRows = new TopRows(n);
        var worstRows = new TopRows(n);
        foreach (var r in train)
        {
            var v = scores.Residual(r, k);
            if (double.IsFinite(v))
            {
                bestRows.Offer(v, r);
                worstRows.Offer(-v, r);
            }
        }

        var best = bestRows.Rows()
            .Select(r => Pick(scores, r, scores.Residual(r, k), scores.Residual(r, k)) with { Detail = "well described by the components" })
            .ToArray();
        var worst = worstRows.Rows()
            .Select(r =>
            {
                var (cause, detail) = Interpreter.Diagnose(matrix.Row(r), basis.Mean, basis.Components, scores.CoefficientRow(r));
                return Pick(scores, r, scores.Residual(r, k), scores.Residual(r, k)) with { Cause = cause, Detail = detail };
            })
            .ToArray();
        return new Interpretation(labels, selections, best, worst);
    }

    private static SelectedSeason Pick(SeasonScores scores, int row, double value, double residual) =>
        new(scores.Keys[row].Station, scores.Keys[row].Season, value, residual, string.Empty, string.Empty);

    /// <summary>The <paramref name="n"/> rows with the smallest keys offered, ties by the order offered; a bounded insertion, linear in the offers.</summary>
    private sealed class TopRows(int n)
    {
        private readonly double[] keys = new double[n + 1];
        private readonly int[] rows = new int[n + 1];
        private int count;

        public void Offer(double key, int row)
        {
            if (count == n && (n == 0 || key >= keys[count - 1]))
            {
                return;
            }

            var at = count;
            while (at > 0 && keys[at - 1] > key)
            {
                keys[at] = keys[at - 1];
                rows[at] = rows[at - 1];
                at--;
            }

            keys[at] = key;
            rows[at] = row;
            count = Math.Min(count + 1, n);
        }

        public int[] Rows() => rows.AsSpan(0, count).ToArray();
    }
}

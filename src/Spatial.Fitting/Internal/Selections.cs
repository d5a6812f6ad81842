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
            var cc = c;
            var admitted = train.Where(r => scores.Residual(r, cc + 1) < options.SelectionResidual && double.IsFinite(scores.Coefficient(r, cc))).ToArray();
            var high = Top(admitted, r => scores.Coefficient(r, cc), n, descending: true);
            var low = Top(admitted, r => scores.Coefficient(r, cc), n, descending: false);
            selections[c] = new ComponentSelection(
                c + 1,
                options.SelectionResidual,
                admitted.Length,
                high.Select(r => Pick(scores, r, scores.Coefficient(r, cc), scores.Residual(r, cc + 1))).ToArray(),
                low.Select(r => Pick(scores, r, scores.Coefficient(r, cc), scores.Residual(r, cc + 1))).ToArray());
        }

        var described = train.Where(r => double.IsFinite(scores.Residual(r, k))).ToArray();
        var best = Top(described, r => scores.Residual(r, k), n, descending: false)
            .Select(r => Pick(scores, r, scores.Residual(r, k), scores.Residual(r, k)) with { Detail = "well described by the components" })
            .ToArray();
        var worst = Top(described, r => scores.Residual(r, k), n, descending: true)
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

    /// <summary>The <paramref name="n"/> rows with the largest (or smallest) key, ties by row order; a bounded insertion, linear in the rows.</summary>
    internal static int[] Top(int[] rows, Func<int, double> key, int n, bool descending)
    {
        var best = new List<(double Key, int Row)>(n + 1);
        foreach (var r in rows)
        {
            var v = key(r);
            if (!double.IsFinite(v))
            {
                continue;
            }

            var s = descending ? -v : v;
            if (best.Count == n && s >= best[^1].Key)
            {
                continue;
            }

            var at = best.Count;
            while (at > 0 && best[at - 1].Key > s)
            {
                at--;
            }

            best.Insert(at, (s, r));
            if (best.Count > n)
            {
                best.RemoveAt(best.Count - 1);
            }
        }

        return best.Select(b => b.Row).ToArray();
    }
}

using System.Diagnostics;
using Spatial.Fitting;
using Spatial.Fitting.Internal;

namespace Spatial.Benchmarks;

/// <summary>Per-row costs of the fit's parts on one thread, in CPU time (robust on a loaded machine), against a plain pass that only sums the matrix.</summary>
public sealed class FitPartsBenchmark : IBenchmark
{
    public string Name => "fit-parts";

    public string Description => "CPU µs per season of projection, metrics, mean, covariance on one thread vs a plain summing pass";

    public void Run(BenchReport report, string[] args)
    {
        var rows = args.Length > 0 ? int.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 50_000;
        var matrix = FitBenchmark.Generate(rows, 0.3, seed: 7);
        var fit = SeasonalFit.Fit(matrix, new FitOptions(Components: 4));
        var projector = new GappyProjector(fit.Basis.Mean, fit.Basis.Components, 0);
        var scratch = new double[projector.ScratchLength];
        var c = new double[4];
        var res = new double[5];
        double Cpu(Action a)
        {
            var t0 = Process.GetCurrentProcess().TotalProcessorTime;
            a();
            return (Process.GetCurrentProcess().TotalProcessorTime - t0).TotalMilliseconds * 1000 / rows;
        }

        var sum = 0.0;
        report.Figure("plain summing pass (baseline)", Cpu(() =>
        {
            for (var r = 0; r < rows; r++)
            {
                foreach (var x in matrix.Row(r))
                {
                    if (!float.IsNaN(x))
                    {
                        sum += x;
                    }
                }
            }
        }), "µs/season");
        report.Figure("gappy projection K=4", Cpu(() =>
        {
            for (var r = 0; r < rows; r++)
            {
                projector.Project(matrix.Row(r), c, res, scratch);
            }
        }), "µs/season");
        report.Figure("metrics", Cpu(() =>
        {
            for (var r = 0; r < rows; r++)
            {
                _ = MetricCalculator.Compute(matrix.Row(r), MetricOptions.Default);
            }
        }), "µs/season");
        report.Figure("Scoring.Score, one thread (projection + metrics)", Cpu(() => Scoring.Score(matrix, projector, MetricOptions.Default, Layout.Parallel(1), null)), "µs/season");
        var train = Enumerable.Range(0, rows).ToArray();
        var po = Layout.Parallel(1);
        report.Figure("mean", Cpu(() => Covariance.Mean(matrix, train, null, po, out _)), "µs/season");
        report.Figure("covariance", Cpu(() => Covariance.Estimate(matrix, train, fit.Basis.Mean, null, po, null, out _)), "µs/season");
        var block = new float[Layout.BlockRows * Layout.PaddedDays];
        var masks = new ulong[365 * CovarianceKernel.MaskWords];
        var rng = new Random(3);
        for (var i = 0; i < block.Length; i++)
        {
            block[i] = (float)rng.NextDouble();
        }

        for (var i = 0; i < masks.Length; i++)
        {
            masks[i] = (ulong)rng.NextInt64();
        }

        var sums = new double[Layout.PaddedDays * Layout.PaddedDays];
        var counts = new int[Layout.PaddedDays * Layout.PaddedDays];
        var blocks = rows / Layout.BlockRows;
        report.Figure("covariance kernel only (products)", Cpu(() =>
        {
            for (var i = 0; i < blocks; i++)
            {
                CovarianceKernel.AddProducts(block, Layout.BlockRows, sums);
            }
        }), "µs/season");
        report.Figure("covariance kernel only (pair counts)", Cpu(() =>
        {
            for (var i = 0; i < blocks; i++)
            {
                CovarianceKernel.AddPairCounts(masks, counts);
            }
        }), "µs/season");
        report.Line(FormattableString.Invariant($"  sink {sum:G3} {sums[5]:G3} {counts[7]}"));
    }
}

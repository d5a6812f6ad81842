using System.Diagnostics;
using Spatial.Core;
using Spatial.Fitting;
using Spatial.Fitting.Internal;

namespace Spatial.Benchmarks;

/// <summary>
/// The whole fit (mean, covariance, eigen, projection, metrics, interpretation, station trends) on a seeded synthetic
/// matrix (default 1 000 000 seasons, 30% of days missing at random), and the covariance kernel's rate against a plain
/// dense dot-product loop measured in the same run. Args: [rows] [threads].
/// </summary>
public sealed class FitBenchmark : IBenchmark
{
    public string Name => "fit";

    public string Description => "whole fit on N seasons × 365 days, 30% missing; covariance GFLOP/s vs a plain dot-product loop";

    public void Run(BenchReport report, string[] args)
    {
        var rows = args.Length > 0 ? int.Parse(args[0], System.Globalization.CultureInfo.InvariantCulture) : 1_000_000;
        int? threads = args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : null;
        var sw = Stopwatch.StartNew();
        var matrix = Generate(rows, 0.3, seed: 20261201);
        report.Figure("generate matrix (not part of the fit)", sw.Elapsed.TotalSeconds, "s");
        var matrixBytes = (double)rows * 365 * 4;
        report.Figure("float32 matrix", matrixBytes / 1e9, "GB");
        GC.Collect();
        var before = GC.GetTotalMemory(true);
        var proc = Process.GetCurrentProcess();
        proc.Refresh();
        var rssBefore = proc.WorkingSet64;

        // Covariance kernel alone (pairwise mode), with its flop count.
        var train = Enumerable.Range(0, rows).ToArray();
        var po = Layout.Parallel(threads);
        var mean = Covariance.Mean(matrix, train, null, po, out _);
        var covSeconds = BenchReport.BestSeconds(1, () => Covariance.Estimate(matrix, train, mean, null, po, null, out _));
        var tilePairs = 0L;
        for (var jb = 0; jb < Layout.PaddedDays; jb += CovarianceKernel.TileCols)
        {
            tilePairs += (Math.Min(jb + CovarianceKernel.TileCols, Layout.Days) + CovarianceKernel.TileRows - 1) / CovarianceKernel.TileRows;
        }

        var flops = 2.0 * rows * tilePairs * CovarianceKernel.TileRows * CovarianceKernel.TileCols;
        report.Figure("covariance (pairwise, with pair counts)", covSeconds, "s");
        var cov = Covariance.Estimate(matrix, train, mean, null, po, null, out _);
        report.Figure("eigen-decomposition 365 × 365", BenchReport.BestSeconds(1, () => SymmetricEigen.Decompose(cov, 365)), "s");
        report.Figure("covariance kernel rate", flops / covSeconds / 1e9, "GFLOP/s");

        // Baseline: plain dense dot products (one scalar multiply-add per element, one thread) over the same rows.
        var baseRows = Math.Min(rows, 4000);
        var cols = new float[365][];
        for (var d = 0; d < 365; d++)
        {
            cols[d] = new float[baseRows];
            for (var r = 0; r < baseRows; r++)
            {
                var x = matrix.Row(r)[d];
                cols[d][r] = float.IsNaN(x) ? 0f : x;
            }
        }

        var sink = 0f;
        var plainSeconds = BenchReport.BestSeconds(1, () =>
        {
            for (var i = 0; i < 365; i++)
            {
                for (var j = i; j < 365; j++)
                {
                    sink += CovarianceKernel.PlainDot(cols[i], cols[j]);
                }
            }
        });
        var plainFlops = 2.0 * baseRows * 365 * 366 / 2;
        report.Figure("plain dot-product loop rate (1 thread, baseline)", plainFlops / plainSeconds / 1e9, "GFLOP/s");
        report.Figure("kernel rate ÷ plain loop rate", flops / covSeconds / (plainFlops / plainSeconds), "×");

        // The whole fit.
        FitResult? result = null;
        using var memory = new PeakWorkingSet();
        var stages = new List<(string, double)>();
        // Each stage with the page faults it took (a first touch of fresh memory is expensive on some virtual machines).
        var lastFaults = MinorFaults();
        StageTimer.Sink = (stage, seconds) =>
        {
            var f = MinorFaults();
            stages.Add((stage + FormattableString.Invariant($" [{(f - lastFaults) / 1000.0:F1}k faults]"), seconds));
            lastFaults = f;
        };
        var cpuBefore = Process.GetCurrentProcess().TotalProcessorTime;
        var fitSeconds = BenchReport.BestSeconds(1, () => result = SeasonalFit.Fit(matrix, new FitOptions(Components: 4, MaxThreads: threads)));
        var cpuSeconds = (Process.GetCurrentProcess().TotalProcessorTime - cpuBefore).TotalSeconds;
        memory.Stop();
        StageTimer.Sink = null;
        foreach (var (stage, seconds) in stages)
        {
            report.Figure("  stage: " + stage, seconds, "s");
        }

        report.Figure("whole fit, K = 4", fitSeconds, "s");
        report.Figure("whole fit ÷ 10 s target", fitSeconds / 10, "×");
        report.Figure("whole fit, process CPU time (all threads)", cpuSeconds, "s");
        report.Figure("CPU time ÷ cores (wall time on an idle machine, at best)", cpuSeconds / Environment.ProcessorCount, "s");
        report.Figure("wall time ÷ (CPU time ÷ cores): slowdown from sharing", fitSeconds / (cpuSeconds / Environment.ProcessorCount), "×");
        report.Figure("peak working set during fit ÷ float32 matrix", memory.Peak / matrixBytes, "×");
        report.Figure("working set before fit ÷ float32 matrix", rssBefore / matrixBytes, "×");
        report.Line(FormattableString.Invariant($"  labels {string.Join(',', result!.Basis.Labels)}; variance fraction {result.Basis.CumulativeFraction[^1]:F4}; managed heap before {before / 1e9:F2} GB; sink {sink:G3}"));
    }

    /// <summary>Minor page faults of this process so far (Linux: field 10 of /proc/self/stat); 0 elsewhere.</summary>
    internal static long MinorFaults() =>
        File.Exists("/proc/self/stat")
            ? long.Parse(File.ReadAllText("/proc/self/stat").Split(')')[1].Split(' ', StringSplitOptions.RemoveEmptyEntries)[7], System.Globalization.CultureInfo.InvariantCulture)
            : 0;

    /// <summary>Seeded snow-like curves: mean bump + 3 smooth modes + noise, clipped at 0; missing days at random.</summary>
    internal static SeasonMatrix Generate(int rows, double missing, int seed)
    {
        const int d = 365;
        var data = GC.AllocateUninitializedArray<float>(rows * d);
        var observedCounts = new int[rows];
        var chunk = 8192;
        Parallel.For(0, (rows + chunk - 1) / chunk, c =>
        {
            var rng = new Random(seed + c);
            for (var r = c * chunk; r < Math.Min(rows, (c + 1) * chunk); r++)
            {
                var amount = 1 + (0.4 * (rng.NextDouble() - 0.5));
                var shift = 30 * (rng.NextDouble() - 0.5);
                var width = 50 + (15 * (rng.NextDouble() - 0.5));
                var obs = 0;
                for (var j = 0; j < d; j++)
                {
                    if (rng.NextDouble() < missing)
                    {
                        data[(r * d) + j] = float.NaN;
                        continue;
                    }

                    var z = (j - 180 - shift) / width;
                    var x = (600 * amount * Math.Exp(-0.5 * z * z)) + (5 * (rng.NextDouble() - 0.5));
                    data[(r * d) + j] = (float)Math.Max(0, x);
                    obs++;
                }

                observedCounts[r] = obs;
            }
        });
        var keys = new SeasonKey[rows];
        var perStation = 50;
        var ids = new StationId[(rows / perStation) + 1];
        for (var s = 0; s < ids.Length; s++)
        {
            ids[s] = new StationId(FormattableString.Invariant($"ST{s:000000}"));
        }

        for (var r = 0; r < rows; r++)
        {
            keys[r] = new SeasonKey(ids[r / perStation], 1970 + (r % perStation), observedCounts[r], false);
        }

        return new SeasonMatrix(SeasonCalendar.Default, keys, data);
    }
}

using System.Diagnostics;
using System.Globalization;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Fitting;
using Spatial.Records;

namespace Spatial.Benchmarks;

/// <summary>
/// The <c>fit</c> verb's path end to end on the fit benchmark's matrix (default 1 000 000 seasons, 30 % missing):
/// reading matrix.parquet, <see cref="SeasonalFit.Fit"/>, and writing basis.json, seasons.csv, stations.csv and
/// interpretation.json as the verb does (<see cref="FitFiles.Write"/>), beside a bare read of the parquet file's bytes
/// and a bare atomic write of as many bytes as the four outputs, both measured in the same run.
/// Args: [rows] [--keep DIR] (keep matrix.parquet and the outputs in DIR instead of a temporary folder)
/// [--matrix PATH] (read this matrix.parquet instead of generating one).
/// </summary>
public sealed class FitCliBenchmark : IBenchmark
{
    public string Name => "fit-cli";

    public string Description => "fit verb path: read matrix.parquet, fit, write the four outputs, vs bare file read/write of the same bytes";

    public void Run(BenchReport report, string[] args)
    {
        var rows = args.Length > 0 && !args[0].StartsWith("--", StringComparison.Ordinal) ? int.Parse(args[0], CultureInfo.InvariantCulture) : 1_000_000;
        var keep = Option(args, "--keep");
        var existing = Option(args, "--matrix");
        var folder = keep ?? Path.Combine(Path.GetTempPath(), $"spatial-bench-fit-cli-{Environment.ProcessId}");
        Directory.CreateDirectory(folder);
        try
        {
            var path = existing ?? Path.Combine(folder, "matrix.parquet");
            var outDir = Path.Combine(folder, "out");
            var sw = Stopwatch.StartNew();
            if (existing is null)
            {
                SeasonMatrixFile.Write(path, FitBenchmark.Generate(rows, 0.3, seed: 20261201));
                report.Figure("generate and write matrix.parquet (not timed below)", sw.Elapsed.TotalSeconds, "s");
            }

            var matrixBytes = (double)rows * 365 * 4;
            GC.Collect();

            var buffer = new byte[1 << 20];
            var bareRead = BenchReport.BestSeconds(2, () =>
            {
                using var s = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1, FileOptions.SequentialScan);
                while (s.Read(buffer) > 0)
                {
                }
            });

            using var memory = new PeakWorkingSet();

            var cpu0 = Process.GetCurrentProcess().TotalProcessorTime;
            var total = Stopwatch.StartNew();
            sw.Restart();
            var matrix = SeasonMatrixFile.Read(path);
            var read = sw.Elapsed.TotalSeconds;
            matrixBytes = (double)matrix.Rows * 365 * 4;
            sw.Restart();
            var result = SeasonalFit.Fit(matrix, new FitOptions(Components: 4));
            var fit = sw.Elapsed.TotalSeconds;
            sw.Restart();
            FitFiles.Write(outDir, result);
            var write = sw.Elapsed.TotalSeconds;
            var whole = total.Elapsed.TotalSeconds;
            var cpu = (Process.GetCurrentProcess().TotalProcessorTime - cpu0).TotalSeconds;
            memory.Stop();

            // The writers again on the same result, best of two: over the files just written, and into new folders.
            var names = new[] { ResultLayout.Basis, ResultLayout.Seasons, ResultLayout.Stations, ResultLayout.Interpretation };
            var outBytes = names.Sum(n => new FileInfo(Path.Combine(outDir, n)).Length);
            var writeBest = BenchReport.BestSeconds(2, () => FitFiles.Write(outDir, result));
            var fresh = 0;
            var writeNew = BenchReport.BestSeconds(2, () =>
            {
                var into = Path.Combine(folder, FormattableString.Invariant($"out-new-{fresh++}"));
                FitFiles.Write(into, result);
                Directory.Delete(into, recursive: true);
            });
            var blob = new byte[outBytes];
            Array.Fill(blob, (byte)'7');
            var bareWrite = BenchReport.BestSeconds(2, () => AtomicFile.Write(Path.Combine(folder, "bare.bin"), s => s.Write(blob)));
            File.Delete(Path.Combine(folder, "bare.bin"));

            report.Figure("float32 matrix", matrixBytes / 1e9, "GB");
            report.Figure("file size matrix.parquet", new FileInfo(path).Length / 1e6, "MB");
            report.Figure("baseline: bare read of matrix.parquet", bareRead, "s");
            report.Figure("read (SeasonMatrixFile.Read)", read, "s");
            report.Figure("read ÷ bare read", read / bareRead, "×");
            report.Figure("fit (SeasonalFit.Fit)", fit, "s");
            report.Figure("outputs written", outBytes / 1e6, "MB");
            report.Figure("baseline: bare atomic write of as many bytes", bareWrite, "s");
            report.Figure("write (FitFiles.Write), first (as the fit verb)", write, "s");
            report.Figure("write (FitFiles.Write) over the same files, best of 2", writeBest, "s");
            report.Figure("write (FitFiles.Write) into a new folder, best of 2", writeNew, "s");
            report.Figure("write ÷ bare write", writeBest / bareWrite, "×");
            report.Figure("read + fit + write", whole, "s");
            report.Figure("read + fit + write ÷ 10 s", whole / 10, "×");
            report.Figure("process CPU time (all threads)", cpu, "s");
            report.Figure("wall time ÷ (CPU time ÷ cores): slowdown from sharing", whole / (cpu / Environment.ProcessorCount), "×");
            report.Figure("peak working set ÷ float32 matrix", memory.Peak / matrixBytes, "×");
            foreach (var n in names)
            {
                report.Line(FormattableString.Invariant($"  {n}: {new FileInfo(Path.Combine(outDir, n)).Length} bytes"));
            }
        }
        finally
        {
            if (keep is null)
            {
                Directory.Delete(folder, recursive: true);
            }
        }
    }

    private static string? Option(string[] args, string name)
    {
        var at = Array.IndexOf(args, name);
        return at >= 0 && at + 1 < args.Length ? args[at + 1] : null;
    }
}

using Spatial.Scenario;

namespace Spatial.Benchmarks;

/// <summary>
/// Time to generate and write the Marrowfell region for a network of N stations (default 150, then 2,000), against
/// the same run on one thread (the baseline, same process), and the share of the finite-difference truth runs.
/// Arguments: station counts (e.g. <c>scenario 150 2000 5000</c>).
/// </summary>
public sealed class ScenarioBenchmark : IBenchmark
{
    public string Name => "scenario";

    public string Description => "generate + write the demo region (45 seasons) for N stations; baseline: one thread, and no finite differences";

    public void Run(BenchReport report, string[] args)
    {
        var counts = args.Length > 0 ? args.Select(a => int.Parse(a, System.Globalization.CultureInfo.InvariantCulture)).ToArray() : [150, 2000];
        var folder = Path.Combine(Path.GetTempPath(), $"spatial-bench-scenario-{Guid.NewGuid():N}");
        try
        {
            foreach (var n in counts)
            {
                var options = new ScenarioOptions(Stations: n);
                var all = BenchReport.BestSeconds(1, () => ScenarioFiles.Write(folder, MarrowfellScenario.Generate(options)));
                var one = BenchReport.BestSeconds(1, () => ScenarioFiles.Write(folder, MarrowfellScenario.Generate(options with { MaxThreads = 1 })));
                var noFd = BenchReport.BestSeconds(1, () => ScenarioFiles.Write(folder, MarrowfellScenario.Generate(options with { Effects = false })));
                var records = new FileInfo(Path.Combine(folder, ScenarioFiles.Records)).Length;
                report.Figure($"{n} stations: generate + write, all cores", all, "s");
                report.Figure($"{n} stations: generate + write, one thread (baseline)", one, "s");
                report.Figure($"{n} stations: speed-up all cores / one thread", one / all, "x");
                report.Figure($"{n} stations: without finite differences, all cores", noFd, "s");
                report.Figure($"{n} stations: station-seasons per second, all cores", n * 45 / all, "1/s");
                report.Figure($"{n} stations: records.csv.gz", records / 1e6, "MB");
            }
        }
        finally
        {
            if (Directory.Exists(folder))
            {
                Directory.Delete(folder, true);
            }
        }
    }
}

using System.Diagnostics;
using System.Reflection;

namespace Spatial.Benchmarks;

/// <summary>
/// A benchmark: measures one job beside a baseline measured in the same run, so that figures are
/// reported as ratios on a shared, noisy machine. Never part of the test run.
/// </summary>
public interface IBenchmark
{
    /// <summary>Short name used on the command line.</summary>
    string Name { get; }

    /// <summary>One line saying what is measured and against which baseline.</summary>
    string Description { get; }

    /// <summary>Runs the benchmark, writing figures through <paramref name="report"/>. <paramref name="args"/> are the remaining arguments.</summary>
    void Run(BenchReport report, string[] args);
}

/// <summary>Collects timed figures and prints them as a table.</summary>
public sealed class BenchReport(TextWriter output)
{
    /// <summary>Best of <paramref name="repeats"/> wall-clock times of <paramref name="action"/>, in seconds.</summary>
    public static double BestSeconds(int repeats, Action action)
    {
        ArgumentNullException.ThrowIfNull(action);
        var best = double.MaxValue;
        for (var i = 0; i < repeats; i++)
        {
            var sw = Stopwatch.StartNew();
            action();
            best = Math.Min(best, sw.Elapsed.TotalSeconds);
        }

        return best;
    }

    /// <summary>Writes one figure.</summary>
    public void Figure(string what, double value, string unit) =>
        output.WriteLine(FormattableString.Invariant($"  {what,-58} {value,14:G6} {unit}"));

    /// <summary>Writes a free line.</summary>
    public void Line(string text) => output.WriteLine(text);
}

/// <summary>Samples the process's working set every 20 ms until stopped; <see cref="Peak"/> is the largest seen, bytes.</summary>
public sealed class PeakWorkingSet : IDisposable
{
    private readonly CancellationTokenSource stop = new();
    private readonly Task sampler;
    private long peak;

    /// <summary>Starts sampling.</summary>
    public PeakWorkingSet()
    {
        sampler = Task.Run(() =>
        {
            using var p = Process.GetCurrentProcess();
            while (!stop.IsCancellationRequested)
            {
                p.Refresh();
                Interlocked.Exchange(ref peak, Math.Max(Interlocked.Read(ref peak), p.WorkingSet64));
                Thread.Sleep(20);
            }
        });
    }

    /// <summary>The largest working set sampled so far, bytes.</summary>
    public long Peak => Interlocked.Read(ref peak);

    /// <summary>Stops sampling and waits for the sampler.</summary>
    public void Stop()
    {
        stop.Cancel();
        sampler.Wait();
    }

    /// <inheritdoc/>
    public void Dispose()
    {
        Stop();
        stop.Dispose();
    }
}

/// <summary>Runs benchmarks by name: <c>dotnet run -c Release --project tests/Spatial.Benchmarks -- NAME [args]</c>.</summary>
public static class Program
{
    /// <summary>Entry point.</summary>
    public static int Main(string[] args)
    {
        var all = typeof(Program).Assembly.GetTypes()
            .Where(t => typeof(IBenchmark).IsAssignableFrom(t) && t is { IsInterface: false, IsAbstract: false })
            .Select(t => (IBenchmark)Activator.CreateInstance(t)!)
            .OrderBy(b => b.Name, StringComparer.Ordinal)
            .ToList();
        if (args.Length == 0 || args[0] is "-h" or "--help")
        {
            Console.WriteLine("usage: Spatial.Benchmarks NAME [args]   (or 'all')");
            foreach (var b in all)
            {
                Console.WriteLine($"  {b.Name,-16} {b.Description}");
            }

            return 0;
        }

        var chosen = args[0] == "all" ? all : all.Where(b => b.Name == args[0]).ToList();
        if (chosen.Count == 0)
        {
            Console.Error.WriteLine($"no benchmark named '{args[0]}'");
            return 2;
        }

        var report = new BenchReport(Console.Out);
        foreach (var b in chosen)
        {
            Console.WriteLine($"== {b.Name}: {b.Description} ({Environment.ProcessorCount} cores, {RuntimeInformationText()})");
            b.Run(report, args[1..]);
        }

        return 0;
    }

    private static string RuntimeInformationText() =>
        System.Runtime.InteropServices.RuntimeInformation.FrameworkDescription + (Assembly.GetEntryAssembly()?.GetName().Version is { } v ? $", v{v}" : string.Empty);
}

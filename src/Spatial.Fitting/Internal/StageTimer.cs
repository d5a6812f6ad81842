using System.Diagnostics;

namespace Spatial.Fitting.Internal;

/// <summary>Optional per-stage wall-clock times of a fit (set by the benchmark; null in normal use).</summary>
internal static class StageTimer
{
    public static Action<string, double>? Sink { get; set; }

    public static Stopwatch Start() => Stopwatch.StartNew();

    public static void Lap(Stopwatch sw, string stage)
    {
        Sink?.Invoke(stage, sw.Elapsed.TotalSeconds);
        sw.Restart();
    }
}

using System.Text.Json;
using System.Text.Json.Serialization;
using Spectre.Console;

namespace Spatial.Cli;

/// <summary>Shared helpers for verbs: the JSON summary, progress, and messages.</summary>
internal static class CliOutput
{
    /// <summary>Options for every JSON document the command prints or writes: indented, camel-case-free (names as given), invariant.</summary>
    public static readonly JsonSerializerOptions JsonOptions = new()
    {
        WriteIndented = true,
        DefaultIgnoreCondition = JsonIgnoreCondition.Never,
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
        // Readable paths and messages ('…', é) on standard output; the output is never embedded in HTML.
        Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    /// <summary>Writes <paramref name="summary"/> as JSON to standard output.</summary>
    public static void WriteJson(CliEnv env, object summary) =>
        env.Out.WriteLine(JsonSerializer.Serialize(summary, summary.GetType(), JsonOptions));

    /// <summary>
    /// Runs <paramref name="work"/>, drawing a progress bar on standard error when the console is interactive
    /// and no JSON summary was asked for; otherwise silently.
    /// </summary>
    public static T WithProgress<T>(CliEnv env, bool json, string label, Func<IProgress<double>, T> work)
    {
        if (!env.Interactive || json)
        {
            return work(new Progress<double>(_ => { }));
        }

        var console = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(env.Err) });
        T result = default!;
        console.Progress()
            .AutoClear(true)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new ElapsedTimeColumn())
            .Start(ctx =>
            {
                var task = ctx.AddTask(label, maxValue: 1.0);
                result = work(new SyncProgress(f => task.Value = Math.Clamp(f, 0, 1)));
                task.Value = 1.0;
            });
        return result;
    }

    /// <summary>Progress reported on the calling thread (not the captured context), for a bar redrawn by Spectre.</summary>
    private sealed class SyncProgress(Action<double> report) : IProgress<double>
    {
        public void Report(double value) => report(value);
    }
}

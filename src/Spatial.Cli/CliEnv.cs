namespace Spatial.Cli;

/// <summary>
/// Where a run of the command writes and whether it may draw progress: the console for the real
/// program, string writers in tests.
/// </summary>
/// <param name="Out">Standard output (results, the <c>--json</c> summary).</param>
/// <param name="Err">Standard error (errors, warnings, progress).</param>
/// <param name="Interactive">True when both streams are a terminal: progress bars may be drawn.</param>
/// <param name="Cancel">Signalled by Ctrl-C.</param>
public sealed record CliEnv(TextWriter Out, TextWriter Err, bool Interactive, CancellationToken Cancel)
{
    /// <summary>An environment writing to the given writers, never interactive (for tests).</summary>
    public static CliEnv ForWriters(TextWriter output, TextWriter error) => new(output, error, false, CancellationToken.None);
}

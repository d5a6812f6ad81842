using Spatial.Cli;

namespace Spatial.Cli.Tests;

/// <summary>Runs the command line in process with string writers (no console, never interactive).</summary>
internal static class CliHarness
{
    /// <summary>Runs <c>spatial ARGS</c>; returns the exit code and what it printed on standard output and standard error.</summary>
    public static (int Code, string Out, string Err) Run(params string[] args)
    {
        using var output = new StringWriter();
        using var error = new StringWriter();
        var code = CliApp.Run(args, CliEnv.ForWriters(output, error));
        return (code, output.ToString(), error.ToString());
    }
}

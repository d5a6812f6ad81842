namespace Spatial.Cli;

/// <summary>Entry point of the <c>spatial</c> command.</summary>
public static class Program
{
    /// <summary>Runs the command line with the process's console.</summary>
    public static int Main(string[] args)
    {
        using var cancel = new CancellationTokenSource();
        Console.CancelKeyPress += (_, e) =>
        {
            e.Cancel = true;
            cancel.Cancel();
        };
        var env = new CliEnv(Console.Out, Console.Error, !Console.IsErrorRedirected && !Console.IsOutputRedirected, cancel.Token);
        return CliApp.Run(args, env);
    }
}

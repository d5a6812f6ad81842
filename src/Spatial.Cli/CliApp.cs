using System.CommandLine;
using Spatial.Core;

namespace Spatial.Cli;

/// <summary>Builds the command tree and runs it, turning failures into one-line messages and exit codes.</summary>
public static class CliApp
{
    /// <summary>Print a machine-readable JSON summary on standard output (every verb).</summary>
    public static readonly Option<bool> Json = new("--json") { Description = "Print a machine-readable JSON summary on standard output.", Recursive = true };

    /// <summary>Show stack traces of internal faults.</summary>
    public static readonly Option<bool> Debug = new("--debug") { Description = "Show full details (stack trace) when something fails.", Recursive = true };

    /// <summary>Builds the root command with every verb.</summary>
    public static RootCommand Build(CliEnv env)
    {
        var root = new RootCommand("spatial: reduce snow-depth station records to seasonal components, relate them to terrain, and publish maps, GIS layers and a report.");
        root.Options.Add(Json);
        root.Options.Add(Debug);
        foreach (var verb in VerbList.Create(env))
        {
            root.Subcommands.Add(verb);
        }

        return root;
    }

    /// <summary>Parses <paramref name="args"/> and runs the chosen verb. Returns the exit code (see <see cref="ExitCodes"/>).</summary>
    public static int Run(string[] args, CliEnv env)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(env);
        var debug = args.Contains("--debug");
        try
        {
            var root = Build(env);
            var parsed = root.Parse(args);
            if (parsed.Errors.Count > 0)
            {
                foreach (var error in parsed.Errors)
                {
                    env.Err.WriteLine($"spatial: {error.Message}");
                }

                env.Err.WriteLine("spatial: see 'spatial --help' or 'spatial VERB --help'.");
                return ExitCodes.BadUsage;
            }

            var config = new InvocationConfiguration { EnableDefaultExceptionHandler = false, Output = env.Out, Error = env.Err };
            return parsed.Invoke(config);
        }
        catch (SpatialDataException e)
        {
            env.Err.WriteLine($"spatial: error: {e.Diagnostic}");
            if (debug)
            {
                env.Err.WriteLine(e.ToString());
            }

            return ExitCodes.BadInput;
        }
        catch (UsageException e)
        {
            env.Err.WriteLine($"spatial: {e.Message}");
            return ExitCodes.BadUsage;
        }
        catch (OperationCanceledException)
        {
            env.Err.WriteLine("spatial: stopped.");
            return ExitCodes.Cancelled;
        }
#pragma warning disable CA1031 // The command line must turn every fault into a message and an exit code.
        catch (Exception e)
#pragma warning restore CA1031
        {
            env.Err.WriteLine($"spatial: internal fault: {e.GetType().Name}: {e.Message}" + (debug ? string.Empty : " (run again with --debug for details, and please report it)"));
            if (debug)
            {
                env.Err.WriteLine(e.ToString());
            }

            return ExitCodes.InternalFault;
        }
    }
}

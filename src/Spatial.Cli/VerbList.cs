using System.CommandLine;

namespace Spatial.Cli;

/// <summary>The verbs of the command, in the order <c>--help</c> lists them. Each verb lives in <c>Verbs/</c>.</summary>
internal static class VerbList
{
    public static IEnumerable<Command> Create(CliEnv env)
    {
        _ = env;
        yield return Verbs.ViewVerb.Create(env);
        yield break;
    }
}

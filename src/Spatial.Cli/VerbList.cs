using System.CommandLine;

namespace Spatial.Cli;

/// <summary>The verbs of the command, in the order <c>--help</c> lists them. Each verb lives in <c>Verbs/</c>.</summary>
internal static class VerbList
{
    public static IEnumerable<Command> Create(CliEnv env)
    {
        _ = env;
        yield return Verbs.DemoVerb.Create(env);
        yield return Verbs.ScenarioVerb.Create(env);
        yield return Verbs.ImportVerb.Create(env);
        yield return Verbs.FitVerb.Create(env);
        yield return Verbs.ApplyVerb.Create(env);
        yield return Verbs.CovariatesVerb.Create(env);
        yield return Verbs.RegressVerb.Create(env);
        yield return Verbs.ExportVerb.Create(env);
        yield return Verbs.ReportVerb.Create(env);
        yield return Verbs.ViewVerb.Create(env);
        yield break;
    }
}

using System.CommandLine;
using Spatial.Core;
using Spatial.Viewer;

namespace Spatial.Cli.Verbs;

/// <summary>
/// <c>spatial view RESULTS_DIR [--port N]</c>: serves the map page of a results folder on 127.0.0.1 until
/// Ctrl-C. Read-only: writes nothing into the folder (not even the run manifest).
/// </summary>
internal static class ViewVerb
{
    public static Command Create(CliEnv env)
    {
        var folder = new Argument<string>("RESULTS_DIR") { Description = "Results folder written by the other verbs (station_list.csv, stations.csv, seasons.csv, basis.json, layers/, …)." };
        var port = new Option<int>("--port") { Description = "TCP port on 127.0.0.1 (0, the default, picks a free port).", DefaultValueFactory = _ => 0 };
        var cmd = new Command("view", "Serve the map page of a results folder on 127.0.0.1 (loopback only) until Ctrl-C.");
        cmd.Arguments.Add(folder);
        cmd.Options.Add(port);
        cmd.SetAction(parseResult =>
        {
            var dir = parseResult.GetValue(folder)!;
            var p = parseResult.GetValue(port);
            var json = parseResult.GetValue(CliApp.Json);
            if (p is < 0 or > 65535)
            {
                throw new UsageException($"--port {p} is not a TCP port; give 1…65535, or 0 (the default) for a free port.");
            }

            ViewerServer server;
            try
            {
                server = ViewerServer.Start(new ViewerOptions(dir, p, ObservedCurves(dir)));
            }
            catch (IOException e) when (e is not FileNotFoundException and not DirectoryNotFoundException)
            {
                throw new UsageException($"cannot listen on 127.0.0.1:{p} ({e.Message}); choose another --port, or leave it out for a free port.");
            }

            try
            {
                if (json)
                {
                    CliOutput.WriteJson(env, new { url = server.Uri.ToString(), stations = server.StationCount, results = Path.GetFullPath(dir) });
                }
                else
                {
                    env.Out.WriteLine($"Map page: {server.Uri}  ({server.StationCount} stations from {Path.GetFullPath(dir)}; Ctrl-C stops)");
                }

                env.Out.Flush();
                server.RunUntilCancelledAsync(env.Cancel).GetAwaiter().GetResult();
            }
            finally
            {
                server.DisposeAsync().AsTask().GetAwaiter().GetResult();
            }

            env.Err.WriteLine("spatial: map page stopped.");
            return ExitCodes.Done;
        });
        return cmd;
    }

    /// <summary>
    /// Observed daily curves for the station panel's chart. They live in <c>matrix.parquet</c>, whose reader
    /// belongs to the records stage (<c>Spatial.Records.SeasonMatrixFile</c>); this composition root passes it to
    /// the viewer once that stage is merged. Until then the panel shows the mean and the reconstruction only,
    /// and says so on the page.
    /// </summary>
    private static Func<StationId, int, float[]?>? ObservedCurves(string folder)
    {
        _ = folder;
        return null;
    }
}

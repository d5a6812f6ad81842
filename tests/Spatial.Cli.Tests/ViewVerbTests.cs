using System.Net;
using System.Text.RegularExpressions;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

public sealed partial class ViewVerbTests
{
    [GeneratedRegex(@"http://127\.0\.0\.1:(\d+)/")]
    private static partial Regex Address();

    /// <summary>A results folder with only a station list (invented, plumbing only): the page must still work.</summary>
    private static string StationListOnly()
    {
        var dir = TestData.NewScratchFolder("view-verb");
        File.WriteAllText(Path.Combine(dir, "station_list.csv"), "station,name,longitude,latitude,elevation_m\nMF-1,Marrow Hut,-35.1,58.0,420\nMF-2,\"Skerry, Low\",-34.8,58.2,\n");
        return dir;
    }

    [Fact]
    public async Task View_prints_the_loopback_address_serves_the_page_and_stops_cleanly_on_cancel()
    {
        var dir = StationListOnly();
        var before = Directory.GetFiles(dir, "*", SearchOption.AllDirectories).Length;
        var output = new StringWriter();
        var error = new StringWriter();
        using var cancel = new CancellationTokenSource();
        var env = new CliEnv(TextWriter.Synchronized(output), TextWriter.Synchronized(error), false, cancel.Token);
        var run = Task.Run(() => CliApp.Run(["view", dir], env));
        Match? match = null;
        for (var i = 0; i < 300 && !(match = Address().Match(output.ToString())).Success; i++)
        {
            Assert.False(run.IsCompleted, "view ended early: " + error);
            await Task.Delay(50);
        }

        Assert.True(match!.Success, "no address printed: " + output);
        using (var http = new HttpClient { BaseAddress = new Uri(match.Value) })
        {
            using var page = await http.GetAsync("/");
            Assert.Equal(HttpStatusCode.OK, page.StatusCode);
            var stations = await http.GetStringAsync("/api/stations");
            Assert.Contains("\"Skerry, Low\"", stations, StringComparison.Ordinal);
        }

        cancel.Cancel();
        Assert.Equal(ExitCodes.Done, await run.WaitAsync(TimeSpan.FromSeconds(30)));
        Assert.Equal(before, Directory.GetFiles(dir, "*", SearchOption.AllDirectories).Length); // read-only: no manifest either
        Directory.Delete(dir, recursive: true);
    }

    [Fact]
    public void View_of_a_missing_folder_is_bad_input_with_one_line()
    {
        var output = new StringWriter();
        var error = new StringWriter();
        var code = CliApp.Run(["view", Path.Combine(Path.GetTempPath(), "spatial-no-such-folder-" + Guid.NewGuid().ToString("N"))], CliEnv.ForWriters(output, error));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("results folder does not exist", error.ToString(), StringComparison.Ordinal);
        Assert.Single(error.ToString().Trim().Split('\n'));
    }

    [Fact]
    public void View_with_a_port_out_of_range_is_bad_usage()
    {
        var dir = StationListOnly();
        var error = new StringWriter();
        Assert.Equal(ExitCodes.BadUsage, CliApp.Run(["view", dir, "--port", "70000"], CliEnv.ForWriters(new StringWriter(), error)));
        Assert.Contains("--port", error.ToString(), StringComparison.Ordinal);
        Directory.Delete(dir, recursive: true);
    }
}

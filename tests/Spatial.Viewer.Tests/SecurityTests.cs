using System.Net;
using System.Net.NetworkInformation;
using System.Net.Sockets;
using System.Text;
using Spatial.Testing;
using Xunit;

namespace Spatial.Viewer.Tests;

/// <summary>
/// Path traversal and other hostile requests, sent as raw HTTP/1.1 over a socket so that no client library
/// normalises the request target first.
/// </summary>
[Collection(SharedServer.Name)]
public sealed class SecurityTests(ServerFixture fixture)
{
    private static async Task<(int Status, string Response)> Raw(Uri server, string target)
    {
        using var client = new TcpClient();
        await client.ConnectAsync(IPAddress.Loopback, server.Port);
        using var stream = client.GetStream();
        var request = $"GET {target} HTTP/1.1\r\nHost: 127.0.0.1:{server.Port}\r\nConnection: close\r\n\r\n";
        await stream.WriteAsync(Encoding.Latin1.GetBytes(request));
        using var ms = new MemoryStream();
        await stream.CopyToAsync(ms).WaitAsync(TimeSpan.FromSeconds(20));
        var text = Encoding.Latin1.GetString(ms.ToArray());
        var status = int.Parse(text.AsSpan(9, 3), System.Globalization.CultureInfo.InvariantCulture);
        return (status, text);
    }

    public static TheoryData<string> TraversalTargets => new()
    {
        "/../station_list.csv",
        "/../../../../etc/passwd",
        "/api/layers/../../station_list.csv",
        "/api/layers/../station_list.csv",
        "/api/layers/%2e%2e/%2e%2e/station_list.csv",
        "/api/layers/%2E%2E%2Fstation_list.csv",
        "/api/layers/%2e%2e%2f%2e%2e%2fetc%2fpasswd",
        "/api/layers/..%2fstation_list.csv",
        "/api/layers/%252e%252e%252fstation_list.csv",
        "/api/layers/..\\station_list.csv",
        "/api/layers/..%5cstation_list.csv",
        "/api/layers/%5c..%5c..%5cstation_list.csv",
        "/api/layers/coastline.geojson%00.png",
        "/api/layers/%00",
        "/api/stations/%00",
        "/station_list.csv",
        "/stations.csv",
        "/layers/coastline.geojson",
        "/regression/fitted.csv",
        "/etc/passwd",
        "//etc/passwd",
        "/api/layers//etc/passwd",
        "/api/layers/%2fetc%2fpasswd",
        "/api/layers/C:%5cWindows%5cwin.ini",
        "/api/layers/C:/Windows/win.ini",
        "/./station_list.csv",
        "/api/layers/./coastline.geojson",
        "/layers/",
        "/api/layers/",
        "/api/",
        "/api/stations/../../station_list.csv",
        "/api/stations/%2e%2e%2f%2e%2e%2fstation_list.csv/seasons",
        "http://127.0.0.1/etc/passwd",
        "file:///etc/passwd",
        "*",
    };

    [Theory]
    [MemberData(nameof(TraversalTargets))]
    public async Task Traversal_attempts_are_refused_and_leak_nothing(string target)
    {
        var (status, response) = await Raw(fixture.Server.Uri, target);
        Assert.True(status is 400 or 404 or 405, $"{target}: {status}"); // 405: Kestrel refuses the asterisk form for GET
        var body = response[(response.IndexOf("\r\n\r\n", StringComparison.Ordinal) + 4)..];
        Assert.True(body.Length < 120, $"{target}: long body {body}");
        Assert.DoesNotContain("MF-001", response, StringComparison.Ordinal); // content of the results files
        Assert.DoesNotContain("root:", response, StringComparison.Ordinal);
        Assert.DoesNotContain(ServerFixture.ResultsFolder, response, StringComparison.Ordinal);
        Assert.DoesNotContain("/tmp", response, StringComparison.Ordinal);
        Assert.DoesNotContain("Exception", response, StringComparison.Ordinal);
    }

    [Fact]
    public async Task Folders_are_never_listed()
    {
        foreach (var target in new[] { "/", "/api/layers", "/api/layers/", "/layers", "/regression/" })
        {
            var (_, response) = await Raw(fixture.Server.Uri, target);
            Assert.DoesNotContain("coastline.geojson", response, StringComparison.Ordinal);
            Assert.DoesNotContain("fitted.csv", response, StringComparison.Ordinal);
        }
    }

    [Fact]
    public async Task The_server_answers_on_the_loopback_address_only()
    {
        var port = fixture.Server.Uri.Port;
        Assert.Equal("127.0.0.1", fixture.Server.Uri.Host);
        var others = NetworkInterface.GetAllNetworkInterfaces()
            .SelectMany(n => n.GetIPProperties().UnicastAddresses)
            .Select(a => a.Address)
            .Where(a => a.AddressFamily == AddressFamily.InterNetwork && !IPAddress.IsLoopback(a))
            .ToList();
        foreach (var address in others)
        {
            using var client = new TcpClient();
            var connected = false;
            try
            {
                await client.ConnectAsync(address, port).WaitAsync(TimeSpan.FromSeconds(5));
                connected = true;
            }
            catch (SocketException)
            {
                // Refused: nothing listens there.
            }

            Assert.False(connected, $"the viewer answered on {address}:{port}");
        }
    }

    [Fact]
    public async Task The_results_folder_is_not_written_while_serving()
    {
        var folder = TestData.NewScratchFolder("viewer-readonly");
        SyntheticResults.Write(folder, 12, 4, seed: 3);
        var before = Snapshot(folder);
        await using (var server = await ViewerServer.StartAsync(new ViewerOptions(folder)))
        {
            using var http = new HttpClient { BaseAddress = server.Uri };
            foreach (var url in new[] { "/", "/app.js", "/api/meta", "/api/stations?variable=stations.median_c1&min_days=10", "/api/stations.geojson", "/api/stations/MF-001/curve?season=2001", "/api/layers/coastline.geojson", "/api/layers/hillshade.png" })
            {
                using var response = await http.GetAsync(url);
                Assert.Equal(HttpStatusCode.OK, response.StatusCode);
            }
        }

        Assert.Equal(before, Snapshot(folder));
        Directory.Delete(folder, recursive: true);

        static string Snapshot(string folder) => string.Join("\n", Directory.EnumerateFileSystemEntries(folder, "*", SearchOption.AllDirectories).Order(StringComparer.Ordinal)
            .Select(f => $"{Path.GetRelativePath(folder, f)} {(File.Exists(f) ? Convert.ToHexString(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(f))) + " " + File.GetLastWriteTimeUtc(f).Ticks : "dir")}"));
    }
}

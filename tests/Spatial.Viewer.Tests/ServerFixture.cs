using Spatial.Core;
using Spatial.Testing;
using Xunit;

namespace Spatial.Viewer.Tests;

/// <summary>
/// One viewer over the committed invented results folder (data/results), with an observed-curve provider
/// that rebuilds a plausible daily curve from the fixture's basis and coefficients (invented, for plumbing).
/// </summary>
public sealed class ServerFixture : IAsyncLifetime
{
    public ViewerServer Server { get; private set; } = null!;

    public HttpClient Http { get; private set; } = null!;

    public static string ResultsFolder => TestData.Path("results");

    /// <summary>Observed curve of a station-season in the fixture: the reconstruction with every component plus seeded noise, day 0–40 missing.</summary>
    public static float[]? ObservedCurve(StationId station, int season)
    {
        var basis = Fixture.Basis.Value;
        var row = Fixture.SeasonRow(station.Value, season);
        if (row is null)
        {
            return null;
        }

        var rng = new Random(HashCode.Combine(station.Value.Length, season));
        var curve = new float[365];
        for (var d = 0; d < 365; d++)
        {
            var x = basis.Mean[d];
            for (var k = 0; k < basis.Components.Length; k++)
            {
                x += row[k] * basis.Components[k][d];
            }

            curve[d] = d < 40 ? float.NaN : (float)Math.Max(0, x + (rng.NextDouble() - 0.5) * 60);
        }

        return curve;
    }

    public async Task InitializeAsync()
    {
        Server = await ViewerServer.StartAsync(new ViewerOptions(ResultsFolder, 0, ObservedCurve));
        Http = new HttpClient { BaseAddress = Server.Uri, Timeout = TimeSpan.FromSeconds(30) };
    }

    public async Task DisposeAsync()
    {
        Http.Dispose();
        await Server.DisposeAsync();
    }
}

[CollectionDefinition(Name)]
public sealed class SharedServer : ICollectionFixture<ServerFixture>
{
    public const string Name = "viewer server";
}

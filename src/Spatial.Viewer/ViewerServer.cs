using System.Net;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Spatial.Viewer.Internal;

namespace Spatial.Viewer;

/// <summary>
/// The local map page: a running web server on 127.0.0.1 (ASP.NET Core's Kestrel) that serves one page and a
/// small read-only JSON API over a results folder. Dispose to stop it.
/// </summary>
public sealed class ViewerServer : IAsyncDisposable
{
    private readonly WebApplication app;

    private ViewerServer(WebApplication app, Uri uri, int stationCount)
    {
        this.app = app;
        Uri = uri;
        StationCount = stationCount;
    }

    /// <summary>Address of the page, e.g. <c>http://127.0.0.1:41234/</c>.</summary>
    public Uri Uri { get; }

    /// <summary>Number of stations read from the results folder.</summary>
    public int StationCount { get; }

    /// <summary>
    /// Reads the results folder and starts serving it on 127.0.0.1. Throws
    /// <see cref="Spatial.Core.SpatialDataException"/> when the folder cannot be used, and
    /// <see cref="IOException"/> when the port is taken.
    /// </summary>
    public static ViewerServer Start(ViewerOptions options) => StartAsync(options).GetAwaiter().GetResult();

    /// <summary>Asynchronous form of <see cref="Start"/>.</summary>
    public static async Task<ViewerServer> StartAsync(ViewerOptions options, CancellationToken cancel = default)
    {
        ArgumentNullException.ThrowIfNull(options);
        ArgumentOutOfRangeException.ThrowIfNegative(options.Port);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(options.Port, 65535);
        var data = ResultsData.Load(options.ResultsFolder);
        var builder = WebApplication.CreateSlimBuilder(new WebApplicationOptions
        {
            Args = [],
            ContentRootPath = AppContext.BaseDirectory,
            EnvironmentName = Environments.Production,
            ApplicationName = typeof(ViewerServer).Assembly.GetName().Name,
        });
        builder.Logging.ClearProviders();
        builder.WebHost.UseKestrel(k =>
        {
            k.AddServerHeader = false;
            k.Limits.MaxRequestLineSize = 1024 * 1024; // long query strings (up to 1 MiB) reach our own check and get 400
            k.Limits.MaxRequestBodySize = 0;
            k.Limits.MaxConcurrentConnections = 256;
            k.Listen(IPAddress.Loopback, options.Port); // loopback only, whatever ASPNETCORE_URLS says
        });
        var app = builder.Build();
        var api = new ViewerApi(data, options.ObservedCurve);
        app.Use(RequestGuard.Invoke);
        api.Map(app);
        try
        {
            await app.StartAsync(cancel);
        }
        catch
        {
            await app.DisposeAsync();
            throw;
        }

        var address = app.Services.GetRequiredService<IServer>().Features.Get<IServerAddressesFeature>()!.Addresses.First();
        var port = new Uri(address).Port;
        return new ViewerServer(app, new Uri($"http://127.0.0.1:{port}/"), data.Stations.Count);
    }

    /// <summary>Waits until <paramref name="cancel"/> is signalled (e.g. by Ctrl-C) or the process is asked to terminate (SIGTERM), then stops the server.</summary>
    public async Task RunUntilCancelledAsync(CancellationToken cancel)
    {
        // The host also stops on SIGTERM (its console lifetime): wait for either.
        var lifetime = app.Services.GetRequiredService<IHostApplicationLifetime>();
        using var either = CancellationTokenSource.CreateLinkedTokenSource(cancel, lifetime.ApplicationStopping);
        try
        {
            await Task.Delay(Timeout.Infinite, either.Token);
        }
        catch (OperationCanceledException)
        {
            // Asked to stop.
        }

        await app.StopAsync(CancellationToken.None);
    }

    /// <inheritdoc />
    public async ValueTask DisposeAsync()
    {
        await app.StopAsync(CancellationToken.None);
        await app.DisposeAsync();
    }
}

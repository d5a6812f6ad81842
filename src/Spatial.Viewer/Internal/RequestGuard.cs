using System.Net;
using System.Text;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Http.Features;

namespace Spatial.Viewer.Internal;

/// <summary>
/// The first step of every request: refuses what the page never sends before any endpoint sees it.
/// Loopback clients only; GET only; the Host header must name the loopback address (no DNS rebinding);
/// the raw request target must be short, start with '/', and hold no dot segments (plain or percent-encoded),
/// backslashes, encoded NUL or control characters; the query must be short, well-formed percent-encoding.
/// Refusals carry a short plain message and leak nothing about the file system. Also sets the security
/// headers of every answer and turns an internal fault into a bare 500.
/// </summary>
internal static class RequestGuard
{
    /// <summary>Longest request target accepted (path and query), characters.</summary>
    public const int MaxTargetLength = 2048;

    /// <summary>Longest query string accepted, characters.</summary>
    public const int MaxQueryLength = 1024;

    public static async Task Invoke(HttpContext context, RequestDelegate next)
    {
        var headers = context.Response.Headers;
        headers.XContentTypeOptions = "nosniff";
        headers.ContentSecurityPolicy = "default-src 'self'; img-src 'self' data: blob:; style-src 'self'; script-src 'self'; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'";
        headers["Referrer-Policy"] = "no-referrer";
        headers.XFrameOptions = "DENY";
        headers.CacheControl = "no-store";

        var remote = context.Connection.RemoteIpAddress;
        if (remote is null || !IPAddress.IsLoopback(remote))
        {
            await Refuse(context, StatusCodes.Status403Forbidden, "loopback clients only");
            return;
        }

        if (!HttpMethods.IsGet(context.Request.Method))
        {
            headers.Allow = "GET";
            await Refuse(context, StatusCodes.Status405MethodNotAllowed, "read-only: GET only");
            return;
        }

        if (!HostIsLoopback(context.Request.Host))
        {
            await Refuse(context, StatusCodes.Status400BadRequest, "bad Host header");
            return;
        }

        var raw = context.Features.Get<IHttpRequestFeature>()?.RawTarget ?? string.Empty;
        if (TargetProblem(raw) is { } problem)
        {
            await Refuse(context, StatusCodes.Status400BadRequest, problem);
            return;
        }

        try
        {
            await next(context);
        }
#pragma warning disable CA1031 // an internal fault must never leak details to the page
        catch (Exception) when (!context.Response.HasStarted)
#pragma warning restore CA1031
        {
            context.Response.Clear();
            await Refuse(context, StatusCodes.Status500InternalServerError, "internal fault");
        }
    }

    /// <summary>Why a raw request target is refused, or null when it is acceptable.</summary>
    internal static string? TargetProblem(string raw)
    {
        if (raw.Length == 0 || raw.Length > MaxTargetLength)
        {
            return "request target too long";
        }

        if (raw[0] != '/')
        {
            return "bad path";
        }

        var q = raw.IndexOf('?', StringComparison.Ordinal);
        var path = q < 0 ? raw : raw[..q];
        var query = q < 0 ? string.Empty : raw[(q + 1)..];
        if (query.Length > MaxQueryLength)
        {
            return "query string too long";
        }

        foreach (var c in raw)
        {
            if (c < 0x21 || c == 0x7f || c > 0x7e)
            {
                return "bad character in request";
            }
        }

        if (path.Contains('\\', StringComparison.Ordinal) || path.Contains("//", StringComparison.Ordinal)
            || path.Contains("..", StringComparison.Ordinal) || path.Contains("/./", StringComparison.Ordinal) || path.EndsWith("/.", StringComparison.Ordinal)
            || path.Contains("%2e", StringComparison.OrdinalIgnoreCase) || path.Contains("%5c", StringComparison.OrdinalIgnoreCase)
            || path.Contains("%00", StringComparison.Ordinal) || path.Contains("%25", StringComparison.Ordinal) || path.Contains(':', StringComparison.Ordinal))
        {
            return "bad path";
        }

        if (!PercentEncodingIsValid(path))
        {
            return "bad path";
        }

        if (!PercentEncodingIsValid(query) || query.Contains("%00", StringComparison.Ordinal))
        {
            return "malformed query string";
        }

        return null;
    }

    private static bool PercentEncodingIsValid(string text)
    {
        var bytes = new List<byte>(text.Length);
        for (var i = 0; i < text.Length; i++)
        {
            if (text[i] == '%')
            {
                if (i + 2 >= text.Length || !Uri.IsHexDigit(text[i + 1]) || !Uri.IsHexDigit(text[i + 2]))
                {
                    return false;
                }

                bytes.Add(Convert.ToByte(text.Substring(i + 1, 2), 16));
                i += 2;
            }
            else
            {
                bytes.Add((byte)text[i]);
            }
        }

        try
        {
            var decoded = new UTF8Encoding(false, throwOnInvalidBytes: true).GetString([.. bytes]);
            return !decoded.Any(char.IsControl);
        }
        catch (DecoderFallbackException)
        {
            return false;
        }
    }

    private static bool HostIsLoopback(HostString host)
    {
        if (!host.HasValue)
        {
            return false;
        }

        var name = host.Host;
        return name is "127.0.0.1" or "localhost" or "[::1]" or "::1";
    }

    private static Task Refuse(HttpContext context, int status, string message)
    {
        context.Response.StatusCode = status;
        context.Response.ContentType = "application/json; charset=utf-8";
        return context.Response.WriteAsync(ViewerApi.ErrorJson(message));
    }
}

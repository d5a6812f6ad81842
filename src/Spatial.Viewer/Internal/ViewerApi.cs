using System.Globalization;
using System.Text;
using System.Text.Json;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Spatial.Core;

namespace Spatial.Viewer.Internal;

/// <summary>
/// The page and its JSON API. Every answer is built from <see cref="ResultsData"/> read at start; layer files
/// are served only from a fixed list made at start (never from a path taken from the request).
/// Unknown station → 404; unknown or malformed parameter → 400; both with <c>{"error": "…"}</c>.
/// Numbers are written in invariant form; unknown values (NaN) as null.
/// </summary>
internal sealed class ViewerApi(ResultsData data, Func<StationId, int, float[]?>? observedCurve)
{
    private static readonly JsonWriterOptions WriterOptions = new() { Indented = false };

    private static readonly string[] PanelTables = ["covariates", "summary"];

    private readonly Dictionary<string, (string Path, string ContentType)> layerFiles = LayerFiles(data);

    public static string ErrorJson(string message)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, WriterOptions))
        {
            w.WriteStartObject();
            w.WriteString("error", message);
            w.WriteEndObject();
        }

        return Encoding.UTF8.GetString(ms.ToArray());
    }

    public void Map(WebApplication app)
    {
        app.MapGet("/", (HttpContext c) => Asset(c, "index.html", "text/html; charset=utf-8"));
        app.MapGet("/app.js", (HttpContext c) => Asset(c, "app.js", "text/javascript; charset=utf-8"));
        app.MapGet("/app.css", (HttpContext c) => Asset(c, "app.css", "text/css; charset=utf-8"));
        app.MapGet("/api/meta", Meta);
        app.MapGet("/api/basis", Basis);
        app.MapGet("/api/stations", Stations);
        app.MapGet("/api/stations.geojson", StationsGeoJson);
        app.MapGet("/api/stations/{id}", Station);
        app.MapGet("/api/stations/{id}/seasons", Seasons);
        app.MapGet("/api/stations/{id}/curve", Curve);
        app.MapGet("/api/layers/{name}", Layer);
        app.MapFallback((HttpContext c) => Error(c, StatusCodes.Status404NotFound, "not found"));
    }

    private static Task Error(HttpContext context, int status, string message)
    {
        context.Response.StatusCode = status;
        context.Response.ContentType = "application/json; charset=utf-8";
        return context.Response.WriteAsync(ErrorJson(message));
    }

    private static async Task Json(HttpContext context, Action<Utf8JsonWriter> write, string contentType = "application/json; charset=utf-8")
    {
        context.Response.ContentType = contentType;
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, WriterOptions))
        {
            write(w);
        }

        context.Response.ContentLength = ms.Length;
        await context.Response.Body.WriteAsync(ms.GetBuffer().AsMemory(0, (int)ms.Length));
    }

    private static void Number(Utf8JsonWriter w, string name, double value)
    {
        if (double.IsFinite(value))
        {
            w.WriteNumber(name, value);
        }
        else
        {
            w.WriteNull(name);
        }
    }

    private static void NumberValue(Utf8JsonWriter w, double value)
    {
        if (double.IsFinite(value))
        {
            w.WriteNumberValue(value);
        }
        else
        {
            w.WriteNullValue();
        }
    }

    private static async Task Asset(HttpContext context, string name, string contentType)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, [], out var error))
        {
            await Error(context, StatusCodes.Status400BadRequest, error);
            return;
        }

        var bytes = PageAssets.Get(name);
        context.Response.ContentType = contentType;
        context.Response.ContentLength = bytes.Length;
        await context.Response.Body.WriteAsync(bytes);
    }

    private bool TryStation(HttpContext context, string id, out int index)
    {
        var text = id.Replace("%2F", "/", StringComparison.OrdinalIgnoreCase);
        return data.StationIndex.TryGetValue(text, out index);
    }

    private Task Meta(HttpContext context)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, [], out var error))
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        return Json(context, w =>
        {
            w.WriteStartObject();
            w.WriteNumber("station_count", data.Stations.Count);
            double west = double.MaxValue, east = double.MinValue, south = double.MaxValue, north = double.MinValue;
            foreach (var s in data.Stations)
            {
                west = Math.Min(west, s.Longitude);
                east = Math.Max(east, s.Longitude);
                south = Math.Min(south, s.Latitude);
                north = Math.Max(north, s.Latitude);
            }

            w.WriteStartObject("bounds");
            Number(w, "west", west);
            Number(w, "south", south);
            Number(w, "east", east);
            Number(w, "north", north);
            w.WriteEndObject();
            if (data.SeasonRange is { } range)
            {
                w.WriteStartObject("seasons");
                w.WriteNumber("first", range.First);
                w.WriteNumber("last", range.Last);
                w.WriteEndObject();
            }
            else
            {
                w.WriteNull("seasons");
            }

            w.WriteBoolean("has_residual", data.FullResidualColumn >= 0);
            w.WriteNumber("components", data.Basis?.Components.Length ?? 0);
            w.WriteBoolean("observed_curves", observedCurve is not null);
            w.WriteStartArray("variables");
            foreach (var v in data.Variables)
            {
                w.WriteStartObject();
                w.WriteString("key", v.Key);
                w.WriteString("label", v.Label);
                w.WriteString("unit", v.Unit);
                w.WriteString("scale", v.Scale == ScaleKind.Diverging ? "diverging" : "sequential");
                w.WriteString("group", v.Group);
                w.WriteBoolean("from_seasons", v.SeasonColumn is not null);
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteStartObject("layers");
            w.WriteBoolean("coastline", data.CoastlinePath is not null);
            if (data.Hillshade is { } h)
            {
                w.WritePropertyName("hillshade");
                WriteImage(w, h);
            }
            else
            {
                w.WriteNull("hillshade");
            }

            w.WriteStartArray("predicted");
            foreach (var p in data.Predicted)
            {
                WriteImage(w, p);
            }

            w.WriteEndArray();
            w.WriteEndObject();
            w.WriteEndObject();
        });

        static void WriteImage(Utf8JsonWriter w, ImageLayer l)
        {
            w.WriteStartObject();
            w.WriteString("key", l.Key);
            w.WriteString("label", l.Label);
            w.WriteString("url", $"/api/layers/{l.Key}.png");
            w.WriteNumber("west", l.West);
            w.WriteNumber("south", l.South);
            w.WriteNumber("east", l.East);
            w.WriteNumber("north", l.North);
            Number(w, "min", l.Min);
            Number(w, "max", l.Max);
            w.WriteString("unit", l.Unit);
            w.WriteEndObject();
        }
    }

    private Task Basis(HttpContext context)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, [], out var error))
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        if (data.Basis is not { } b)
        {
            return Error(context, StatusCodes.Status404NotFound, "no basis in this results folder");
        }

        return Json(context, w =>
        {
            w.WriteStartObject();
            w.WriteString("season_start", b.SeasonStart);
            w.WriteString("units", b.Units);
            w.WriteStartArray("mean");
            foreach (var x in b.Mean)
            {
                NumberValue(w, x);
            }

            w.WriteEndArray();
            w.WriteStartArray("components");
            foreach (var c in b.Components)
            {
                w.WriteStartArray();
                foreach (var x in c)
                {
                    NumberValue(w, x);
                }

                w.WriteEndArray();
            }

            w.WriteEndArray();
            w.WriteStartArray("labels");
            foreach (var l in b.Labels)
            {
                w.WriteStringValue(l);
            }

            w.WriteEndArray();
            w.WriteStartArray("variance_fraction");
            foreach (var x in b.VarianceFraction)
            {
                NumberValue(w, x);
            }

            w.WriteEndArray();
            w.WriteEndObject();
        });
    }

    private Task Stations(HttpContext context)
    {
        var query = StationQuery.Parse(context.Request.Query, data, out var error);
        if (query is null)
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        var rows = query.Evaluate(data);
        var info = query.Variable is null ? null : data.Variables.First(v => v.Key == query.Variable);
        return Json(context, w =>
        {
            w.WriteStartObject();
            if (info is null)
            {
                w.WriteNull("variable");
            }
            else
            {
                w.WriteStartObject("variable");
                w.WriteString("key", info.Key);
                w.WriteString("label", info.Label);
                w.WriteString("unit", info.Unit);
                w.WriteString("scale", info.Scale == ScaleKind.Diverging ? "diverging" : "sequential");
                w.WriteBoolean("recomputed", query.Filters && info.SeasonColumn is not null);
                w.WriteEndObject();
            }

            w.WriteNumber("count", rows.Count);
            w.WriteStartArray("stations");
            foreach (var (i, value) in rows)
            {
                var s = data.Stations[i];
                w.WriteStartObject();
                w.WriteString("id", s.Id.Value);
                w.WriteString("name", s.Name);
                w.WriteNumber("lon", s.Longitude);
                w.WriteNumber("lat", s.Latitude);
                Number(w, "value", value);
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteEndObject();
        });
    }

    private Task StationsGeoJson(HttpContext context)
    {
        var query = StationQuery.Parse(context.Request.Query, data, out var error);
        if (query is null)
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        var rows = query.Evaluate(data);
        var info = query.Variable is null ? null : data.Variables.First(v => v.Key == query.Variable);
        var fileName = "stations" + (info is null ? string.Empty : "_" + new string([.. info.Key.Select(c => char.IsAsciiLetterOrDigit(c) || c is '_' or '-' ? c : '_')])) + ".geojson";
        context.Response.Headers.ContentDisposition = $"attachment; filename=\"{fileName}\"";
        return Json(
            context,
            w =>
            {
                // RFC 7946: a FeatureCollection of WGS 84 longitude/latitude points.
                w.WriteStartObject();
                w.WriteString("type", "FeatureCollection");
                w.WriteStartArray("features");
                foreach (var (i, value) in rows)
                {
                    var s = data.Stations[i];
                    w.WriteStartObject();
                    w.WriteString("type", "Feature");
                    w.WriteStartObject("geometry");
                    w.WriteString("type", "Point");
                    w.WriteStartArray("coordinates");
                    w.WriteNumberValue(s.Longitude);
                    w.WriteNumberValue(s.Latitude);
                    w.WriteEndArray();
                    w.WriteEndObject();
                    w.WriteStartObject("properties");
                    w.WriteString("station", s.Id.Value);
                    w.WriteString("name", s.Name);
                    if (info is not null)
                    {
                        w.WriteString("variable", info.Key);
                        w.WriteString("unit", info.Unit);
                        Number(w, "value", value);
                    }

                    w.WriteEndObject();
                    w.WriteEndObject();
                }

                w.WriteEndArray();
                w.WriteEndObject();
            },
            "application/geo+json");
    }

    private Task Station(HttpContext context, string id)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, [], out var error))
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        if (!TryStation(context, id, out var i))
        {
            return Error(context, StatusCodes.Status404NotFound, "no such station");
        }

        var s = data.Stations[i];
        return Json(context, w =>
        {
            w.WriteStartObject();
            w.WriteString("id", s.Id.Value);
            w.WriteString("name", s.Name);
            w.WriteNumber("longitude", s.Longitude);
            w.WriteNumber("latitude", s.Latitude);
            Number(w, "elevation_listed_m", s.ElevationListedM);
            var cov = data.StationTables.GetValueOrDefault("covariates");
            Number(w, "elevation_dem_m", cov?.GetValueOrDefault("elevation_dem_m")?[i] ?? double.NaN);
            Number(w, "coast_km", cov?.GetValueOrDefault("coast_km")?[i] ?? double.NaN);
            w.WriteNumber("season_count", data.Seasons[i].Count);
            foreach (var table in PanelTables)
            {
                if (data.StationTables.TryGetValue(table, out var columns))
                {
                    w.WriteStartObject(table);
                    foreach (var (name, values) in columns)
                    {
                        Number(w, name, values[i]);
                    }

                    w.WriteEndObject();
                }
                else
                {
                    w.WriteNull(table);
                }
            }

            w.WriteStartArray("trends");
            if (data.StationTables.TryGetValue("summary", out var summary))
            {
                foreach (var (name, values) in summary)
                {
                    if (!name.StartsWith("sen_per_decade_", StringComparison.Ordinal))
                    {
                        continue;
                    }

                    var what = name["sen_per_decade_".Length..];
                    w.WriteStartObject();
                    w.WriteString("name", what);
                    w.WriteString("label", ResultsData.Describe(what, data.Basis));
                    w.WriteString("unit", ResultsData.UnitOf(what) + " per decade");
                    Number(w, "sen_per_decade", values[i]);
                    Number(w, "mk_z", summary.GetValueOrDefault("mk_z_" + what)?[i] ?? double.NaN);
                    Number(w, "mk_p", summary.GetValueOrDefault("mk_p_" + what)?[i] ?? double.NaN);
                    w.WriteEndObject();
                }
            }

            w.WriteEndArray();
            w.WriteStartArray("regression");
            foreach (var (response, arrays) in data.Fitted.OrderBy(kv => kv.Key, StringComparer.Ordinal))
            {
                w.WriteStartObject();
                w.WriteString("response", response);
                Number(w, "observed", arrays.Observed[i]);
                Number(w, "fitted", arrays.Fitted[i]);
                Number(w, "residual", arrays.Residual[i]);
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteEndObject();
        });
    }

    private Task Seasons(HttpContext context, string id)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, [], out var error))
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        if (!TryStation(context, id, out var i))
        {
            return Error(context, StatusCodes.Status404NotFound, "no such station");
        }

        return Json(context, w =>
        {
            w.WriteStartObject();
            w.WriteString("station", data.Stations[i].Id.Value);
            w.WriteStartArray("columns");
            w.WriteStringValue("season");
            foreach (var c in data.SeasonColumns)
            {
                w.WriteStringValue(c);
            }

            w.WriteEndArray();
            w.WriteStartArray("rows");
            foreach (var s in data.Seasons[i])
            {
                w.WriteStartArray();
                w.WriteNumberValue(s.Season);
                foreach (var x in s.Values)
                {
                    NumberValue(w, x);
                }

                w.WriteEndArray();
            }

            w.WriteEndArray();
            w.WriteEndObject();
        });
    }

    /// <summary>
    /// Mean curve, the season's observed curve (when a provider was given) and its reconstructions
    /// mean + Σ_{i≤k} c_i·v_i for k = 1…K, in mm per season day.
    /// </summary>
    private Task Curve(HttpContext context, string id)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, ["season"], out var error))
        {
            return Error(context, StatusCodes.Status400BadRequest, error);
        }

        if (!TryStation(context, id, out var i))
        {
            return Error(context, StatusCodes.Status404NotFound, "no such station");
        }

        var text = context.Request.Query["season"].ToString();
        if (!int.TryParse(text, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var year) || year < -9999 || year > 9999)
        {
            return Error(context, StatusCodes.Status400BadRequest, "'season' must be a season year (a whole number)");
        }

        if (data.Basis is not { } basis)
        {
            return Error(context, StatusCodes.Status404NotFound, "no basis in this results folder");
        }

        var row = data.Seasons[i].FirstOrDefault(s => s.Season == year);
        if (row is null)
        {
            return Error(context, StatusCodes.Status404NotFound, "this station has no such season");
        }

        var k = basis.Components.Length;
        var coefficients = new double[k];
        for (var j = 0; j < k; j++)
        {
            var col = Array.IndexOf(data.SeasonColumns, "c" + (j + 1).ToString(CultureInfo.InvariantCulture));
            coefficients[j] = col >= 0 ? row.Values[col] : double.NaN;
        }

        float[]? observed = null;
        var observedNote = observedCurve is null ? "no season-matrix reader was given to the viewer" : string.Empty;
        if (observedCurve is not null)
        {
            try
            {
                observed = observedCurve(data.Stations[i].Id, year);
                if (observed is null)
                {
                    observedNote = "this season is not in the season matrix";
                }
                else if (observed.Length != ResultsData.SeasonDays)
                {
                    observed = null;
                    observedNote = "the season matrix gave a curve of the wrong length";
                }
            }
            catch (Exception e) when (e is SpatialDataException or IOException or InvalidDataException)
            {
                observedNote = "the season matrix cannot be read";
            }
        }

        return Json(context, w =>
        {
            w.WriteStartObject();
            w.WriteString("station", data.Stations[i].Id.Value);
            w.WriteNumber("season", year);
            w.WriteString("season_start", basis.SeasonStart);
            w.WriteString("units", basis.Units);
            w.WriteStartArray("mean");
            foreach (var x in basis.Mean)
            {
                NumberValue(w, x);
            }

            w.WriteEndArray();
            if (observed is null)
            {
                w.WriteNull("observed");
                w.WriteString("observed_note", observedNote);
            }
            else
            {
                w.WriteStartArray("observed");
                foreach (var x in observed)
                {
                    NumberValue(w, x);
                }

                w.WriteEndArray();
            }

            w.WriteStartArray("coefficients");
            foreach (var c in coefficients)
            {
                NumberValue(w, c);
            }

            w.WriteEndArray();
            w.WriteStartArray("labels");
            foreach (var l in basis.Labels)
            {
                w.WriteStringValue(l);
            }

            w.WriteEndArray();
            w.WriteStartArray("reconstructions");
            var current = (double[])basis.Mean.Clone();
            for (var j = 0; j < k; j++)
            {
                var c = coefficients[j];
                for (var d = 0; d < current.Length; d++)
                {
                    current[d] += c * basis.Components[j][d];
                }

                w.WriteStartArray();
                foreach (var x in current)
                {
                    NumberValue(w, Math.Round(x, 4));
                }

                w.WriteEndArray();
            }

            w.WriteEndArray();
            w.WriteEndObject();
        });
    }

    private async Task Layer(HttpContext context, string name)
    {
        if (!QueryRules.OnlyKnown(context.Request.Query, [], out var error))
        {
            await Error(context, StatusCodes.Status400BadRequest, error);
            return;
        }

        if (!layerFiles.TryGetValue(name, out var file))
        {
            await Error(context, StatusCodes.Status404NotFound, "no such layer");
            return;
        }

        byte[] bytes;
        try
        {
            bytes = await File.ReadAllBytesAsync(file.Path, context.RequestAborted);
        }
        catch (IOException)
        {
            await Error(context, StatusCodes.Status404NotFound, "no such layer");
            return;
        }

        context.Response.ContentType = file.ContentType;
        context.Response.ContentLength = bytes.Length;
        await context.Response.Body.WriteAsync(bytes, context.RequestAborted);
    }

    private static Dictionary<string, (string, string)> LayerFiles(ResultsData data)
    {
        var files = new Dictionary<string, (string, string)>(StringComparer.Ordinal);
        if (data.CoastlinePath is { } coast)
        {
            files["coastline.geojson"] = (coast, "application/geo+json"); // RFC 7946 media type
        }

        if (data.Hillshade is { } h)
        {
            files[h.Key + ".png"] = (h.FilePath, "image/png");
        }

        foreach (var p in data.Predicted)
        {
            files[p.Key + ".png"] = (p.FilePath, "image/png");
        }

        return files;
    }
}

using System.Globalization;
using System.Text.Json;
using Spatial.Core;
using Spatial.Core.IO;

namespace Spatial.Fitting;

/// <summary>
/// The basis file (<c>basis.json</c>): <c>format_version</c>, <c>season_start</c>, <c>units</c>, <c>mean</c> [365],
/// <c>components</c> [K][365], <c>eigenvalues</c>, <c>variance_fraction</c>, <c>cumulative_fraction</c>,
/// <c>north_error</c>, <c>separable_from_next</c>, <c>labels</c> [K], <c>training</c> (per coefficient: mean, sd,
/// quantiles at equally spaced probabilities), metric rules and <c>provenance</c>. Numbers in shortest round-trip
/// form; NaN written as null. Written atomically; the same basis gives the same bytes.
/// </summary>
public static class BasisFile
{
    /// <summary>Writes <paramref name="basis"/> to <paramref name="path"/> atomically.</summary>
    public static void Write(string path, Basis basis)
    {
        ArgumentNullException.ThrowIfNull(basis);
        AtomicFile.Write(path, stream =>
        {
            using var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
            w.WriteStartObject();
            w.WriteNumber("format_version", basis.FormatVersion);
            w.WriteString("season_start", basis.SeasonStart);
            w.WriteString("units", basis.Units);
            w.WriteString("method", basis.Method);
            w.WriteBoolean("rotated", basis.Rotated);
            w.WriteNumber("training_seasons", basis.TrainingSeasons);
            JsonOut.Number(w, "effective_seasons", basis.EffectiveSeasons);
            JsonOut.Number(w, "total_variance", basis.TotalVariance);
            w.WriteStartObject("metrics");
            JsonOut.Number(w, "threshold_mm", basis.Metrics.ThresholdMm);
            w.WriteNumber("bridge_days", basis.Metrics.BridgeDays);
            w.WriteEndObject();
            JsonOut.Array(w, "mean", basis.Mean);
            w.WriteStartArray("components");
            foreach (var c in basis.Components)
            {
                JsonOut.Array(w, null, c);
            }

            w.WriteEndArray();
            JsonOut.Array(w, "eigenvalues", basis.Eigenvalues);
            JsonOut.Array(w, "variance_fraction", basis.VarianceFraction);
            JsonOut.Array(w, "cumulative_fraction", basis.CumulativeFraction);
            JsonOut.Array(w, "north_error", basis.NorthError);
            w.WriteStartArray("separable_from_next");
            foreach (var s in basis.SeparableFromNext)
            {
                w.WriteBooleanValue(s);
            }

            w.WriteEndArray();
            w.WriteStartArray("labels");
            foreach (var l in basis.Labels)
            {
                w.WriteStringValue(l);
            }

            w.WriteEndArray();
            w.WriteStartArray("training");
            for (var c = 0; c < basis.Training.Length; c++)
            {
                var t = basis.Training[c];
                w.WriteStartObject();
                w.WriteString("coefficient", $"c{(c + 1).ToString(CultureInfo.InvariantCulture)}");
                JsonOut.Number(w, "mean", t.Mean);
                JsonOut.Number(w, "sd", t.Sd);
                JsonOut.Array(w, "quantiles", t.Quantiles);
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteStartObject("provenance");
            foreach (var (key, value) in basis.Provenance.OrderBy(kv => kv.Key, StringComparer.Ordinal))
            {
                w.WriteString(key, value);
            }

            w.WriteEndObject();
            w.WriteEndObject();
            w.Flush();
            stream.WriteByte((byte)'\n');
        });
    }

    /// <summary>Reads a basis file.</summary>
    /// <exception cref="SpatialDataException">The file is missing, not JSON, of another format version, or inconsistent.</exception>
    public static Basis Read(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        if (!File.Exists(path))
        {
            throw new SpatialDataException(path, 0, "basis file not found", "give the basis.json written by 'spatial fit'");
        }

        JsonDocument doc;
        try
        {
            doc = JsonDocument.Parse(File.ReadAllBytes(path));
        }
        catch (JsonException e)
        {
            throw new SpatialDataException(path, (e.LineNumber ?? -1) + 1, $"not valid JSON ({e.Message.Split('.')[0]})", "give the basis.json written by 'spatial fit'");
        }

        using (doc)
        {
            var root = doc.RootElement;
            if (root.ValueKind != JsonValueKind.Object || !root.TryGetProperty("format_version", out var fv) || fv.ValueKind != JsonValueKind.Number)
            {
                throw new SpatialDataException(path, 0, "no format_version: this is not a basis file", "give the basis.json written by 'spatial fit'");
            }

            var version = fv.GetInt32();
            if (version != Basis.CurrentFormatVersion)
            {
                throw new SpatialDataException(path, 0, $"basis format_version {version.ToString(CultureInfo.InvariantCulture)}; this tool reads version {Basis.CurrentFormatVersion.ToString(CultureInfo.InvariantCulture)}", "refit the basis with this version of the tool");
            }

            try
            {
                var mean = Numbers(root.GetProperty("mean"));
                if (mean.Length != SeasonCalendar.DaysPerSeason)
                {
                    throw new SpatialDataException(path, 0, $"mean has {mean.Length} values, expected {SeasonCalendar.DaysPerSeason}", "refit the basis");
                }

                var components = root.GetProperty("components").EnumerateArray().Select(Numbers).ToArray();
                var k = components.Length;
                if (k == 0 || components.Any(c => c.Length != SeasonCalendar.DaysPerSeason))
                {
                    throw new SpatialDataException(path, 0, $"components must be K ≥ 1 arrays of {SeasonCalendar.DaysPerSeason} values", "refit the basis");
                }

                var metrics = root.GetProperty("metrics");
                var training = root.GetProperty("training").EnumerateArray()
                    .Select(t => new TrainingDistribution(Number(t.GetProperty("mean")), Number(t.GetProperty("sd")), Numbers(t.GetProperty("quantiles"))))
                    .ToArray();
                var basis = new Basis(
                    version,
                    root.GetProperty("season_start").GetString() ?? string.Empty,
                    root.GetProperty("units").GetString() ?? string.Empty,
                    mean,
                    components,
                    Numbers(root.GetProperty("eigenvalues")),
                    Numbers(root.GetProperty("variance_fraction")),
                    Numbers(root.GetProperty("cumulative_fraction")),
                    Numbers(root.GetProperty("north_error")),
                    root.GetProperty("separable_from_next").EnumerateArray().Select(e => e.GetBoolean()).ToArray(),
                    root.GetProperty("labels").EnumerateArray().Select(e => e.GetString() ?? string.Empty).ToArray(),
                    Number(root.GetProperty("total_variance")),
                    root.GetProperty("training_seasons").GetInt32(),
                    Number(root.GetProperty("effective_seasons")),
                    root.GetProperty("rotated").GetBoolean(),
                    root.GetProperty("method").GetString() ?? string.Empty,
                    new MetricOptions(Number(metrics.GetProperty("threshold_mm")), metrics.GetProperty("bridge_days").GetInt32()),
                    training,
                    root.GetProperty("provenance").EnumerateObject().ToDictionary(p => p.Name, p => p.Value.GetString() ?? string.Empty, StringComparer.Ordinal));
                if (basis.Eigenvalues.Length != k || basis.Labels.Length != k || basis.Training.Length != k || basis.NorthError.Length != k)
                {
                    throw new SpatialDataException(path, 0, $"eigenvalues, labels, north_error and training must each have {k} entries (one per component)", "refit the basis");
                }

                if (SeasonCalendar.TryParse(basis.SeasonStart) is null || basis.Units != "mm")
                {
                    throw new SpatialDataException(path, 0, $"season_start '{basis.SeasonStart}' or units '{basis.Units}' not understood (expected MM-DD and mm)", "refit the basis");
                }

                return basis;
            }
            catch (Exception e) when (e is KeyNotFoundException or InvalidOperationException or FormatException)
            {
                throw new SpatialDataException(path, 0, $"basis file incomplete or malformed ({e.Message})", "refit the basis with 'spatial fit'");
            }
        }
    }

    private static double Number(JsonElement e) => e.ValueKind == JsonValueKind.Null ? double.NaN : e.GetDouble();

    private static double[] Numbers(JsonElement e) => e.EnumerateArray().Select(Number).ToArray();
}

/// <summary>JSON helpers: NaN and infinities as null.</summary>
internal static class JsonOut
{
    public static void Number(Utf8JsonWriter w, string name, double v)
    {
        if (double.IsFinite(v))
        {
            w.WriteNumber(name, v);
        }
        else
        {
            w.WriteNull(name);
        }
    }

    public static void Value(Utf8JsonWriter w, double v)
    {
        if (double.IsFinite(v))
        {
            w.WriteNumberValue(v);
        }
        else
        {
            w.WriteNullValue();
        }
    }

    public static void Array(Utf8JsonWriter w, string? name, IEnumerable<double> values)
    {
        if (name is null)
        {
            w.WriteStartArray();
        }
        else
        {
            w.WriteStartArray(name);
        }

        foreach (var v in values)
        {
            Value(w, v);
        }

        w.WriteEndArray();
    }
}

using System.Globalization;
using System.Text;
using System.Text.Json;
using Spatial.Core;
using Spatial.Core.IO;
using Spatial.Fitting.Internal;

namespace Spatial.Fitting;

/// <summary>
/// Writes the files of the <c>fit</c> contract into a results folder: <c>basis.json</c>, <c>seasons.csv</c>,
/// <c>stations.csv</c>, <c>interpretation.json</c>; and <c>anomalies.csv</c> for <c>apply</c>. Each file is written
/// atomically, invariant culture, comma separated, "\n" line ends, empty field = unknown, doubles round-trip ("R").
/// </summary>
public static class FitFiles
{
    /// <summary>File written by <see cref="WriteApply"/>: seasons.csv columns plus z_cK and percentile_cK.</summary>
    public const string Anomalies = "anomalies.csv";

    /// <summary>Writes the four fit files into <paramref name="folder"/> (created when needed).</summary>
    public static void Write(string folder, FitResult result)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        ArgumentNullException.ThrowIfNull(result);
        Directory.CreateDirectory(folder);
        BasisFile.Write(Path.Combine(folder, ResultLayout.Basis), result.Basis);
        WriteSeasons(Path.Combine(folder, ResultLayout.Seasons), result.Seasons, null);
        WriteStations(Path.Combine(folder, ResultLayout.Stations), result.Stations, result.Seasons.K);
        WriteInterpretation(Path.Combine(folder, ResultLayout.Interpretation), result);
    }

    /// <summary>Writes <c>anomalies.csv</c> (coefficients, residuals, metrics, z-scores and percentiles) into <paramref name="folder"/>.</summary>
    public static void WriteApply(string folder, ApplyResult result)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        ArgumentNullException.ThrowIfNull(result);
        Directory.CreateDirectory(folder);
        WriteSeasons(Path.Combine(folder, Anomalies), result.Seasons, result);
    }

    private static void WriteSeasons(string path, SeasonScores s, ApplyResult? apply)
    {
        var k = s.K;
        var header = new List<string> { "station", "season", "observed_days" };
        header.AddRange(Enumerable.Range(1, k).Select(c => Inv($"c{c}")));
        header.AddRange(Enumerable.Range(0, k + 1).Select(c => Inv($"residual_{c}")));
        header.AddRange(SeasonMetrics.Names);
        header.Add("below_min_days");
        header.Add("modelled_bare_days");
        if (apply is not null)
        {
            header.AddRange(Enumerable.Range(1, k).Select(c => Inv($"z_c{c}")));
            header.AddRange(Enumerable.Range(1, k).Select(c => Inv($"percentile_c{c}")));
        }

        AtomicFile.Write(path, stream =>
        {
            stream.Write(Encoding.UTF8.GetBytes(string.Join(',', header) + "\n"));
            Utf8Csv.WriteRows(stream, s.Count, (r, line) =>
            {
                var key = s.Keys[r];
                line.Text(key.Station.Value);
                line.Char(',');
                line.Int(key.Season);
                line.Char(',');
                line.Int(key.ObservedDays);
                for (var c = 0; c < k; c++)
                {
                    line.Char(',');
                    line.Number(s.Coefficient(r, c));
                }

                for (var c = 0; c <= k; c++)
                {
                    line.Char(',');
                    line.Number(s.Residual(r, c));
                }

                for (var i = 0; i < SeasonMetrics.Count; i++)
                {
                    line.Char(',');
                    line.Number(s.Metric(r, i));
                }

                line.Char(',');
                line.Ascii(key.BelowMinDays ? "true"u8 : "false"u8);
                line.Char(',');
                line.Int(s.ModelledBareDays(r));
                if (apply is not null)
                {
                    for (var c = 0; c < k; c++)
                    {
                        line.Char(',');
                        line.Number(apply.ZScores[(r * k) + c]);
                    }

                    for (var c = 0; c < k; c++)
                    {
                        line.Char(',');
                        line.Number(apply.Percentiles[(r * k) + c]);
                    }
                }

                line.Char('\n');
            });
        });
    }

    private static void WriteStations(string path, StationSummary[] stations, int k)
    {
        var names = StationSummaries.Names(k);
        var header = new List<string> { "station", "seasons" };
        foreach (var n in names)
        {
            header.AddRange([$"median_{n}", $"iqr_{n}", $"mk_s_{n}", $"mk_z_{n}", $"mk_p_{n}", $"sen_per_decade_{n}"]);
        }

        AtomicFile.Write(path, stream =>
        {
            stream.Write(Encoding.UTF8.GetBytes(string.Join(',', header) + "\n"));
            Utf8Csv.WriteRows(stream, stations.Length, (r, line) =>
            {
                var st = stations[r];
                line.Text(st.Station.Value);
                line.Char(',');
                line.Int(st.Seasons);
                foreach (var q in st.Statistics)
                {
                    line.Char(',');
                    line.Number(q.Median);
                    line.Char(',');
                    line.Number(q.Iqr);
                    line.Char(',');
                    line.Number(q.MkS);
                    line.Char(',');
                    line.Number(q.MkZ);
                    line.Char(',');
                    line.Number(q.MkP);
                    line.Char(',');
                    line.Number(q.SenPerDecade);
                }

                line.Char('\n');
            });
        });
    }

    private static void WriteInterpretation(string path, FitResult result)
    {
        AtomicFile.Write(path, stream =>
        {
            using var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
            var it = result.Interpretation;
            w.WriteStartObject();
            w.WriteString("residual_definition", "residual_k = sqrt(sum over observed days of (x - mean - sum_{i<=k} c_i v_i)^2) / sqrt(sum over observed days of (x - mean)^2); residual_0 = 1");
            w.WriteString("sign_convention", "component 1 positive = more snow than the mean curve; timing positive = earlier season; duration positive = longer season");
            w.WriteStartArray("components");
            for (var c = 0; c < it.Labels.Length; c++)
            {
                var l = it.Labels[c];
                w.WriteStartObject();
                w.WriteNumber("component", l.Component);
                w.WriteString("label", l.Label);
                w.WriteString("label_metric", l.Basis);
                w.WriteString("orientation", l.Orientation);
                JsonOut.Number(w, "eigenvalue", result.Basis.Eigenvalues[c]);
                JsonOut.Number(w, "variance_fraction", result.Basis.VarianceFraction[c]);
                JsonOut.Number(w, "north_error", result.Basis.NorthError[c]);
                w.WriteBoolean("separable_from_next", result.Basis.SeparableFromNext[c]);
                w.WriteStartObject("correlations");
                foreach (var name in SeasonMetrics.Names)
                {
                    JsonOut.Number(w, name, l.Correlations[name]);
                }

                w.WriteEndObject();
                w.WriteStartObject("partial_correlations");
                foreach (var name in SeasonMetrics.Names)
                {
                    JsonOut.Number(w, name, l.PartialCorrelations.TryGetValue(name, out var p) ? p : double.NaN);
                }

                w.WriteEndObject();
                w.WriteStartArray("aspects");
                foreach (var a in l.Aspects)
                {
                    w.WriteStringValue(a);
                }

                w.WriteEndArray();
                w.WriteStartObject("scores");
                foreach (var (name, value) in l.Scores)
                {
                    JsonOut.Number(w, name, value);
                }

                w.WriteEndObject();
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteStartArray("selections");
            foreach (var s in it.Selections)
            {
                w.WriteStartObject();
                w.WriteNumber("component", s.Component);
                JsonOut.Number(w, "residual_below", s.ResidualBelow);
                w.WriteNumber("admitted", s.Admitted);
                Seasons(w, "highest", s.Highest);
                Seasons(w, "lowest", s.Lowest);
                w.WriteEndObject();
            }

            w.WriteEndArray();
            Seasons(w, "best_described", it.BestDescribed);
            Seasons(w, "worst_described", it.WorstDescribed);
            w.WriteStartObject("refinement");
            w.WriteBoolean("used", result.Refinement.Length > 0);
            w.WriteBoolean("converged", result.Converged);
            w.WriteStartArray("iterations");
            foreach (var step in result.Refinement)
            {
                w.WriteStartObject();
                w.WriteNumber("iteration", step.Iteration);
                JsonOut.Number(w, "rms_change_mm", step.RmsChangeMm);
                JsonOut.Number(w, "relative_change", step.RelativeChange);
                JsonOut.Number(w, "leading_variance_fraction", step.LeadingVarianceFraction);
                w.WriteEndObject();
            }

            w.WriteEndArray();
            w.WriteEndObject();
            JsonOut.Array(w, "all_eigenvalues", result.AllEigenvalues);
            w.WriteEndObject();
            w.Flush();
            stream.WriteByte((byte)'\n');
        });
    }

    private static void Seasons(Utf8JsonWriter w, string name, SelectedSeason[] seasons)
    {
        w.WriteStartArray(name);
        foreach (var s in seasons)
        {
            w.WriteStartObject();
            w.WriteString("station", s.Station.Value);
            w.WriteNumber("season", s.Season);
            JsonOut.Number(w, "value", s.Value);
            JsonOut.Number(w, "residual", s.Residual);
            if (s.Cause.Length > 0)
            {
                w.WriteString("cause", s.Cause);
            }

            if (s.Detail.Length > 0)
            {
                w.WriteString("detail", s.Detail);
            }

            w.WriteEndObject();
        }

        w.WriteEndArray();
    }

    private static string Inv(FormattableString s) => FormattableString.Invariant(s);
}

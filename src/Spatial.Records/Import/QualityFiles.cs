using System.Globalization;
using System.Text;
using System.Text.Json;
using Spatial.Core;
using Spatial.Core.IO;

namespace Spatial.Records.Import;

/// <summary>Writes the quality report as <c>quality.json</c> (for programs) and <c>quality.txt</c> (for people).</summary>
internal static class QualityFiles
{
    public const int FormatVersion = 1;

    // Station ids and names are written as they are (not \u-escaped); the files are UTF-8 and never embedded in HTML.
    private static readonly JsonWriterOptions WriterOptions = new() { Indented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    public static void WriteJson(string path, QualityReport q) =>
        AtomicFile.Write(path, stream =>
        {
            using var w = new Utf8JsonWriter(stream, WriterOptions);
            Write(w, q);
            w.Flush();
            stream.WriteByte((byte)'\n');
        });

    public static string Json(QualityReport q)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, WriterOptions))
        {
            Write(w, q);
        }

        return Encoding.UTF8.GetString(ms.ToArray());
    }

    private static void Write(Utf8JsonWriter w, QualityReport q)
    {
        var o = q.Options;
        w.WriteStartObject();
        w.WriteNumber("format_version", FormatVersion);
        w.WriteString("records", q.RecordsFile);
        w.WriteString("stations_file", q.StationsFile);
        w.WriteStartObject("options");
        w.WriteString("season_start", o.Calendar.StartText);
        w.WriteNumber("min_days", o.MinDays);
        w.WriteString("unit", DepthUnits.Symbol(o.Unit));
        w.WriteString("element", o.Element ?? string.Join("|", ImportOptions.DefaultElementNames));
        w.WriteStartArray("bad_flags");
        foreach (var f in o.BadFlags)
        {
            w.WriteStringValue(f);
        }

        w.WriteEndArray();
        w.WriteNumber("max_depth_mm", o.MaxDepthMm);
        w.WriteNumber("spike_jump_mm", o.SpikeJumpMm);
        w.WriteNumber("flatline_days", o.FlatlineDays);
        w.WriteNumber("max_unparseable_percent", o.MaxUnparseablePercent);
        w.WriteEndObject();

        WriteCounts(w, q);

        w.WriteStartArray("unknown_stations");
        foreach (var (id, n) in q.UnknownStations)
        {
            w.WriteStartObject();
            w.WriteString("station", id);
            w.WriteNumber("rows", n);
            w.WriteEndObject();
        }

        w.WriteEndArray();

        w.WriteStartArray("per_station");
        foreach (var s in q.PerStation)
        {
            w.WriteStartObject();
            w.WriteString("station", s.Station.Value);
            w.WriteNumber("seasons", s.Seasons);
            w.WriteNumber("seasons_below_min_days", s.SeasonsBelowMinDays);
            w.WriteNumber("rows_kept", s.RowsKept);
            w.WriteStartObject("removed");
            foreach (var rule in Enum.GetValues<QualityRule>())
            {
                if (rule != QualityRule.UnknownStation)
                {
                    w.WriteNumber(QualityReport.RuleName(rule), s.Removed[(int)rule]);
                }
            }

            w.WriteEndObject();
            w.WriteEndObject();
        }

        w.WriteEndArray();

        w.WriteStartArray("events");
        foreach (var e in q.Events)
        {
            w.WriteStartObject();
            w.WriteString("rule", QualityReport.RuleName(e.Rule));
            w.WriteString("station", e.Station.Value);
            w.WriteString("date", e.Date.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture));
            w.WriteNumber("days", e.Days);
            w.WriteString("detail", e.Detail);
            w.WriteEndObject();
        }

        w.WriteEndArray();

        w.WriteStartArray("warnings");
        foreach (var d in q.Warnings)
        {
            w.WriteStringValue(d.ToString());
        }

        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary>The counts object (also the core of the <c>--json</c> summary).</summary>
    public static void WriteCounts(Utf8JsonWriter w, QualityReport q)
    {
        w.WriteStartObject("counts");
        w.WriteNumber("stations_listed", q.StationsListed);
        w.WriteNumber("stations", q.Stations);
        w.WriteNumber("seasons", q.Seasons);
        w.WriteNumber("seasons_below_min_days", q.SeasonsBelowMinDays);
        w.WriteNumber("rows_read", q.RowsRead);
        w.WriteNumber("rows_kept", q.RowsKept);
        w.WriteNumber("rows_removed", q.RemovedTotal);
        w.WriteNumber("duplicates_merged", q.DuplicatesMerged);
        w.WriteNumber("empty_depth", q.EmptyDepth);
        w.WriteNumber("other_element", q.OtherElement);
        w.WriteNumber("conflicting_days", q.ConflictingDays);
        w.WriteStartObject("removed");
        foreach (var rule in Enum.GetValues<QualityRule>())
        {
            w.WriteNumber(QualityReport.RuleName(rule), q.RemovedBy(rule));
        }

        w.WriteEndObject();
        w.WriteEndObject();
    }

    public static string Text(QualityReport q)
    {
        var o = q.Options;
        var sb = new StringBuilder();
        void Line(string label, long value, string note = "") =>
            sb.Append(CultureInfo.InvariantCulture, $"  {label,-44} {value,12}{(note.Length > 0 ? "   " + note : string.Empty)}\n");

        sb.Append(CultureInfo.InvariantCulture, $"Import quality\n  records:  {q.RecordsFile}\n  stations: {q.StationsFile}\n");
        sb.Append(CultureInfo.InvariantCulture, $"  seasons start {o.Calendar.StartText}; 29 February dropped; depths in mm (file unit {DepthUnits.Symbol(o.Unit)})\n\n");
        Line("rows read", q.RowsRead);
        Line("rows kept (days with a depth)", q.RowsKept);
        Line("duplicate rows merged (same depth)", q.DuplicatesMerged);
        Line("empty depth (missing day)", q.EmptyDepth);
        Line("rows of another element (skipped)", q.OtherElement);
        Line("rows removed, all rules", q.RemovedTotal);
        var notes = new Dictionary<QualityRule, string>
        {
            [QualityRule.UnparseableDepth] = string.Create(CultureInfo.InvariantCulture, $"dropped while at most {o.MaxUnparseablePercent} % of rows"),
            [QualityRule.NegativeDepth] = "below 0",
            [QualityRule.ImplausibleDepth] = string.Create(CultureInfo.InvariantCulture, $"above {o.MaxDepthMm} mm"),
            [QualityRule.Flagged] = o.BadFlags.Count > 0 ? "flags " + string.Join(",", o.BadFlags) : "no bad flags given",
            [QualityRule.LeapDay] = "29 February",
            [QualityRule.UnknownStation] = $"{q.UnknownStations.Count} ids not in the list",
            [QualityRule.DuplicateConflict] = $"{q.ConflictingDays} station-days with differing depths",
            [QualityRule.Spike] = string.Create(CultureInfo.InvariantCulture, $"one day over {o.SpikeJumpMm} mm above both neighbours"),
            [QualityRule.Flatline] = $"same non-zero depth for {o.FlatlineDays}+ days",
        };
        foreach (var rule in Enum.GetValues<QualityRule>())
        {
            Line("  removed: " + QualityReport.RuleName(rule).Replace('_', ' '), q.RemovedBy(rule), notes[rule]);
        }

        sb.Append('\n');
        Line("stations listed", q.StationsListed);
        Line("stations with data", q.Stations);
        Line("station-seasons", q.Seasons);
        Line($"  below {o.MinDays} observed days (marked)", q.SeasonsBelowMinDays);

        if (q.PerStation.Count > 0)
        {
            sb.Append("\n  station                          seasons  below_min   rows_kept    removed\n");
            foreach (var s in q.PerStation)
            {
                sb.Append(CultureInfo.InvariantCulture, $"  {s.Station.Value,-32} {s.Seasons,7} {s.SeasonsBelowMinDays,10} {s.RowsKept,11} {s.Removed.Sum(),10}\n");
            }
        }

        if (q.Events.Count > 0)
        {
            sb.Append("\n  first events per rule\n");
            foreach (var e in q.Events)
            {
                sb.Append(CultureInfo.InvariantCulture, $"  {QualityReport.RuleName(e.Rule),-18} {e.Station.Value,-20} {e.Date:yyyy-MM-dd} {e.Detail}\n");
            }
        }

        if (q.Warnings.Count > 0)
        {
            sb.Append("\n  warnings\n");
            foreach (var d in q.Warnings)
            {
                sb.Append("  ").Append(d.ToString()).Append('\n');
            }
        }

        return sb.ToString();
    }
}

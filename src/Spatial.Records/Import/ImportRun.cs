using System.Globalization;
using System.Text;
using Spatial.Core;
using Spatial.Records.Csv;

namespace Spatial.Records.Import;

/// <summary>
/// One streaming pass over a daily-records file: each row is checked (structure first, then the quality rules
/// in the order of <see cref="QualityRule"/> as listed in <see cref="Run"/>) and placed into its station-season
/// row; memory holds only the season rows, never the text.
/// </summary>
internal sealed class ImportRun
{
    private const int EventsPerRule = 20;
    private const int RuleCount = 9;

    private readonly ImportOptions options;
    private readonly StationList stations;
    private readonly CsvRecordReader csv;
    private readonly Dictionary<string, int> stationIndex = new(StringComparer.Ordinal);
    private readonly SeasonAssembler assembler;
    private readonly long[] removed = new long[RuleCount];
    private readonly long[] removedPerStation;
    private readonly Dictionary<string, long> unknownRows = new(StringComparer.Ordinal);
    private readonly Dictionary<string, long> unknownFirstLine = new(StringComparer.Ordinal);
    private readonly List<QualityEvent> events = [];
    private readonly int[] eventCounts = new int[RuleCount];
    private readonly HashSet<string> elementsSeen = new(StringComparer.Ordinal);
    private readonly byte[][] badFlags;
    private readonly byte[][] elementNames;

    private byte[] lastStation = new byte[StationId.MaxLength * 4];
    private int lastStationLength = -1;
    private int lastStationIndex = -1;
    private byte[] lastUnit = new byte[16];
    private int lastUnitLength = -1;
    private double lastUnitFactor = 1;

    private long rowsRead;
    private long emptyDepth;
    private long otherElement;
    private long firstUnparseableLine;
    private long firstOtherElementLine;
    private string firstUnparseableText = string.Empty;

    public ImportRun(ImportOptions options, StationList stations, CsvRecordReader csv)
    {
        this.options = options;
        this.stations = stations;
        this.csv = csv;
        for (var i = 0; i < stations.Stations.Count; i++)
        {
            stationIndex[stations.Stations[i].Id.Value] = i;
        }

        assembler = new SeasonAssembler(stations.Stations.Count);
        removedPerStation = new long[stations.Stations.Count * RuleCount];
        badFlags = [.. options.BadFlags.Where(f => f.Trim().Length > 0).Select(f => Encoding.UTF8.GetBytes(f.Trim()))];
        elementNames = options.Element is { } e
            ? [Encoding.UTF8.GetBytes(e.Trim())]
            : [.. ImportOptions.DefaultElementNames.Select(Encoding.UTF8.GetBytes)];
    }

    /// <summary>
    /// Reads every row. Per row, in this order: field count, station id, date, unit (each an error when bad);
    /// then other element (skipped), unknown station, 29 February, bad flag, empty depth (a missing day),
    /// unparseable depth, negative depth, implausible depth; then placed, merging equal duplicates and dropping
    /// conflicting ones. After the pass, per station: isolated spikes and flat lines.
    /// </summary>
    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveOptimization)]
    public ImportResult Run(IProgress<double>? progress, CancellationToken cancel)
    {
        var columns = ReadHeader();
        var (stationCol, dateCol, depthCol, unitCol, flagCol, elementCol, fieldCount) = columns;
        var decimalComma = csv.Delimiter != (byte)',';
        var calendar = options.Calendar;
        var fileFactor = DepthUnits.MillimetresPer(options.Unit);
        var maxDepth = options.MaxDepthMm;
        var checkFlags = flagCol >= 0 && badFlags.Length > 0;
        var headerLine = csv.Line;

        while (csv.Read())
        {
            rowsRead++;
            if ((rowsRead & 0xFFFF) == 0)
            {
                cancel.ThrowIfCancellationRequested();
                progress?.Report(csv.Fraction);
            }

            if (csv.FieldCount != fieldCount)
            {
                throw csv.Error(
                    $"the row has {csv.FieldCount} fields; the header (line {headerLine}) has {fieldCount}",
                    csv.FieldCount < fieldCount ? "complete the row, or remove it" : "quote a field that holds the delimiter, or remove the extra fields");
            }

            var si = Station(csv.Field(stationCol), stationCol);
            var date = ParseDate(csv.Field(dateCol), dateCol);
            var factor = unitCol >= 0 ? Unit(csv.Field(unitCol), unitCol, fileFactor) : fileFactor;

            if (elementCol >= 0 && !IsElement(csv.Field(elementCol)))
            {
                firstOtherElementLine = firstOtherElementLine == 0 ? csv.Line : firstOtherElementLine;
                otherElement++;
                continue;
            }

            if (si < 0)
            {
                var id = Encoding.UTF8.GetString(CsvText.Trim(csv.Field(stationCol)));
                if (unknownRows.TryGetValue(id, out var n))
                {
                    unknownRows[id] = n + 1;
                }
                else
                {
                    unknownRows[id] = 1;
                    unknownFirstLine[id] = csv.Line;
                }

                removed[(int)QualityRule.UnknownStation]++;
                continue;
            }

            if (!calendar.TryLocate(date, out var season, out var day))
            {
                Remove(QualityRule.LeapDay, si);
                continue;
            }

            if (checkFlags && IsBadFlag(csv.Field(flagCol)))
            {
                Remove(QualityRule.Flagged, si);
                continue;
            }

            var depthField = CsvText.Trim(csv.Field(depthCol));
            if (depthField.IsEmpty || IsMissingMarker(depthField))
            {
                emptyDepth++;
                continue;
            }

            if (!CsvText.TryParseDouble(depthField, decimalComma, out var value))
            {
                if (firstUnparseableLine == 0)
                {
                    firstUnparseableLine = csv.Line;
                    firstUnparseableText = CsvText.Show(depthField);
                }

                Remove(QualityRule.UnparseableDepth, si);
                continue;
            }

            var mm = value * factor;
            if (mm < 0)
            {
                Remove(QualityRule.NegativeDepth, si);
                continue;
            }

            if (mm > maxDepth)
            {
                Remove(QualityRule.ImplausibleDepth, si);
                continue;
            }

            var outcome = assembler.Place(si, season, day, (float)mm, out var previous);
            if (outcome == PlaceOutcome.NewConflict)
            {
                // Both the row that was placed and this one go.
                removed[(int)QualityRule.DuplicateConflict] += 2;
                removedPerStation[(si * RuleCount) + (int)QualityRule.DuplicateConflict] += 2;
                AddEvent(QualityRule.DuplicateConflict, si, date, 1, FormattableString.Invariant($"depths {previous} mm and {(float)mm} mm on line {csv.Line}"));
            }
            else if (outcome == PlaceOutcome.Conflict)
            {
                Remove(QualityRule.DuplicateConflict, si);
            }
        }

        progress?.Report(1.0);
        CheckUnparseable();
        if (rowsRead == 0)
        {
            throw new SpatialDataException(csv.FileName, headerLine + 1, "the file has a header but no data rows", "add one row per station and day below the header");
        }

        ApplySeriesRules();
        return Finish();
    }

    private (int Station, int Date, int Depth, int Unit, int Flag, int Element, int Count) ReadHeader()
    {
        var c = options.Columns;
        var expected = $"{c.Station},{c.Date},{c.Depth}[,{c.Unit}][,{c.Flag}][,{c.Element}]";
        if (!csv.Read())
        {
            throw new SpatialDataException(csv.FileName, 1, "the records file is empty", $"expected a header row {expected} and one row per station and day");
        }

        var header = new string[csv.FieldCount];
        for (var i = 0; i < header.Length; i++)
        {
            header[i] = csv.FieldString(i);
        }

        int Find(string name, bool required, string option)
        {
            var found = -1;
            for (var i = 0; i < header.Length; i++)
            {
                if (string.Equals(header[i], name.Trim(), StringComparison.OrdinalIgnoreCase))
                {
                    if (found >= 0)
                    {
                        throw csv.Error($"columns {found + 1} and {i + 1} are both named '{name}'", "keep one of them");
                    }

                    found = i;
                }
            }

            if (found < 0 && required)
            {
                var sep = csv.Delimiter == (byte)'\t' ? "tab" : $"'{(char)csv.Delimiter}'";
                throw csv.Error(
                    $"the header has no '{name}' column (found: {string.Join(", ", header.Select(h => $"'{h}'"))}; delimiter {sep})",
                    $"name the columns {expected}, or say which column to use with {option}");
            }

            return found;
        }

        var station = Find(c.Station, true, "--station-column");
        var date = Find(c.Date, true, "--date-column");
        var depth = Find(c.Depth, true, "--depth-column");
        var unit = Find(c.Unit, false, "--unit-column");
        var flag = Find(c.Flag, false, "--flag-column");
        var element = Find(c.Element, false, "--element-column");
        if (badFlags.Length > 0 && flag < 0)
        {
            throw csv.Error($"bad flags were given but the header has no '{c.Flag}' column", "name the flag column with --flag-column, or leave out --bad-flags");
        }

        if (options.Element is not null && element < 0)
        {
            throw csv.Error($"an element was given but the header has no '{c.Element}' column", "name the element column with --element-column, or leave out --element");
        }

        return (station, date, depth, unit, flag, element, header.Length);
    }

    private int Station(ReadOnlySpan<byte> field, int col)
    {
        var id = CsvText.Trim(field);
        if (id.Length == lastStationLength && id.SequenceEqual(lastStation.AsSpan(0, lastStationLength)))
        {
            return lastStationIndex;
        }

        if (id.IsEmpty)
        {
            throw csv.Error("the station id is empty", "give the station id on every row", col);
        }

        var text = csv.FieldString(col);
        if (!StationId.IsValid(text, out var why))
        {
            throw csv.Error($"station id '{CsvText.Show(id)}' is not valid: {why}", "give station ids of 1-64 printable characters, as in the station list", col);
        }

        var index = stationIndex.TryGetValue(text, out var i) ? i : -1;
        if (id.Length <= lastStation.Length)
        {
            id.CopyTo(lastStation);
            lastStationLength = id.Length;
            lastStationIndex = index;
        }

        return index;
    }

    private DateOnly ParseDate(ReadOnlySpan<byte> field, int col)
    {
        var f = CsvText.Trim(field);
        int y, m, d;
        if (f.Length >= 10 && f[4] == (byte)'-' && f[7] == (byte)'-' && (f.Length == 10 || f[10] is (byte)'T' or (byte)' ')
            && Digits(f[..4], out y) && Digits(f.Slice(5, 2), out m) && Digits(f.Slice(8, 2), out d))
        {
            // YYYY-MM-DD, optionally followed by a time of day (ignored).
        }
        else if (f.Length == 8 && Digits(f[..4], out y) && Digits(f.Slice(4, 2), out m) && Digits(f.Slice(6, 2), out d))
        {
            // YYYYMMDD (ISO 8601 basic format).
        }
        else
        {
            throw csv.Error($"date '{CsvText.Show(f)}' is not an ISO 8601 date", "write dates as YYYY-MM-DD", col);
        }

        if (m is < 1 or > 12)
        {
            throw csv.Error($"date '{CsvText.Show(f)}' has month {m}; months are 01-12", "write dates as YYYY-MM-DD", col);
        }

        if (d < 1 || d > DateTime.DaysInMonth(Math.Max(y, 1), m))
        {
            throw csv.Error($"date '{CsvText.Show(f)}' does not exist (month {m} has {DateTime.DaysInMonth(Math.Max(y, 1), m)} days in {y})", "check the date", col);
        }

        if (y < 1800)
        {
            throw csv.Error($"date '{CsvText.Show(f)}' is before 1800", "check the date column (instrumental snow-depth records start in the 19th century)", col);
        }

        if (y > 2200)
        {
            throw csv.Error($"date '{CsvText.Show(f)}' is after 2200", "check the date column", col);
        }

        return new DateOnly(y, m, d);
    }

    private static bool Digits(ReadOnlySpan<byte> s, out int value)
    {
        value = 0;
        foreach (var c in s)
        {
            var d = c - (byte)'0';
            if ((uint)d > 9)
            {
                return false;
            }

            value = (value * 10) + d;
        }

        return true;
    }

    private double Unit(ReadOnlySpan<byte> field, int col, double fileFactor)
    {
        var u = CsvText.Trim(field);
        if (u.IsEmpty)
        {
            return fileFactor;
        }

        if (u.Length == lastUnitLength && u.SequenceEqual(lastUnit.AsSpan(0, lastUnitLength)))
        {
            return lastUnitFactor;
        }

        Span<char> chars = stackalloc char[32];
        if (u.Length > chars.Length)
        {
            throw csv.Error($"unit '{CsvText.Show(u)}' is not one of mm, cm, m, in", "give the unit as mm, cm, m or in", col);
        }

        for (var i = 0; i < u.Length; i++)
        {
            chars[i] = (char)u[i];
        }

        if (!DepthUnits.TryParse(chars[..u.Length], out var unit) || !System.Text.Unicode.Utf8.IsValid(u) || u.ContainsAnyExceptInRange((byte)0x20, (byte)0x7E))
        {
            throw csv.Error($"unit '{CsvText.Show(u)}' is not one of mm, cm, m, in", "give the unit as mm, cm, m or in (inches are 25.4 mm exactly)", col);
        }

        var factor = DepthUnits.MillimetresPer(unit);
        if (u.Length <= lastUnit.Length)
        {
            u.CopyTo(lastUnit);
            lastUnitLength = u.Length;
            lastUnitFactor = factor;
        }

        return factor;
    }

    private bool IsElement(ReadOnlySpan<byte> field)
    {
        var e = CsvText.Trim(field);
        foreach (var name in elementNames)
        {
            if (EqualsIgnoreAsciiCase(e, name))
            {
                return true;
            }
        }

        if (elementsSeen.Count < 20)
        {
            elementsSeen.Add(CsvText.Show(e));
        }

        return false;
    }

    private bool IsBadFlag(ReadOnlySpan<byte> field)
    {
        var f = CsvText.Trim(field);
        if (f.IsEmpty)
        {
            return false;
        }

        foreach (var flag in badFlags)
        {
            if (EqualsIgnoreAsciiCase(f, flag))
            {
                return true;
            }
        }

        return false;
    }

    private static bool IsMissingMarker(ReadOnlySpan<byte> f) =>
        EqualsIgnoreAsciiCase(f, "NA"u8) || EqualsIgnoreAsciiCase(f, "NaN"u8) || EqualsIgnoreAsciiCase(f, "null"u8);

    private static bool EqualsIgnoreAsciiCase(ReadOnlySpan<byte> a, ReadOnlySpan<byte> b) => System.Text.Ascii.EqualsIgnoreCase(a, b);

    private void Remove(QualityRule rule, int si)
    {
        removed[(int)rule]++;
        removedPerStation[(si * RuleCount) + (int)rule]++;
    }

    private void AddEvent(QualityRule rule, int si, DateOnly date, int days, string detail)
    {
        if (eventCounts[(int)rule]++ < EventsPerRule)
        {
            events.Add(new QualityEvent(rule, stations.Stations[si].Id, date, days, detail));
        }
    }

    private void CheckUnparseable()
    {
        var bad = removed[(int)QualityRule.UnparseableDepth];
        if (bad == 0)
        {
            return;
        }

        var percent = 100.0 * bad / rowsRead;
        if (percent > options.MaxUnparseablePercent)
        {
            throw new SpatialDataException(
                csv.FileName,
                firstUnparseableLine,
                string.Create(CultureInfo.InvariantCulture, $"depth '{firstUnparseableText}' is not a number ({bad} of {rowsRead} rows, {percent:0.##} %, have a depth that is not a number; at most {options.MaxUnparseablePercent} % are dropped)"),
                "check the depth column (numbers with '.' as decimal mark, or ',' in a semicolon file); leave a missing day empty; or raise --max-unparseable-percent");
        }
    }

    private void ApplySeriesRules()
    {
        var flat = options.FlatlineDays;
        var jump = (float)options.SpikeJumpMm;
        foreach (var (si, blocks) in assembler.StationBlocks())
        {
            foreach (var block in blocks)
            {
                var series = assembler.Concatenate(block);
                var remove = new bool[series.Length];
                // Flat lines: runs of equal non-zero observed values, broken by a missing day or a change.
                var runStart = 0;
                for (var i = 1; i <= series.Length; i++)
                {
                    var continues = i < series.Length && !float.IsNaN(series[i]) && series[i] == series[i - 1];
                    if (continues)
                    {
                        continue;
                    }

                    var length = i - runStart;
                    if (length >= flat && !float.IsNaN(series[runStart]) && series[runStart] != 0)
                    {
                        for (var k = runStart; k < i; k++)
                        {
                            remove[k] = true;
                        }

                        removed[(int)QualityRule.Flatline] += length;
                        removedPerStation[(si * RuleCount) + (int)QualityRule.Flatline] += length;
                        AddEvent(QualityRule.Flatline, si, assembler.DateOf(block, runStart, options.Calendar), length, FormattableString.Invariant($"{series[runStart]} mm for {length} days"));
                    }

                    runStart = i;
                }

                // Isolated one-day spikes up and back, judged on the same values.
                for (var i = 1; i < series.Length - 1; i++)
                {
                    var (a, b, c) = (series[i - 1], series[i], series[i + 1]);
                    if (b - a > jump && b - c > jump)
                    {
                        // NaN neighbours make both comparisons false.
                        remove[i] = true;
                        Remove(QualityRule.Spike, si);
                        AddEvent(QualityRule.Spike, si, assembler.DateOf(block, i, options.Calendar), 1, FormattableString.Invariant($"{b} mm between {a} mm and {c} mm"));
                    }
                }

                assembler.RemoveDays(block, remove);
            }
        }
    }

    private ImportResult Finish()
    {
        var list = stations.Stations;
        var matrix = assembler.Build(options.Calendar, list, options.MinDays, out var perStationSeasons, out var perStationBelow, out var perStationKept);
        var rowsKept = perStationKept.Sum();
        var below = perStationBelow.Sum();
        var placedAny = rowsKept > 0 || assembler.Placed > 0;

        if (!placedAny && unknownRows.Count > 0 && removed.Sum() == removed[(int)QualityRule.UnknownStation])
        {
            var sample = unknownRows.Keys.Order(StringComparer.Ordinal).First();
            throw new SpatialDataException(
                csv.FileName,
                unknownFirstLine[sample],
                $"none of the {unknownRows.Count} station ids in the records (e.g. '{sample}') is in the station list {options.StationsPath}",
                "check that the station list belongs to these records (ids are compared exactly, case included)");
        }

        if (otherElement == rowsRead)
        {
            throw new SpatialDataException(
                csv.FileName,
                firstOtherElementLine,
                $"no row has the snow-depth element '{options.Element ?? string.Join("' or '", ImportOptions.DefaultElementNames)}' (found: {string.Join(", ", elementsSeen.Order(StringComparer.Ordinal))})",
                "say which element value means snow depth with --element");
        }

        var warnings = new List<Diagnostic>(stations.Warnings);
        foreach (var (id, n) in unknownRows.OrderBy(kv => kv.Key, StringComparer.Ordinal).Take(20))
        {
            warnings.Add(Diagnostic.Warning(csv.FileName, unknownFirstLine[id], $"station '{id}' is not in the station list: its {n} rows were skipped", "add it to the station list, or remove its rows"));
        }

        if (unknownRows.Count > 20)
        {
            warnings.Add(Diagnostic.Warning(csv.FileName, 0, $"{unknownRows.Count - 20} more station ids are not in the station list (see quality.json)"));
        }

        var perStation = new List<StationQuality>();
        var order = Enumerable.Range(0, list.Count).OrderBy(i => list[i].Id).ToArray();
        foreach (var si in order)
        {
            var r = new long[RuleCount];
            Array.Copy(removedPerStation, si * RuleCount, r, 0, RuleCount);
            if (perStationSeasons[si] > 0 || r.Sum() > 0)
            {
                perStation.Add(new StationQuality(list[si].Id, perStationSeasons[si], perStationBelow[si], perStationKept[si], r));
            }
        }

        var quality = new QualityReport(
            options.RecordsPath,
            options.StationsPath,
            options,
            list.Count,
            perStationSeasons.Count(n => n > 0),
            matrix.Rows,
            below,
            rowsRead,
            rowsKept,
            assembler.Merged,
            emptyDepth,
            otherElement,
            removed.ToArray(),
            assembler.ConflictingDays,
            [.. unknownRows.OrderBy(kv => kv.Key, StringComparer.Ordinal)],
            perStation,
            [.. events.OrderBy(e => e.Rule).ThenBy(e => e.Station).ThenBy(e => e.Date)],
            warnings);
        return new ImportResult(matrix, stations, quality);
    }
}

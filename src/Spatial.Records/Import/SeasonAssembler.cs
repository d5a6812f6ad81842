using Spatial.Core;

namespace Spatial.Records.Import;

/// <summary>What happened to a depth placed into its station-day.</summary>
internal enum PlaceOutcome
{
    /// <summary>The day was empty and now holds the depth.</summary>
    Placed,

    /// <summary>The day already held the same depth: merged.</summary>
    Merged,

    /// <summary>The day held a different depth: the day is dropped (both rows removed).</summary>
    NewConflict,

    /// <summary>The day was already dropped for a conflict: this row is removed too.</summary>
    Conflict,
}

/// <summary>
/// Station-season rows of 365 float32 depths (millimetres) built up from rows in any order. Memory is one row per
/// station-season seen. A day dropped for conflicting duplicates holds a NaN with a private payload, so that later
/// rows of that day are recognised, and becomes a plain NaN when the matrix is built.
/// </summary>
internal sealed class SeasonAssembler(int stationCount)
{
    private const int Days = SeasonCalendar.DaysPerSeason;
    private static readonly float ConflictMark = BitConverter.Int32BitsToSingle(0x7FC0_C0DE);

    private readonly List<float[]> rows = [];
    private readonly List<int> rowStation = [];
    private readonly List<int> rowSeason = [];
    private readonly Dictionary<long, int> rowOf = [];
    private long lastKey = long.MinValue;
    private float[]? lastRow;

    /// <summary>Days filled (net of conflicts).</summary>
    public long Placed { get; private set; }

    /// <summary>Rows merged into an equal depth already there.</summary>
    public long Merged { get; private set; }

    /// <summary>Days dropped for conflicting depths.</summary>
    public long ConflictingDays { get; private set; }

    public PlaceOutcome Place(int station, int season, int day, float mm, out float previous)
    {
        var key = ((long)station << 32) | (uint)season;
        float[] row;
        if (key == lastKey)
        {
            row = lastRow!;
        }
        else
        {
            if (!rowOf.TryGetValue(key, out var index))
            {
                index = rows.Count;
                var fresh = new float[Days];
                fresh.AsSpan().Fill(float.NaN);
                rows.Add(fresh);
                rowStation.Add(station);
                rowSeason.Add(season);
                rowOf[key] = index;
            }

            row = rows[index];
            lastKey = key;
            lastRow = row;
        }

        previous = row[day];
        if (float.IsNaN(previous))
        {
            if (BitConverter.SingleToInt32Bits(previous) == BitConverter.SingleToInt32Bits(ConflictMark))
            {
                return PlaceOutcome.Conflict;
            }

            row[day] = mm;
            Placed++;
            return PlaceOutcome.Placed;
        }

        if (previous == mm)
        {
            Merged++;
            return PlaceOutcome.Merged;
        }

        row[day] = ConflictMark;
        Placed--;
        ConflictingDays++;
        return PlaceOutcome.NewConflict;
    }

    /// <summary>Per station with rows: its rows grouped into blocks of consecutive seasons (season order).</summary>
    public IEnumerable<(int Station, List<int[]> Blocks)> StationBlocks()
    {
        var byStation = new List<int>[stationCount];
        for (var i = 0; i < rows.Count; i++)
        {
            (byStation[rowStation[i]] ??= []).Add(i);
        }

        for (var s = 0; s < stationCount; s++)
        {
            if (byStation[s] is not { } list)
            {
                continue;
            }

            list.Sort((a, b) => rowSeason[a].CompareTo(rowSeason[b]));
            var blocks = new List<int[]>();
            var begin = 0;
            for (var i = 1; i <= list.Count; i++)
            {
                if (i == list.Count || rowSeason[list[i]] != rowSeason[list[i - 1]] + 1)
                {
                    blocks.Add([.. list.GetRange(begin, i - begin)]);
                    begin = i;
                }
            }

            yield return (s, blocks);
        }
    }

    /// <summary>The block's days end to end (a conflict-dropped day as NaN).</summary>
    public float[] Concatenate(int[] block)
    {
        var series = new float[block.Length * Days];
        for (var b = 0; b < block.Length; b++)
        {
            rows[block[b]].CopyTo(series, b * Days);
        }

        return series;
    }

    /// <summary>Calendar date of position <paramref name="index"/> of the block's series.</summary>
    public DateOnly DateOf(int[] block, int index, SeasonCalendar calendar) =>
        calendar.DateOf(rowSeason[block[index / Days]], index % Days);

    /// <summary>Sets the days marked in <paramref name="remove"/> to NaN.</summary>
    public void RemoveDays(int[] block, bool[] remove)
    {
        for (var i = 0; i < remove.Length; i++)
        {
            if (remove[i])
            {
                rows[block[i / Days]][i % Days] = float.NaN;
                Placed--;
            }
        }
    }

    /// <summary>
    /// Builds the matrix ordered by station id (ordinal) then season, leaving out station-seasons with no observed
    /// day; conflict marks become NaN. Per station index: seasons, seasons below <paramref name="minDays"/>, days kept.
    /// </summary>
    public SeasonMatrix Build(SeasonCalendar calendar, IReadOnlyList<Station> stations, int minDays, out int[] seasons, out int[] below, out long[] kept)
    {
        seasons = new int[stationCount];
        below = new int[stationCount];
        kept = new long[stationCount];
        var observed = new int[rows.Count];
        var order = new List<int>();
        for (var i = 0; i < rows.Count; i++)
        {
            var row = rows[i];
            var n = 0;
            for (var d = 0; d < Days; d++)
            {
                if (float.IsNaN(row[d]))
                {
                    row[d] = float.NaN;
                }
                else
                {
                    n++;
                }
            }

            observed[i] = n;
            if (n > 0)
            {
                order.Add(i);
            }
        }

        order.Sort((a, b) =>
        {
            var c = stations[rowStation[a]].Id.CompareTo(stations[rowStation[b]].Id);
            return c != 0 ? c : rowSeason[a].CompareTo(rowSeason[b]);
        });

        var keys = new SeasonKey[order.Count];
        var depths = new float[(long)order.Count * Days];
        for (var k = 0; k < order.Count; k++)
        {
            var i = order[k];
            var s = rowStation[i];
            var isBelow = observed[i] < minDays;
            keys[k] = new SeasonKey(stations[s].Id, rowSeason[i], observed[i], isBelow);
            rows[i].CopyTo(depths, (long)k * Days);
            rows[i] = [];
            seasons[s]++;
            below[s] += isBelow ? 1 : 0;
            kept[s] += observed[i];
        }

        return new SeasonMatrix(calendar, keys, depths);
    }
}

using System.Numerics;
using System.Runtime.Intrinsics;

namespace Spatial.Core;

/// <summary>One row of a <see cref="SeasonMatrix"/>: a station's season.</summary>
/// <param name="Station">The station.</param>
/// <param name="Season">The season's name: the calendar year in which it starts.</param>
/// <param name="ObservedDays">Days with a depth (not NaN), 0…365.</param>
/// <param name="BelowMinDays">True when <paramref name="ObservedDays"/> is below the import's minimum; kept in the file, filtered by later stages.</param>
public readonly record struct SeasonKey(StationId Station, int Season, int ObservedDays, bool BelowMinDays);

/// <summary>
/// Daily snow depth per station-season: <see cref="Rows"/> × 365 values in millimetres, float32,
/// row-major, NaN for a missing day. Day 0 is the season's first day under <see cref="Calendar"/>.
/// </summary>
/// <remarks>
/// Rows are ordered by station (ordinal) then season, and each (station, season) appears once.
/// The matrix takes ownership of the depth array given to it and never changes it; callers must
/// not change it either. Nothing is ever filled in: a missing day stays NaN.
/// </remarks>
public sealed class SeasonMatrix
{
    private readonly float[] depthsMm;

    /// <summary>
    /// Wraps <paramref name="depthsMm"/> (length <c>keys.Count × 365</c>, taken without copying).
    /// Throws <see cref="ArgumentException"/> when the shapes disagree, a key is duplicated or out of order,
    /// or an observed-day count does not match the data.
    /// </summary>
    public SeasonMatrix(SeasonCalendar calendar, IReadOnlyList<SeasonKey> keys, float[] depthsMm)
        : this(depthsMm, CopyOf(calendar, keys, depthsMm), calendar)
    {
    }

    /// <summary>Validates as the public constructor and takes <paramref name="keys"/> as they are (the caller gives the array up).</summary>
    private SeasonMatrix(float[] depthsMm, SeasonKey[] keys, SeasonCalendar calendar)
    {
        ArgumentNullException.ThrowIfNull(calendar);
        ArgumentNullException.ThrowIfNull(keys);
        ArgumentNullException.ThrowIfNull(depthsMm);
        if ((long)keys.Length * SeasonCalendar.DaysPerSeason != depthsMm.LongLength)
        {
            throw new ArgumentException($"{keys.Length} rows need {(long)keys.Length * SeasonCalendar.DaysPerSeason} values; got {depthsMm.LongLength}.", nameof(depthsMm));
        }

        for (var i = 0; i < keys.Length; i++)
        {
            if (i > 0)
            {
                var order = keys[i - 1].Station.CompareTo(keys[i].Station);
                if (order > 0 || (order == 0 && keys[i - 1].Season >= keys[i].Season))
                {
                    throw new ArgumentException($"rows must be ordered by station then season, each once; row {i} ({keys[i].Station} {keys[i].Season}) follows {keys[i - 1].Station} {keys[i - 1].Season}.", nameof(keys));
                }
            }

            var observed = CountObserved(depthsMm.AsSpan(i * SeasonCalendar.DaysPerSeason, SeasonCalendar.DaysPerSeason));
            if (observed != keys[i].ObservedDays)
            {
                throw new ArgumentException($"row {i} ({keys[i].Station} {keys[i].Season}) says {keys[i].ObservedDays} observed days; the data hold {observed}.", nameof(keys));
            }
        }

        Calendar = calendar;
        Keys = keys;
        this.depthsMm = depthsMm;
    }

    /// <summary>The season convention of the columns.</summary>
    public SeasonCalendar Calendar { get; }

    /// <summary>Row keys, ordered by station then season.</summary>
    public IReadOnlyList<SeasonKey> Keys { get; }

    /// <summary>Number of station-seasons.</summary>
    public int Rows => Keys.Count;

    /// <summary>All depths, row-major, millimetres, NaN for missing.</summary>
    public ReadOnlySpan<float> Depths => depthsMm;

    /// <summary>All depths as memory (for parallel loops), row-major, millimetres, NaN for missing.</summary>
    public ReadOnlyMemory<float> DepthsMemory => depthsMm;

    /// <summary>As the public constructor, without copying <paramref name="keys"/>: the matrix takes the array (a reader that built it).</summary>
    internal static SeasonMatrix TakingKeys(SeasonCalendar calendar, SeasonKey[] keys, float[] depthsMm) => new(depthsMm, keys, calendar);

    private static SeasonKey[] CopyOf(SeasonCalendar calendar, IReadOnlyList<SeasonKey> keys, float[] depthsMm)
    {
        ArgumentNullException.ThrowIfNull(calendar);
        ArgumentNullException.ThrowIfNull(keys);
        ArgumentNullException.ThrowIfNull(depthsMm);
        return keys.ToArray();
    }

    /// <summary>Values of <paramref name="row"/> that are not NaN, eight at a time.</summary>
    private static int CountObserved(ReadOnlySpan<float> row)
    {
        var observed = 0;
        var i = 0;
        if (Vector256.IsHardwareAccelerated)
        {
            for (; i + 8 <= row.Length; i += 8)
            {
                var v = Vector256.Create(row.Slice(i, 8));
                observed += BitOperations.PopCount(Vector256.Equals(v, v).ExtractMostSignificantBits());
            }
        }

        for (; i < row.Length; i++)
        {
            observed += float.IsNaN(row[i]) ? 0 : 1;
        }

        return observed;
    }

    /// <summary>The 365 depths of row <paramref name="row"/>, millimetres, NaN for missing.</summary>
    public ReadOnlySpan<float> Row(int row) => depthsMm.AsSpan(checked(row * SeasonCalendar.DaysPerSeason), SeasonCalendar.DaysPerSeason);
}

namespace Spatial.Core;

/// <summary>
/// The season-year convention: a season is <see cref="DaysPerSeason"/> days starting on a fixed
/// month and day (default 1 September; a southern-hemisphere network uses 1 March). Day 0 is the
/// start day. 29 February is dropped, so every season has exactly 365 days. A season is named by
/// the calendar year in which it starts.
/// </summary>
public sealed record SeasonCalendar
{
    /// <summary>Days in every season (29 February is dropped).</summary>
    public const int DaysPerSeason = 365;

    // Cumulative day-of-year (0-based) at the first of each month in a 365-day year.
    private static readonly int[] MonthStart = [0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334];
    private static readonly int[] MonthLength = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

    /// <summary>Creates a calendar whose seasons start on <paramref name="startMonth"/>/<paramref name="startDay"/>; 29 February is refused.</summary>
    public SeasonCalendar(int startMonth, int startDay)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(startMonth, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(startMonth, 12);
        ArgumentOutOfRangeException.ThrowIfLessThan(startDay, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(startDay, MonthLength[startMonth - 1]);
        StartMonth = startMonth;
        StartDay = startDay;
    }

    /// <summary>The default calendar: seasons start on 1 September.</summary>
    public static SeasonCalendar Default { get; } = new(9, 1);

    /// <summary>Month (1–12) of the season's first day.</summary>
    public int StartMonth { get; }

    /// <summary>Day of month of the season's first day.</summary>
    public int StartDay { get; }

    /// <summary>The start as MM-DD (the option syntax).</summary>
    public string StartText => $"{StartMonth:00}-{StartDay:00}";

    /// <summary>Parses MM-DD; returns null when the text is not a valid start day (29 February is not one).</summary>
    public static SeasonCalendar? TryParse(string? text)
    {
        if (text is null || text.Length != 5 || text[2] != '-'
            || !int.TryParse(text.AsSpan(0, 2), System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out var m)
            || !int.TryParse(text.AsSpan(3, 2), System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out var d))
        {
            return null;
        }

        if (m is < 1 or > 12 || d < 1 || d > MonthLength[m - 1])
        {
            return null;
        }

        return new SeasonCalendar(m, d);
    }

    /// <summary>
    /// Places a calendar date in its season. Returns false for 29 February (dropped by convention).
    /// </summary>
    /// <param name="date">The date.</param>
    /// <param name="season">The season's name: the calendar year in which it starts.</param>
    /// <param name="day">Day index 0…364 within the season.</param>
    public bool TryLocate(DateOnly date, out int season, out int day)
    {
        if (date.Month == 2 && date.Day == 29)
        {
            season = 0;
            day = -1;
            return false;
        }

        var doy = MonthStart[date.Month - 1] + date.Day - 1;
        var startDoy = MonthStart[StartMonth - 1] + StartDay - 1;
        if (doy >= startDoy)
        {
            season = date.Year;
            day = doy - startDoy;
        }
        else
        {
            season = date.Year - 1;
            day = doy + DaysPerSeason - startDoy;
        }

        return true;
    }

    /// <summary>The calendar date of day <paramref name="day"/> (0…364) of season <paramref name="season"/>.</summary>
    public DateOnly DateOf(int season, int day)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(day);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(day, DaysPerSeason);
        var startDoy = MonthStart[StartMonth - 1] + StartDay - 1;
        var doy = startDoy + day;
        var year = season;
        if (doy >= DaysPerSeason)
        {
            doy -= DaysPerSeason;
            year++;
        }

        var month = Array.FindLastIndex(MonthStart, s => s <= doy);
        return new DateOnly(year, month + 1, doy - MonthStart[month] + 1);
    }
}

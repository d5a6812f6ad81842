using Spatial.Core;
using Xunit;

namespace Spatial.Core.Tests;

public sealed class SeasonCalendarTests
{
    // Day indices below are worked by hand from the month lengths of the Gregorian calendar
    // (Sep 30, Oct 31, Nov 30, Dec 31, Jan 31, Feb 28 — 29 February dropped).
    [Theory]
    [InlineData(2000, 9, 1, 2000, 0)]      // the start day is day 0
    [InlineData(2000, 9, 30, 2000, 29)]    // September has 30 days
    [InlineData(2000, 10, 1, 2000, 30)]
    [InlineData(2000, 12, 31, 2000, 121)]  // 30 + 31 + 30 + 31 − 1
    [InlineData(2001, 1, 1, 2000, 122)]    // the season keeps the year it started in
    [InlineData(2001, 3, 1, 2000, 181)]    // 122 + 31 + 28
    [InlineData(2001, 8, 31, 2000, 364)]   // the last day of the season
    [InlineData(2001, 9, 1, 2001, 0)]
    public void A_date_falls_on_the_hand_counted_day_of_its_season(int year, int month, int day, int season, int index)
    {
        var ok = SeasonCalendar.Default.TryLocate(new DateOnly(year, month, day), out var s, out var d);

        Assert.True(ok);
        Assert.Equal(season, s);
        Assert.Equal(index, d);
    }

    [Fact]
    public void The_29th_of_February_is_dropped_and_the_next_day_follows_the_28th()
    {
        var cal = SeasonCalendar.Default;

        Assert.False(cal.TryLocate(new DateOnly(2004, 2, 29), out _, out _));
        cal.TryLocate(new DateOnly(2004, 2, 28), out _, out var feb28);
        cal.TryLocate(new DateOnly(2004, 3, 1), out _, out var mar1);
        Assert.Equal(feb28 + 1, mar1);
    }

    [Fact]
    public void A_southern_hemisphere_season_starting_on_1_March_runs_to_the_end_of_February()
    {
        var cal = SeasonCalendar.TryParse("03-01")!;

        cal.TryLocate(new DateOnly(2010, 3, 1), out var s0, out var d0);
        cal.TryLocate(new DateOnly(2011, 2, 28), out var s1, out var d1);

        Assert.Equal((2010, 0), (s0, d0));
        Assert.Equal((2010, 364), (s1, d1));
    }

    [Fact]
    public void Every_day_of_a_season_maps_back_to_the_date_it_came_from()
    {
        foreach (var cal in new[] { SeasonCalendar.Default, new SeasonCalendar(3, 1), new SeasonCalendar(10, 15) })
        {
            for (var day = 0; day < SeasonCalendar.DaysPerSeason; day++)
            {
                var date = cal.DateOf(1999, day);
                Assert.True(cal.TryLocate(date, out var season, out var back));
                Assert.Equal((1999, day), (season, back));
            }
        }
    }

    [Theory]
    [InlineData("02-29")]
    [InlineData("13-01")]
    [InlineData("9-1")]
    [InlineData("04-31")]
    [InlineData("")]
    public void An_impossible_start_day_is_refused(string text) => Assert.Null(SeasonCalendar.TryParse(text));
}

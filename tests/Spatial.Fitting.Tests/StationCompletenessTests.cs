using Spatial.Core;
using Spatial.Fitting;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>
/// Station summaries of a metric need it known in at least 80 % of the station's seasons (from memory: the completeness
/// WMO guidance on climate normals asks of the years in a normal), so that censored seasons do not bias the median.
/// </summary>
public sealed class StationCompletenessTests
{
    /// <summary>One bump of snow, 600 mm at day 150, above 25 mm from about day 95 to 205.</summary>
    private static float Bump(int d) => (float)(600 * Math.Exp(-0.5 * Math.Pow((d - 150) / 30.0, 2)));

    private static SeasonMatrix Matrix(int censoredSeasonsOfA)
    {
        var keys = new List<SeasonKey>();
        var data = new List<float>();
        foreach (var station in new[] { "A", "B" })
        {
            for (var y = 0; y < 10; y++)
            {
                // A's first seasons stop reporting on day 180, while snow still lies: melt-out is unknowable there.
                var stopsInCover = station == "A" && y < censoredSeasonsOfA;
                var observed = 0;
                for (var d = 0; d < SeasonCalendar.DaysPerSeason; d++)
                {
                    var missing = stopsInCover && d >= 180;
                    data.Add(missing ? float.NaN : Bump(d) * (1 + (0.02f * y)));
                    observed += missing ? 0 : 1;
                }

                keys.Add(new SeasonKey(new StationId(station), 2000 + y, observed, false));
            }
        }

        return new SeasonMatrix(SeasonCalendar.Default, keys, data.ToArray());
    }

    private static double MedianMeltout(FitResult fit, string station) =>
        fit.Stations.Single(s => s.Station.Value == station).Statistics.Single(x => x.Name == "meltout_day").Median;

    [Fact]
    public void Given_melt_out_known_in_7_of_10_seasons_then_the_station_median_is_left_unknown()
    {
        var fit = SeasonalFit.Fit(Matrix(censoredSeasonsOfA: 3), new FitOptions(Components: 2));

        Assert.True(double.IsNaN(MedianMeltout(fit, "A")));
        Assert.False(double.IsNaN(MedianMeltout(fit, "B")));
    }

    [Fact]
    public void Given_melt_out_known_in_8_of_10_seasons_then_the_station_median_is_reported()
    {
        var fit = SeasonalFit.Fit(Matrix(censoredSeasonsOfA: 2), new FitOptions(Components: 2));

        Assert.False(double.IsNaN(MedianMeltout(fit, "A")));
    }
}

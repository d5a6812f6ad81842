using Spatial.Core;
using Spatial.Fitting.Internal;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>The modelled-bare rule through the whole fit, on template snowpacks (invented data) whose summer is not reported at some stations.</summary>
public sealed class ModelledBareFitTests
{
    [Fact]
    public void Seasons_whose_summer_is_not_reported_keep_the_melt_out_and_snow_days_of_the_same_season_with_summer()
    {
        var (full, _, _, _) = InterpretationTests.Templates(600, seed: 21);
        var data = full.DepthsMemory.ToArray();
        var keys = full.Keys.ToList();
        for (var r = 0; r < full.Rows; r += 3)
        {
            // Every third season stops reporting on day 320 (a station without summers); the template's snow is gone by then.
            for (var d = 320; d < 365; d++)
            {
                data[(r * 365) + d] = float.NaN;
            }

            keys[r] = keys[r] with { ObservedDays = full.Row(r)[..320].ToArray().Count(x => !float.IsNaN(x)) };
        }

        var fit = SeasonalFit.Fit(new SeasonMatrix(full.Calendar, keys, data), new FitOptions(Components: 4));
        var compared = 0;
        for (var r = 0; r < full.Rows; r += 3)
        {
            // Reference: the same season with its summer, strict rule (no model).
            var reference = MetricCalculator.Compute(full.Row(r), MetricOptions.Default);
            if (double.IsNaN(reference.MeltoutDay) || double.IsNaN(reference.SnowDays) || reference.MeltoutDay >= 300)
            {
                continue;
            }

            var m = fit.Seasons.Metrics(r);
            Assert.True(m.ModelledBareDays >= 45, $"row {r}: {m.ModelledBareDays} modelled-bare days");
            Assert.Equal(reference.MeltoutDay, m.MeltoutDay);
            Assert.Equal(reference.SnowDays, m.SnowDays);
            compared++;
        }

        Assert.True(compared >= 100, $"{compared} seasons compared");
    }
}

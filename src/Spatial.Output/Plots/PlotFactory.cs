using MathNet.Numerics.Distributions;
using ScottPlot;
using Spatial.Core;
using Spatial.Output.Colour;

namespace Spatial.Output.Plots;

/// <summary>
/// Plots of the decomposition and the regressions, drawn with ScottPlot 5 from plain arrays (so that callers can
/// feed them from files or from memory). Every function returns PNG and SVG of one drawing. NaN values are left out.
/// </summary>
public static class PlotFactory
{
    /// <summary>Default size in pixels.</summary>
    public const int Width = 760;

    /// <summary>Default size in pixels.</summary>
    public const int Height = 420;

    private static readonly ScottPlot.Color Ink = ScottPlot.Color.FromHex("#222222");

    /// <summary>
    /// Variance explained per component (fraction 0…1, as bars) with the sampling error of each eigenvalue after
    /// North et al. (1982, "Sampling errors in the estimation of empirical orthogonal functions", Mon. Wea. Rev.
    /// 110) as error bars (δλ ≈ λ √(2/N), given here as a fraction of the total variance).
    /// </summary>
    public static Figure VarianceExplained(IReadOnlyList<double> fraction, IReadOnlyList<double> errorFraction)
    {
        using var plot = new Plot();
        var xs = Enumerable.Range(1, fraction.Count).Select(i => (double)i).ToArray();
        var bars = plot.Add.Bars(xs, fraction.Select(f => f * 100).ToArray());
        bars.Color = Hex(ColourScale.Fellside.At(0.6).Hex);
        var errors = plot.Add.ErrorBar(xs, fraction.Select(f => f * 100).ToArray(), errorFraction.Select(e => double.IsFinite(e) ? e * 100 : 0).ToArray());
        errors.Color = Ink;
        plot.Axes.Bottom.SetTicks(xs, xs.Select(x => $"c{x}").ToArray());
        plot.Axes.Margins(bottom: 0);
        Labels(plot, "Variance explained per component", "component", "variance explained (%)");
        return Render(plot, "Variance explained", "Bars: share of the total variance of the seasonal curves carried by each component. Whiskers: North et al. (1982) sampling error of the eigenvalue; overlapping whiskers mean the two components are not well separated.");
    }

    /// <summary>The mean curve and components against calendar dates of one season (season start from the calendar).</summary>
    public static Figure Components(IReadOnlyList<double> meanMm, IReadOnlyList<IReadOnlyList<double>> components, IReadOnlyList<string> labels, SeasonCalendar calendar)
    {
        ArgumentNullException.ThrowIfNull(calendar);
        using var plot = new Plot();
        const int season = 2001;
        var dates = Enumerable.Range(0, SeasonCalendar.DaysPerSeason).Select(d => calendar.DateOf(season, d).ToDateTime(TimeOnly.MinValue).ToOADate()).ToArray();
        var scaleMax = components.Count == 0 ? 1 : components.SelectMany(c => c).Where(double.IsFinite).Select(Math.Abs).DefaultIfEmpty(1).Max();
        var meanMax = meanMm.Where(double.IsFinite).DefaultIfEmpty(1).Max();
        for (var k = 0; k < components.Count; k++)
        {
            var line = plot.Add.ScatterLine(dates, components[k].ToArray());
            line.LegendText = $"c{k + 1}{(k < labels.Count ? $" ({labels[k]})" : string.Empty)}";
            line.LineWidth = 2;
            line.Color = Hex(ColourScale.Fellside.At(0.25 + (0.75 * k / Math.Max(1, components.Count - 1))).Hex);
        }

        if (meanMm.Count == SeasonCalendar.DaysPerSeason && meanMax > 0)
        {
            var mean = plot.Add.ScatterLine(dates, meanMm.Select(v => v / meanMax * scaleMax).ToArray());
            mean.LegendText = $"mean curve (scaled; peak {meanMax:0} mm)";
            mean.LinePattern = LinePattern.Dashed;
            mean.Color = Ink;
        }

        DayMonthTicks(plot);
        plot.Add.HorizontalLine(0, 1, Ink.WithAlpha(0.4));
        plot.ShowLegend(Alignment.UpperRight);
        Labels(plot, $"Components of the seasonal curve (season from {calendar.StartText})", "date in the season", "weight per day");
        return Render(plot, "Components against calendar dates", "Each component is a shape added to the mean curve: a positive score adds the curve as drawn, a negative score subtracts it. The dashed line is the mean curve, scaled to the plot.");
    }

    /// <summary>
    /// A season rebuilt step by step: the mean, then mean + c1·v1, + c2·v2, …, against the observed depths (NaN = missing day).
    /// </summary>
    public static Figure Reconstruction(string title, IReadOnlyList<double> meanMm, IReadOnlyList<IReadOnlyList<double>> components, IReadOnlyList<double> scores, IReadOnlyList<double> observedMm, SeasonCalendar calendar)
    {
        ArgumentNullException.ThrowIfNull(calendar);
        using var plot = new Plot();
        var days = SeasonCalendar.DaysPerSeason;
        var dates = Enumerable.Range(0, days).Select(d => calendar.DateOf(2001, d).ToDateTime(TimeOnly.MinValue).ToOADate()).ToArray();
        var obsX = new List<double>();
        var obsY = new List<double>();
        for (var d = 0; d < days && d < observedMm.Count; d++)
        {
            if (double.IsFinite(observedMm[d]))
            {
                obsX.Add(dates[d]);
                obsY.Add(observedMm[d]);
            }
        }

        var obs = plot.Add.ScatterPoints(obsX.ToArray(), obsY.ToArray());
        obs.MarkerSize = 3;
        obs.Color = Ink.WithAlpha(0.6);
        obs.LegendText = "observed";
        var curve = meanMm.ToArray();
        var steps = Math.Min(components.Count, scores.Count);
        for (var k = 0; k <= steps; k++)
        {
            if (k > 0)
            {
                for (var d = 0; d < days; d++)
                {
                    curve[d] += scores[k - 1] * components[k - 1][d];
                }
            }

            var line = plot.Add.ScatterLine(dates, curve.ToArray());
            line.LegendText = k == 0 ? "mean" : $"+ c{k} ({scores[k - 1]:0.#})";
            line.LineWidth = k == steps ? 2.5f : 1.5f;
            line.Color = Hex(ColourScale.Fellside.At(0.15 + (0.85 * k / Math.Max(1, steps))).Hex);
        }

        DayMonthTicks(plot);
        plot.ShowLegend(Alignment.UpperRight);
        Labels(plot, title, "date in the season", "snow depth (mm)");
        return Render(plot, title, "The mean curve, then the curve after adding each component in turn, against the observed daily depths (gaps are missing days).");
    }

    /// <summary>Residual against fitted value, with the zero line.</summary>
    public static Figure ResidualVsFitted(IReadOnlyList<double> fitted, IReadOnlyList<double> residual, string response, string unit)
    {
        using var plot = new Plot();
        var (x, y) = Finite(fitted, residual);
        var pts = plot.Add.ScatterPoints(x, y);
        pts.Color = Hex(ColourScale.Fellside.At(0.75).Hex);
        pts.MarkerSize = 7;
        plot.Add.HorizontalLine(0, 1, Ink);
        Labels(plot, $"Residual against fitted: {response}", $"fitted{Unit(unit)}", $"residual{Unit(unit)}");
        return Render(plot, $"Residual vs fitted ({response})", "A pattern (a curve, a funnel) says the model misses structure or the spread is not constant; points should scatter evenly about zero.");
    }

    /// <summary>Partial residuals e + bⱼxⱼ against predictor xⱼ, with the line of slope bⱼ through the origin of the partial effect.</summary>
    public static Figure PartialResidual(IReadOnlyList<double> x, IReadOnlyList<double> partial, double slope, string predictor, string response)
    {
        using var plot = new Plot();
        var (xs, ys) = Finite(x, partial);
        var pts = plot.Add.ScatterPoints(xs, ys);
        pts.Color = Hex(ColourScale.Fellside.At(0.75).Hex);
        pts.MarkerSize = 7;
        if (xs.Length > 0 && double.IsFinite(slope))
        {
            var line = plot.Add.Line(xs.Min(), slope * xs.Min(), xs.Max(), slope * xs.Max());
            line.Color = Ink;
            line.LineWidth = 1.5f;
        }

        Labels(plot, $"Partial residuals: {response} on {predictor}", predictor.Replace('_', ' '), $"residual + b·{predictor}");
        return Render(plot, $"Partial residuals ({response} on {predictor})", "The effect of one predictor with the others held fixed: points are residuals plus that predictor's fitted part; the line has the fitted slope. Curvature suggests a missing transform.");
    }

    /// <summary>
    /// Normal QQ plot of standardised residuals: sorted residual ÷ sample SD against normal quantiles at Blom's
    /// plotting positions (i − 3/8)/(n + 1/4) (Blom 1958), with the identity line.
    /// </summary>
    public static Figure Qq(IReadOnlyList<double> residuals, string response)
    {
        using var plot = new Plot();
        var (theory, sorted) = QqPoints(residuals);
        var pts = plot.Add.ScatterPoints(theory, sorted);
        pts.Color = Hex(ColourScale.Fellside.At(0.75).Hex);
        pts.MarkerSize = 7;
        if (theory.Length > 0)
        {
            var lim = Math.Max(Math.Abs(theory[0]), Math.Abs(theory[^1]));
            var line = plot.Add.Line(-lim, -lim, lim, lim);
            line.Color = Ink;
        }

        Labels(plot, $"Normal QQ plot of residuals: {response}", "normal quantile", "standardised residual");
        return Render(plot, $"QQ plot ({response})", "Points on the line mean normally distributed residuals, which the t and F tests assume; bends at the ends mean heavy or light tails.");
    }

    /// <summary>Blom plotting positions: normal quantiles and sorted standardised residuals (NaN dropped).</summary>
    internal static (double[] Theory, double[] Sorted) QqPoints(IReadOnlyList<double> residuals)
    {
        var r = residuals.Where(double.IsFinite).Order().ToArray();
        var n = r.Length;
        if (n < 2)
        {
            return ([], []);
        }

        var mean = r.Average();
        var sd = Math.Sqrt(r.Sum(v => (v - mean) * (v - mean)) / (n - 1));
        var theory = Enumerable.Range(1, n).Select(i => Normal.InvCDF(0, 1, (i - 0.375) / (n + 0.25))).ToArray();
        return (theory, r.Select(v => sd > 0 ? (v - mean) / sd : 0).ToArray());
    }

    private static (double[] X, double[] Y) Finite(IReadOnlyList<double> x, IReadOnlyList<double> y)
    {
        var xs = new List<double>();
        var ys = new List<double>();
        for (var i = 0; i < Math.Min(x.Count, y.Count); i++)
        {
            if (double.IsFinite(x[i]) && double.IsFinite(y[i]))
            {
                xs.Add(x[i]);
                ys.Add(y[i]);
            }
        }

        return (xs.ToArray(), ys.ToArray());
    }

    /// <summary>Date ticks as "1 Oct" (invariant), since the plotted year is only a stand-in for any season.</summary>
    private static void DayMonthTicks(Plot plot)
    {
        var axis = plot.Axes.DateTimeTicksBottom();
        if (axis.TickGenerator is ScottPlot.TickGenerators.DateTimeAutomatic automatic)
        {
            automatic.LabelFormatter = d => d.ToString("d MMM", System.Globalization.CultureInfo.InvariantCulture);
        }
    }

    private static string Unit(string unit) => unit.Length == 0 ? string.Empty : $" ({unit})";

    private static ScottPlot.Color Hex(string hex) => ScottPlot.Color.FromHex(hex);

    private static void Labels(Plot plot, string title, string x, string y)
    {
        plot.Title(title);
        plot.XLabel(x);
        plot.YLabel(y);
    }

    private static Figure Render(Plot plot, string title, string caption) =>
        new(title, caption, plot.GetImageBytes(Width, Height, ImageFormat.Png), plot.GetSvgXml(Width, Height));
}

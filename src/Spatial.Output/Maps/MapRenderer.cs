using System.Globalization;
using NetTopologySuite.Geometries;
using Spatial.Core;
using Spatial.Output.Colour;
using Spatial.Output.Internal;
using Spatial.Output.Layers;
using Spatial.Output.Raster;

namespace Spatial.Output.Maps;

/// <summary>Options of a static map.</summary>
/// <param name="Variable">A column of the stations layer (any per-station column, e.g. <c>median_c1</c>, <c>sen_per_decade_onset_day</c>, <c>median_c1_residual</c>).</param>
/// <param name="Title">Title; null gives the variable's label.</param>
/// <param name="WidthPx">Width in pixels (CSS pixels for SVG).</param>
/// <param name="HeightPx">Height in pixels.</param>
/// <param name="Dem">DEM for the hillshade; null leaves it out.</param>
/// <param name="CoastPath">Coastline GeoJSON (WGS 84); null uses the one in the results folder, if any.</param>
/// <param name="Scale">Colour scale; null chooses by variable (diverging for trends, residuals, scores).</param>
public sealed record MapOptions(string Variable, string? Title = null, int WidthPx = 900, int HeightPx = 680, RasterGrid? Dem = null, string? CoastPath = null, ColourScale? Scale = null);

/// <summary>
/// Static maps of a per-station variable: hillshade (Horn 1981, light 315°/45°), coastline, stations coloured on
/// a perceptual scale, a legend with units, a scale bar and a north arrow, in WGS 84 / UTM of the region's
/// centre. Drawn once, written as SVG or PNG.
/// </summary>
public static class MapRenderer
{
    private const string Sea = "#e9eff3";
    private const string Land = "#f4f1ea";

    /// <summary>The map as SVG markup. Throws <see cref="SpatialDataException"/> when the variable is not a stations column.</summary>
    public static string Svg(ResultsFolder folder, MapOptions options) => Build(folder, options).ToSvg();

    /// <summary>The map as PNG bytes (SkiaSharp).</summary>
    public static byte[] Png(ResultsFolder folder, MapOptions options) => Build(folder, options).ToPng();

    /// <summary>Columns of the stations layer that hold numbers (the variables a map can show), in layer order.</summary>
    public static IReadOnlyList<string> Variables(ResultsFolder folder)
    {
        var notes = new List<string>();
        var layer = LayerBuilder.Stations(folder, LayerBuilder.StationPoints(folder, notes), notes);
        return layer is null ? [] : layer.Fields.Where(f => f.Type != FieldType.Text).Select(f => f.Name).ToArray();
    }

    internal static Drawing Build(ResultsFolder folder, MapOptions options, Dictionary<(RasterGrid Dem, string Frame), RgbaImage>? backdrops = null)
    {
        ArgumentNullException.ThrowIfNull(folder);
        ArgumentNullException.ThrowIfNull(options);
        var notes = new List<string>();
        var points = LayerBuilder.StationPoints(folder, notes);
        var layer = LayerBuilder.Stations(folder, points, notes)
            ?? throw new SpatialDataException(folder.FolderPath, 0, "no station points to map", "the folder needs station_list.csv (run import)");
        var field = layer.Fields.Select((f, i) => (f, i)).FirstOrDefault(p => p.f.Name == options.Variable);
        if (field.f is null || field.f.Type == FieldType.Text)
        {
            throw new SpatialDataException(folder.FolderPath, 0, $"'{options.Variable}' is not a numeric per-station column", $"choose one of: {string.Join(", ", Variables(folder).Take(12))}…");
        }

        var values = layer.Features.Select(f => f.Values[field.i] switch { double d => d, long l => l, _ => double.NaN }).ToArray();
        var known = values.Where(double.IsFinite).ToArray();
        var min = known.Length > 0 ? known.Min() : double.NaN;
        var max = known.Length > 0 ? known.Max() : double.NaN;
        var scale = options.Scale ?? Internal.Variables.Scale(options.Variable, min, max);

        // Projection: UTM of the centre of the stations' lon/lat box.
        var lon0 = (points.Values.Min(p => p.Lon) + points.Values.Max(p => p.Lon)) / 2;
        var lat0 = (points.Values.Min(p => p.Lat) + points.Values.Max(p => p.Lat)) / 2;
        var utm = CrsTransform.UtmAt(lon0, lat0, out var zone, out var north);
        var projected = points.Values.Select(p => utm.FromLonLat(p.Lon, p.Lat)).ToArray();
        var coast = options.CoastPath ?? folder.CoastlinePath;
        var coastGeoms = coast is null ? [] : LayerBuilder.ReadGeometries(coast);
        var env = new Envelope();
        foreach (var (x, y) in projected)
        {
            env.ExpandToInclude(x, y);
        }

        foreach (var g in coastGeoms)
        {
            foreach (var c in g.Coordinates)
            {
                var (x, y) = utm.FromLonLat(c.X, c.Y);
                env.ExpandToInclude(x, y);
            }
        }

        var pad = Math.Max(Math.Max(env.Width, env.Height) * 0.06, 500);
        env.ExpandBy(pad);

        // Frame: map on the left, legend column on the right, title on top, footer below.
        const double top = 44, bottom = 40, left = 16, legendWidth = 190;
        var frameW = options.WidthPx - left - legendWidth - 16;
        var frameH = options.HeightPx - top - bottom;
        var k = Math.Min(frameW / env.Width, frameH / env.Height);
        var mapW = env.Width * k;
        var mapH = env.Height * k;
        var ox = left + ((frameW - mapW) / 2);

        // A wide region leaves the frame half empty: shrink the drawing to the map (keeping room for the legend).
        var height = Math.Min(options.HeightPx, Math.Max(440, (int)Math.Ceiling(mapH + top + bottom)));
        var oy = top + ((height - top - bottom - mapH) / 2);
        (double X, double Y) Px(double x, double y) => (ox + ((x - env.MinX) * k), oy + ((env.MaxY - y) * k));
        (double X, double Y) PxLonLat(double lon, double lat)
        {
            var (x, y) = utm.FromLonLat(lon, lat);
            return Px(x, y);
        }

        var title = options.Title ?? Internal.Variables.Label(options.Variable);
        var d = new Drawing(options.WidthPx, height, title);
        d.Add(new DrawRect(ox, oy, mapW, mapH, Sea, null, 0));
        foreach (var g in coastGeoms)
        {
            for (var i = 0; i < g.NumGeometries; i++)
            {
                if (g.GetGeometryN(i) is Polygon poly)
                {
                    d.Add(new DrawPoly(poly.ExteriorRing.Coordinates.Select(c => PxLonLat(c.X, c.Y)).ToArray(), true, Land, null, 0));
                    foreach (var hole in poly.InteriorRings)
                    {
                        d.Add(new DrawPoly(hole.Coordinates.Select(c => PxLonLat(c.X, c.Y)).ToArray(), true, Sea, null, 0));
                    }
                }
            }
        }

        if (options.Dem is { } dem)
        {
            var iw = (int)Math.Ceiling(mapW);
            var ih = (int)Math.Ceiling(mapH);
            var frame = string.Create(CultureInfo.InvariantCulture, $"{zone}{north}:{env.MinX:R},{env.MaxY:R},{k:R},{iw},{ih}");
            if (backdrops is null || !backdrops.TryGetValue((dem, frame), out var image))
            {
                image = Backdrop(dem, utm, zone, north, env, k, iw, ih);
                backdrops?.Add((dem, frame), image);
            }

            d.Add(new DrawImage(ox, oy, iw, ih, image));
        }

        foreach (var g in coastGeoms)
        {
            for (var i = 0; i < g.NumGeometries; i++)
            {
                var part = g.GetGeometryN(i);
                var lines = part is Polygon p ? new[] { p.ExteriorRing }.Concat(p.InteriorRings) : part is LineString l ? [l] : [];
                foreach (var line in lines)
                {
                    d.Add(new DrawPoly(line.Coordinates.Select(c => PxLonLat(c.X, c.Y)).ToArray(), false, null, "#3a4a58", 1.2));
                }
            }
        }

        // Stations: circles coloured by value, hollow grey where unknown.
        var ids = points.Keys.ToArray();
        for (var i = 0; i < ids.Length; i++)
        {
            var (px, py) = Px(projected[i].X, projected[i].Y);
            var v = values[i];
            d.Add(double.IsFinite(v)
                ? new DrawCircle(px, py, 6.5, scale.At(scale.Position(v, min, max)).Hex, "#111111", 1)
                : new DrawCircle(px, py, 5, "#ffffff", "#777777", 1.5));
        }

        d.Add(new DrawRect(ox, oy, mapW, mapH, null, "#555555", 1));
        d.Add(new DrawText(left, 28, title, 18, Anchor.Start, true));
        AddLegend(d, scale, min, max, options.Variable, left + frameW + 28, top + 10);
        AddScaleBar(d, k, ox + 14, oy + mapH - 18, mapW);
        AddNorthArrow(d, utm, lon0, lat0, k, ox + mapW - 30, oy + 46);
        var hemisphere = north ? "N" : "S";
        d.Add(new DrawText(left, height - 14, $"WGS 84 / UTM zone {zone}{hemisphere}; {points.Count} stations{(options.Dem is null ? string.Empty : "; hillshade: Horn 1981 gradients, light from 315° at 45°")}", 11, Anchor.Start, false));
        return d;
    }

    /// <summary>The hillshade veil over the map frame; the DEM is sampled directly when it is in the map's UTM zone.</summary>
    private static RgbaImage Backdrop(RasterGrid dem, CrsTransform utm, int zone, bool north, Envelope env, double k, int iw, int ih)
    {
        var shade = Hillshade.Compute(dem);
        var sameZone = dem.Crs.EpsgCode == (north ? 32600 : 32700) + zone;
        var demT = sameZone ? null : CrsTransform.For(dem.Crs, "DEM");
        return RasterImage.Render(dem, shade, iw, ih, (i, j) =>
        {
            var x = env.MinX + ((i + 0.5) / k);
            var y = env.MaxY - ((j + 0.5) / k);
            if (demT is null)
            {
                return (x, y);
            }

            var (lon, lat) = utm.ToLonLat(x, y);
            return demT.FromLonLat(lon, lat);
        }, s =>
        {
            // Shade as a translucent grey veil: lit slopes keep the land colour, shaded ones darken it.
            var g = (byte)Math.Round(40 + (Math.Clamp(s, 0, 1) * 215));
            return (g, g, g, (byte)Math.Round((1 - Math.Clamp(s, 0, 1)) * 170));
        });
    }

    private static void AddLegend(Drawing d, ColourScale scale, double min, double max, string variable, double x, double y)
    {
        var unit = Internal.Variables.Unit(variable);
        d.Add(new DrawText(x, y + 4, variable.Replace('_', ' '), 13, Anchor.Start, true));
        d.Add(new DrawText(x, y + 22, unit.Length == 0 ? "(no unit)" : unit, 12, Anchor.Start, false));
        const double barH = 260, barW = 22;
        var by = y + 36;
        if (!double.IsFinite(min))
        {
            d.Add(new DrawText(x, by + 14, "no known values", 12, Anchor.Start, false));
            return;
        }

        double lo = min, hi = max;
        if (scale.Diverging)
        {
            var m = Math.Max(Math.Abs(min), Math.Abs(max));
            (lo, hi) = (-m, m);
        }

        const int steps = 64;
        for (var s = 0; s < steps; s++)
        {
            var t = 1 - ((s + 0.5) / steps);
            d.Add(new DrawRect(x, by + (s * barH / steps), barW, (barH / steps) + 0.6, scale.At(t).Hex, null, 0));
        }

        d.Add(new DrawRect(x, by, barW, barH, null, "#333333", 0.8));
        foreach (var v in Ticks(lo, hi, 5))
        {
            var t = hi > lo ? (v - lo) / (hi - lo) : 0.5;
            var ty = by + ((1 - t) * barH);
            d.Add(new DrawPoly([(x + barW, ty), (x + barW + 5, ty)], false, null, "#333333", 1));
            d.Add(new DrawText(x + barW + 8, ty + 4, Number(v), 11, Anchor.Start, false));
        }

        var ny = by + barH + 26;
        d.Add(new DrawCircle(x + 8, ny - 4, 5, "#ffffff", "#777777", 1.5));
        d.Add(new DrawText(x + 20, ny, "no value", 11, Anchor.Start, false));
        d.Add(new DrawText(x, ny + 20, $"scale: {scale.Name}{(scale.Diverging ? ", centred on 0" : string.Empty)}", 11, Anchor.Start, false));
        d.Add(new DrawText(x, ny + 36, $"range {Number(min)} … {Number(max)}", 11, Anchor.Start, false));
    }

    private static void AddScaleBar(Drawing d, double pxPerMetre, double x, double y, double mapW)
    {
        var target = mapW / 4 / pxPerMetre;
        var length = NiceStep(target);
        var len = length * pxPerMetre;
        d.Add(new DrawRect(x - 6, y - 22, len + 52, 32, "#ffffff", null, 0));
        for (var i = 0; i < 4; i++)
        {
            d.Add(new DrawRect(x + (i * len / 4), y - 6, len / 4, 6, i % 2 == 0 ? "#222222" : "#ffffff", "#222222", 0.8));
        }

        d.Add(new DrawText(x, y - 10, "0", 11, Anchor.Middle, false));
        d.Add(new DrawText(x + len, y - 10, length >= 1000 ? $"{Number(length / 1000)} km" : $"{Number(length)} m", 11, Anchor.Middle, false));
    }

    private static void AddNorthArrow(Drawing d, CrsTransform utm, double lon0, double lat0, double k, double x, double y)
    {
        // True north at the centre: the direction of a small step north, in map pixels.
        var (x0, y0) = utm.FromLonLat(lon0, lat0);
        var (x1, y1) = utm.FromLonLat(lon0, lat0 + 0.01);
        var angle = Math.Atan2(x1 - x0, y1 - y0);
        _ = k;
        (double, double) R(double dx, double dy) => (x + ((dx * Math.Cos(angle)) - (dy * Math.Sin(angle))), y + ((dx * Math.Sin(angle)) + (dy * Math.Cos(angle))));
        d.Add(new DrawCircle(x, y, 22, "#ffffff", null, 0));
        d.Add(new DrawPoly([R(0, -18), R(8, 10), R(0, 4), R(-8, 10)], true, "#222222", "#222222", 1));
        d.Add(new DrawText(x, y - 24, "N", 13, Anchor.Middle, true));
    }

    /// <summary>1, 2 or 5 × 10ⁿ nearest below <paramref name="v"/> (v &gt; 0).</summary>
    internal static double NiceStep(double v)
    {
        var p = Math.Pow(10, Math.Floor(Math.Log10(v)));
        var m = v / p;
        return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
    }

    /// <summary>Round tick values within lo…hi, about <paramref name="count"/> of them.</summary>
    internal static IEnumerable<double> Ticks(double lo, double hi, int count)
    {
        if (!(hi > lo))
        {
            yield return lo;
            yield break;
        }

        var step = NiceStep((hi - lo) / count);
        for (var v = Math.Ceiling(lo / step) * step; v <= hi + (step * 1e-9); v += step)
        {
            yield return Math.Abs(v) < step * 1e-9 ? 0 : v;
        }
    }

    internal static string Number(double v) =>
        Math.Abs(v) >= 1000 || v == Math.Round(v) ? v.ToString("0", CultureInfo.InvariantCulture)
        : Math.Abs(v) >= 10 ? v.ToString("0.#", CultureInfo.InvariantCulture)
        : v.ToString("0.###", CultureInfo.InvariantCulture);
}

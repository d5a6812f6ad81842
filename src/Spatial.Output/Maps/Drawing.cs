using System.Globalization;
using System.Text;
using SkiaSharp;
using Spatial.Output.Raster;

namespace Spatial.Output.Maps;

/// <summary>Text anchoring of a <see cref="DrawText"/>.</summary>
internal enum Anchor
{
    Start,
    Middle,
    End,
}

/// <summary>A drawing primitive in pixel coordinates (origin top-left, y down). Colours are "#rrggbb" or null for none.</summary>
internal abstract record DrawItem;

internal sealed record DrawPoly((double X, double Y)[] Points, bool Closed, string? Fill, string? Stroke, double StrokeWidth) : DrawItem;

internal sealed record DrawCircle(double X, double Y, double R, string? Fill, string? Stroke, double StrokeWidth) : DrawItem;

internal sealed record DrawRect(double X, double Y, double W, double H, string? Fill, string? Stroke, double StrokeWidth) : DrawItem;

internal sealed record DrawText(double X, double Y, string Text, double Size, Anchor Anchor, bool Bold) : DrawItem;

internal sealed record DrawImage(double X, double Y, double W, double H, RgbaImage Image) : DrawItem;

/// <summary>
/// A small display list drawn the same way to SVG (text, for the report and print) and to PNG (SkiaSharp). Bytes
/// are deterministic for the same list.
/// </summary>
internal sealed class Drawing(int width, int height, string title)
{
    private readonly List<DrawItem> items = [];

    public int Width { get; } = width;

    public int Height { get; } = height;

    public string Title { get; } = title;

    public IReadOnlyList<DrawItem> Items => items;

    public void Add(DrawItem item) => items.Add(item);

    /// <summary>SVG 1.1 markup (also well-formed XML, so it can sit inline in XHTML).</summary>
    public string ToSvg()
    {
        var sb = new StringBuilder();
        sb.Append(CultureInfo.InvariantCulture, $"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{Width}\" height=\"{Height}\" viewBox=\"0 0 {Width} {Height}\" role=\"img\" aria-label=\"{Esc(Title)}\" font-family=\"DejaVu Sans, Arial, sans-serif\">");
        sb.Append(CultureInfo.InvariantCulture, $"<title>{Esc(Title)}</title>");
        foreach (var item in items)
        {
            switch (item)
            {
                case DrawPoly p:
                    sb.Append(p.Closed ? "<polygon points=\"" : "<polyline points=\"");
                    sb.AppendJoin(' ', p.Points.Select(q => $"{F(q.X)},{F(q.Y)}"));
                    sb.Append(CultureInfo.InvariantCulture, $"\" fill=\"{p.Fill ?? "none"}\" stroke=\"{p.Stroke ?? "none"}\" stroke-width=\"{F(p.StrokeWidth)}\" stroke-linejoin=\"round\"/>");
                    break;
                case DrawCircle c:
                    sb.Append(CultureInfo.InvariantCulture, $"<circle cx=\"{F(c.X)}\" cy=\"{F(c.Y)}\" r=\"{F(c.R)}\" fill=\"{c.Fill ?? "none"}\" stroke=\"{c.Stroke ?? "none"}\" stroke-width=\"{F(c.StrokeWidth)}\"/>");
                    break;
                case DrawRect r:
                    sb.Append(CultureInfo.InvariantCulture, $"<rect x=\"{F(r.X)}\" y=\"{F(r.Y)}\" width=\"{F(r.W)}\" height=\"{F(r.H)}\" fill=\"{r.Fill ?? "none"}\" stroke=\"{r.Stroke ?? "none"}\" stroke-width=\"{F(r.StrokeWidth)}\"/>");
                    break;
                case DrawText t:
                    var anchor = t.Anchor switch { Anchor.Middle => "middle", Anchor.End => "end", _ => "start" };
                    sb.Append(CultureInfo.InvariantCulture, $"<text x=\"{F(t.X)}\" y=\"{F(t.Y)}\" font-size=\"{F(t.Size)}\" text-anchor=\"{anchor}\"{(t.Bold ? " font-weight=\"bold\"" : string.Empty)} fill=\"#111111\">{Esc(t.Text)}</text>");
                    break;
                case DrawImage im:
                    sb.Append(CultureInfo.InvariantCulture, $"<image x=\"{F(im.X)}\" y=\"{F(im.Y)}\" width=\"{F(im.W)}\" height=\"{F(im.H)}\" preserveAspectRatio=\"none\" href=\"data:image/png;base64,{Convert.ToBase64String(im.Image.ToPng())}\"/>");
                    break;
            }
        }

        sb.Append("</svg>");
        return sb.ToString();
    }

    /// <summary>PNG bytes drawn with SkiaSharp (fontconfig's default sans-serif face for text).</summary>
    public byte[] ToPng(float scale = 1)
    {
        var w = (int)Math.Ceiling(Width * scale);
        var h = (int)Math.Ceiling(Height * scale);
        using var surface = SKSurface.Create(new SKImageInfo(w, h, SKColorType.Rgba8888, SKAlphaType.Premul));
        var canvas = surface.Canvas;
        canvas.Clear(SKColors.White);
        canvas.Scale(scale);
        using var typeface = SKTypeface.FromFamilyName("DejaVu Sans") ?? SKTypeface.Default;
        using var bold = SKTypeface.FromFamilyName("DejaVu Sans", SKFontStyle.Bold) ?? typeface;
        foreach (var item in items)
        {
            switch (item)
            {
                case DrawPoly p:
                    using (var path = new SKPath())
                    {
                        path.MoveTo((float)p.Points[0].X, (float)p.Points[0].Y);
                        foreach (var q in p.Points.Skip(1))
                        {
                            path.LineTo((float)q.X, (float)q.Y);
                        }

                        if (p.Closed)
                        {
                            path.Close();
                        }

                        Fill(canvas, p.Fill, paint => canvas.DrawPath(path, paint));
                        Stroke(canvas, p.Stroke, p.StrokeWidth, paint => canvas.DrawPath(path, paint));
                    }

                    break;
                case DrawCircle c:
                    Fill(canvas, c.Fill, paint => canvas.DrawCircle((float)c.X, (float)c.Y, (float)c.R, paint));
                    Stroke(canvas, c.Stroke, c.StrokeWidth, paint => canvas.DrawCircle((float)c.X, (float)c.Y, (float)c.R, paint));
                    break;
                case DrawRect r:
                    var rect = new SKRect((float)r.X, (float)r.Y, (float)(r.X + r.W), (float)(r.Y + r.H));
                    Fill(canvas, r.Fill, paint => canvas.DrawRect(rect, paint));
                    Stroke(canvas, r.Stroke, r.StrokeWidth, paint => canvas.DrawRect(rect, paint));
                    break;
                case DrawText t:
                    using (var font = new SKFont(t.Bold ? bold : typeface, (float)t.Size))
                    using (var paint = new SKPaint { Color = new SKColor(0x11, 0x11, 0x11), IsAntialias = true })
                    {
                        var align = t.Anchor switch { Anchor.Middle => SKTextAlign.Center, Anchor.End => SKTextAlign.Right, _ => SKTextAlign.Left };
                        canvas.DrawText(t.Text, (float)t.X, (float)t.Y, align, font, paint);
                    }

                    break;
                case DrawImage im:
                    using (var bitmap = new SKBitmap(new SKImageInfo(im.Image.Width, im.Image.Height, SKColorType.Rgba8888, SKAlphaType.Unpremul)))
                    {
                        System.Runtime.InteropServices.Marshal.Copy(im.Image.Pixels, 0, bitmap.GetPixels(), im.Image.Pixels.Length);
                        using var image = SKImage.FromBitmap(bitmap);
                        canvas.DrawImage(image, new SKRect((float)im.X, (float)im.Y, (float)(im.X + im.W), (float)(im.Y + im.H)), new SKSamplingOptions(SKFilterMode.Linear));
                    }

                    break;
            }
        }

        using var snapshot = surface.Snapshot();
        using var data = snapshot.Encode(SKEncodedImageFormat.Png, 100);
        return data.ToArray();
    }

    internal static string F(double v) => Math.Round(v, 2).ToString("0.##", CultureInfo.InvariantCulture);

    internal static string Esc(string s) => s.Replace("&", "&amp;", StringComparison.Ordinal).Replace("<", "&lt;", StringComparison.Ordinal)
        .Replace(">", "&gt;", StringComparison.Ordinal).Replace("\"", "&quot;", StringComparison.Ordinal);

    private static SKColor Colour(string hex) => SKColor.Parse(hex);

    private static void Fill(SKCanvas canvas, string? colour, Action<SKPaint> draw)
    {
        if (colour is null)
        {
            return;
        }

        using var paint = new SKPaint { Color = Colour(colour), Style = SKPaintStyle.Fill, IsAntialias = true };
        draw(paint);
    }

    private static void Stroke(SKCanvas canvas, string? colour, double width, Action<SKPaint> draw)
    {
        if (colour is null || width <= 0)
        {
            return;
        }

        using var paint = new SKPaint { Color = Colour(colour), Style = SKPaintStyle.Stroke, StrokeWidth = (float)width, IsAntialias = true, StrokeJoin = SKStrokeJoin.Round };
        draw(paint);
    }
}

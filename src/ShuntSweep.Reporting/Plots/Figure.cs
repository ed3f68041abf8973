using System.Globalization;
using System.Text;
using System.Text.RegularExpressions;
using ScottPlot;
using SkiaSharp;

namespace ShuntSweep.Reporting.Plots;

/// <summary>A finished plot: its file stem, caption, and its PNG and SVG renderings.</summary>
/// <param name="Name">The file stem under <c>plots/</c>, for example <c>drop-60mA</c>.</param>
/// <param name="Caption">What the plot shows, for the report.</param>
/// <param name="Png">The PNG bytes.</param>
/// <param name="Svg">The SVG document.</param>
internal sealed record RenderedPlot(string Name, string Caption, byte[] Png, string Svg);

/// <summary>Renders one or more ScottPlot plots stacked in one figure (a data panel over its residual panel), to PNG and SVG.</summary>
internal static partial class Figure
{
    /// <summary>The width every figure is drawn at, in pixels.</summary>
    public const int Width = 900;

    /// <summary>Renders <paramref name="panels"/> top to bottom; each panel's share of the height is its weight over the sum of weights.</summary>
    public static RenderedPlot Render(string name, string caption, int height, params (Plot Plot, float Weight)[] panels)
    {
        ArgumentNullException.ThrowIfNull(panels);
        var heights = Heights(height, panels);
        using var surface = SKSurface.Create(new SKImageInfo(Width, height));
        surface.Canvas.Clear(SKColors.White);
        var svg = new StringBuilder();
        svg.Append(CultureInfo.InvariantCulture, $"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{Width}\" height=\"{height}\" viewBox=\"0 0 {Width} {height}\">");
        var top = 0;
        for (var i = 0; i < panels.Length; i++)
        {
            var plot = panels[i].Plot;
            using (var bitmap = SKBitmap.Decode(plot.GetImageBytes(Width, heights[i], ImageFormat.Png)))
            {
                surface.Canvas.DrawBitmap(bitmap, 0, top);
            }

            svg.Append(CultureInfo.InvariantCulture, $"<g transform=\"translate(0 {top})\">").Append(Nestable(plot.GetSvgXml(Width, heights[i]), $"p{i}-")).Append("</g>");
            top += heights[i];
            plot.Dispose();
        }

        svg.Append("</svg>");
        using var image = surface.Snapshot();
        using var data = image.Encode(SKEncodedImageFormat.Png, 100);
        return new RenderedPlot(name, caption, data.ToArray(), svg.ToString());
    }

    /// <summary>A panel's SVG without its XML declaration and with its element ids prefixed, so panels nest in one document without id clashes.</summary>
    private static string Nestable(string svg, string prefix)
    {
        var open = svg.IndexOf("<svg", StringComparison.Ordinal);
        var body = open >= 0 ? svg[open..] : svg;
        body = IdAttribute().Replace(body, m => $"id=\"{prefix}{m.Groups[1].Value}\"");
        return body.Replace("url(#", $"url(#{prefix}", StringComparison.Ordinal).Replace("href=\"#", $"href=\"#{prefix}", StringComparison.Ordinal);
    }

    [GeneratedRegex("id=\"([^\"]+)\"")]
    private static partial Regex IdAttribute();

    private static int[] Heights(int height, (Plot Plot, float Weight)[] panels)
    {
        var total = panels.Sum(p => p.Weight);
        var heights = panels.Select(p => (int)Math.Round(height * p.Weight / total)).ToArray();
        heights[^1] = height - heights[..^1].Sum();
        return heights;
    }
}

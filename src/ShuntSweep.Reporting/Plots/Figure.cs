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

            // Drawn straight onto the figure's canvas: a PNG of the panel encoded and decoded again cost as much as the drawing.
            surface.Canvas.Save();
            surface.Canvas.Translate(0, top);
            surface.Canvas.ClipRect(new SKRect(0, 0, Width, heights[i]));
            plot.Render(surface.Canvas, Width, heights[i]);
            surface.Canvas.Restore();

            svg.Append(CultureInfo.InvariantCulture, $"<g transform=\"translate(0 {top})\">").Append(Nestable(plot.GetSvgXml(Width, heights[i]), $"p{i}-")).Append("</g>");
            top += heights[i];
            plot.Dispose();
        }

        svg.Append("</svg>");
        using var pixels = surface.PeekPixels() ?? throw new InvalidOperationException("A raster surface has no pixels to encode.");
        // One filter and zlib level 3: a third of the default encoder's time (all filters tried per row, level 6) for 3 % larger plots.
        using var data = pixels.Encode(new SKPngEncoderOptions(SKPngEncoderFilterFlags.Sub, 3)) ?? throw new InvalidOperationException("The PNG encoder failed.");
        return new RenderedPlot(name, caption, data.ToArray(), svg.ToString());
    }

    /// <summary>A panel's SVG without its XML declaration and with its element ids renamed <c>{prefix}{n}</c> in order of appearance, so panels
    /// nest in one document without id clashes and the file is the same whatever else was drawn before it (Skia numbers clip paths per process).</summary>
    private static string Nestable(string svg, string prefix)
    {
        var open = svg.IndexOf("<svg", StringComparison.Ordinal);
        var body = open >= 0 ? svg[open..] : svg;
        var names = new Dictionary<string, string>(StringComparer.Ordinal);
        body = IdAttribute().Replace(body, m => $"id=\"{Rename(m.Groups[1].Value)}\"");
        return IdReference().Replace(body, m => m.Groups[1].Success ? $"url(#{Rename(m.Groups[1].Value)})" : $"href=\"#{Rename(m.Groups[2].Value)}\"");

        string Rename(string id)
        {
            if (!names.TryGetValue(id, out var name))
            {
                name = prefix + names.Count.ToString(CultureInfo.InvariantCulture);
                names.Add(id, name);
            }

            return name;
        }
    }

    [GeneratedRegex("id=\"([^\"]+)\"")]
    private static partial Regex IdAttribute();

    [GeneratedRegex("url\\(#([^)]+)\\)|href=\"#([^\"]+)\"")]
    private static partial Regex IdReference();

    private static int[] Heights(int height, (Plot Plot, float Weight)[] panels)
    {
        var total = panels.Sum(p => p.Weight);
        var heights = panels.Select(p => (int)Math.Round(height * p.Weight / total)).ToArray();
        heights[^1] = height - heights[..^1].Sum();
        return heights;
    }
}

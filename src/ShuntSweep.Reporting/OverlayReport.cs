using ShuntSweep.Core.Records;
using ShuntSweep.Reporting.Comparison;
using ShuntSweep.Reporting.Html;
using ShuntSweep.Reporting.Plots;

namespace ShuntSweep.Reporting;

/// <summary>Writes the overlay of two or more results into a folder: <c>overlay.html</c> (one self-contained file) and its plots under <c>plots/</c>.</summary>
public static class OverlayReport
{
    /// <summary>The page's file name inside the folder.</summary>
    public const string FileName = "overlay.html";

    /// <summary>Compares <paramref name="entries"/> against the first, writes the page and plots into <paramref name="folder"/>, and returns the page's path and the differences.</summary>
    public static (string Path, IReadOnlyList<RangeDifference> Differences) Write(IReadOnlyList<OverlayEntry> entries, string folder, TimeProvider? time = null)
    {
        ArgumentNullException.ThrowIfNull(entries);
        ArgumentNullException.ThrowIfNull(folder);
        var differences = ResultOverlay.Compare(entries);
        var plots = OverlayPlots.Render(entries, differences);
        var plotDir = System.IO.Path.Combine(folder, RunReport.PlotsFolder);
        Directory.CreateDirectory(plotDir);
        foreach (var p in plots)
        {
            File.WriteAllBytes(System.IO.Path.Combine(plotDir, p.Name + ".png"), p.Png);
            File.WriteAllText(System.IO.Path.Combine(plotDir, p.Name + ".svg"), p.Svg);
        }

        var software = SoftwareIdentity.Describe;
        var path = System.IO.Path.GetFullPath(System.IO.Path.Combine(folder, FileName));
        File.WriteAllText(path, OverlayHtml.Build(entries, differences, plots, (time ?? TimeProvider.System).GetUtcNow(), software));
        return (path, differences);
    }
}

using ShuntSweep.Core.Records;
using ShuntSweep.Reporting.Html;
using ShuntSweep.Reporting.Plots;

namespace ShuntSweep.Reporting;

/// <summary>Writes the report of a run directory: <c>report.html</c> (one self-contained file) and every plot as PNG and SVG under <c>plots/</c>.</summary>
public static class RunReport
{
    /// <summary>The report's file name inside a run directory.</summary>
    public const string FileName = "report.html";

    /// <summary>The folder, inside a run directory, that receives the plots.</summary>
    public const string PlotsFolder = "plots";

    /// <summary>The folder, inside a run directory, that receives the points and fitted curves as CSV.</summary>
    public const string ExportFolder = "export";

    /// <summary>Writes the report of the run in <paramref name="runDirectory"/> and returns the full path of <c>report.html</c>.</summary>
    /// <param name="runDirectory">A run directory holding at least <c>result.json</c>.</param>
    /// <param name="time">The clock that dates the report; the system clock when null.</param>
    /// <param name="showPaths">Whether the report names files with their folders and the run directory; off for reports that must not differ
    /// between machines.</param>
    /// <exception cref="DirectoryNotFoundException">When the directory does not exist.</exception>
    /// <exception cref="FileNotFoundException">When it has no <c>result.json</c>.</exception>
    /// <exception cref="InvalidDataException">When a record in it is malformed (the message names the file and position).</exception>
    public static string Write(string runDirectory, TimeProvider? time = null, bool showPaths = true)
    {
        ArgumentNullException.ThrowIfNull(runDirectory);
        var run = RunRecords.Load(runDirectory);
        var plots = RunPlots.Render(run);
        var plotDir = Path.Combine(run.Directory, PlotsFolder);
        Directory.CreateDirectory(plotDir);
        foreach (var p in plots)
        {
            File.WriteAllBytes(Path.Combine(plotDir, p.Name + ".png"), p.Png);
            File.WriteAllText(Path.Combine(plotDir, p.Name + ".svg"), p.Svg);
        }

        Export.ResultCsv.Write(run.Result, Path.Combine(run.Directory, ExportFolder));
        var html = ReportHtml.Build(run, plots, (time ?? TimeProvider.System).GetUtcNow(), SoftwareIdentity.Describe, showPaths);
        var path = Path.Combine(run.Directory, FileName);
        File.WriteAllText(path + ".tmp", html);
        File.Move(path + ".tmp", path, overwrite: true);
        return path;
    }
}

using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Reporting.Tests.Support;

/// <summary>A fresh copy of the invented demo run directory (Fixtures/demo-run), with result.json fitted from its journal by the real analysis.</summary>
internal sealed class DemoRun : IDisposable
{
    private DemoRun(string directory, CharacterisationResult result)
    {
        Directory = directory;
        Result = result;
    }

    /// <summary>The run directory.</summary>
    public string Directory { get; }

    /// <summary>The result written to its result.json.</summary>
    public CharacterisationResult Result { get; }

    /// <summary>Copies the fixture to a new temporary folder and fits it; <paramref name="start"/> moves the run's start time,
    /// <paramref name="result"/> replaces the fit (to archive several runs without fitting each).</summary>
    public static DemoRun Create(DateTimeOffset? start = null, CharacterisationResult? result = null)
    {
        var dir = Path.Combine(Path.GetTempPath(), "shuntsweep-report-tests", Guid.NewGuid().ToString("N"));
        System.IO.Directory.CreateDirectory(dir);
        foreach (var file in System.IO.Directory.GetFiles(Path.Combine(AppContext.BaseDirectory, "Fixtures", "demo-run")))
        {
            File.Copy(file, Path.Combine(dir, Path.GetFileName(file)));
        }

        if (start is { } s)
        {
            (RunManifest.Read(dir) with { Start = s }).Write(dir);
        }

        result ??= Characteriser.Analyse(JournalCsv.Read(Path.Combine(dir, "journal.csv")).Samples, BenchReader.Load(Path.Combine(dir, "bench.yaml")).Uut);

        ResultJson.Write(result, Path.Combine(dir, "result.json"));
        return new DemoRun(dir, result);
    }

    /// <summary>The result with every range's resistance scaled by <paramref name="factor"/>.</summary>
    public static CharacterisationResult ScaleResistance(CharacterisationResult result, double factor) =>
        result with { Ranges = result.Ranges.Select(r => r with { ResistanceOhms = r.ResistanceOhms with { Value = r.ResistanceOhms.Value * factor } }).ToList() };

    public void Dispose()
    {
        try
        {
            System.IO.Directory.Delete(Directory, recursive: true);
        }
        catch (IOException)
        {
            // A file still open by a browser that is shutting down; the temp folder is cleaned later.
        }
    }
}

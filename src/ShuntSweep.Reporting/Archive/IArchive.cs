namespace ShuntSweep.Reporting.Archive;

/// <summary>The results archive: every run recorded by UUT serial, and the history of a serial read back.</summary>
/// <remarks>Implementations are safe to use from one caller at a time; several benches may share one PostgreSQL archive.</remarks>
public interface IArchive : IAsyncDisposable
{
    /// <summary>Records (or re-records, replacing the earlier copy) the run in <paramref name="runDirectory"/>: its manifest, result and per-range values.</summary>
    /// <exception cref="FileNotFoundException">When the directory lacks <c>manifest.json</c> or <c>result.json</c>.</exception>
    Task<ArchivedRun> RecordRunAsync(string runDirectory, CancellationToken cancellationToken = default);

    /// <summary>Every archived run of the UUT with serial <paramref name="serial"/>, oldest first, and each range's resistance over those runs.</summary>
    Task<RunHistory> HistoryAsync(string serial, CancellationToken cancellationToken = default);
}

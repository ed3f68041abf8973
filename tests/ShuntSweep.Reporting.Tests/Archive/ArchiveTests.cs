using System.Text.Json;
using Microsoft.Data.Sqlite;
using Npgsql;
using ShuntSweep.Reporting.Archive;
using ShuntSweep.Reporting.Tests.Support;

namespace ShuntSweep.Reporting.Tests.Archive;

public sealed class ArchiveTests
{
    private const string PostgresVariable = "SHUNTSWEEP_TEST_POSTGRES";
    private static readonly DateTimeOffset First = new(2026, 3, 14, 9, 0, 0, TimeSpan.Zero);

    [Fact]
    public async Task Open_FreshSqliteFile_AppliesEveryMigrationInOrder()
    {
        using var db = new TempSqlite();
        await using var archive = (SqlArchive)await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        Assert.Equal(Migrations.All.Select(m => m.Version), await archive.AppliedVersionsAsync(TestContext.Current.CancellationToken));
        Assert.Equal([1, 2, 3], Migrations.All.Select(m => m.Version));
    }

    [Fact]
    public async Task Open_ArchiveAtVersion1_MigratesForwardAndKeepsItsRows()
    {
        using var db = new TempSqlite();
        await using (var connection = new SqliteConnection(db.Location.ConnectionString))
        {
            await connection.OpenAsync(TestContext.Current.CancellationToken);
            foreach (var sql in new[] { Migrations.VersionTable }.Concat(Migrations.All[0].Statements))
            {
                await using var cmd = connection.CreateCommand();
                cmd.CommandText = sql;
                await cmd.ExecuteNonQueryAsync(TestContext.Current.CancellationToken);
            }

            await using var insert = connection.CreateCommand();
            insert.CommandText = "INSERT INTO schema_version VALUES (1, 'runs', '2026-01-01T00:00:00Z')";
            await insert.ExecuteNonQueryAsync(TestContext.Current.CancellationToken);
        }

        await using var archive = (SqlArchive)await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        Assert.Equal([1, 2, 3], await archive.AppliedVersionsAsync(TestContext.Current.CancellationToken));
        using var run = DemoRun.Create();
        await archive.RecordRunAsync(run.Directory, TestContext.Current.CancellationToken);
        Assert.Single((await archive.HistoryAsync("TW18-240417", TestContext.Current.CancellationToken)).Runs);
    }

    [Fact]
    public async Task Open_Twice_AppliesNoMigrationTwice()
    {
        using var db = new TempSqlite();
        await (await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken)).DisposeAsync();
        await using var archive = (SqlArchive)await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        Assert.Equal([1, 2, 3], await archive.AppliedVersionsAsync(TestContext.Current.CancellationToken));
    }

    [Fact]
    public async Task RecordRun_SameRunTwice_KeepsOneCopy()
    {
        using var db = new TempSqlite();
        using var run = DemoRun.Create();
        await using var archive = await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        var a = await archive.RecordRunAsync(run.Directory, TestContext.Current.CancellationToken);
        var b = await archive.RecordRunAsync(run.Directory, TestContext.Current.CancellationToken);
        Assert.Equal(a.RunId, b.RunId);
        var history = await archive.HistoryAsync("TW18-240417", TestContext.Current.CancellationToken);
        Assert.Single(history.Runs);
        Assert.All(history.Ranges, r => Assert.Single(r.Readings));
    }

    [Fact]
    public async Task RecordRun_WithoutManifest_SaysWhatIsMissing()
    {
        using var db = new TempSqlite();
        using var run = DemoRun.Create();
        File.Delete(Path.Combine(run.Directory, "manifest.json"));
        await using var archive = await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        var e = await Assert.ThrowsAsync<FileNotFoundException>(() => archive.RecordRunAsync(run.Directory, TestContext.Current.CancellationToken));
        Assert.Contains("manifest.json", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task History_ListsRunsOldestFirst_WithEachRangesResistanceFromItsResult()
    {
        using var db = new TempSqlite();
        await using var archive = await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        var runs = await RecordThreeRunsAsync(archive);
        var history = await archive.HistoryAsync("TW18-240417", TestContext.Current.CancellationToken);
        Assert.Equal([First, First.AddDays(30), First.AddDays(60)], history.Runs.Select(r => r.Start));
        Assert.Equal(["60mA", "10A"], history.Ranges.Select(r => r.Range));
        var tenAmp = history.Ranges.Single(r => r.Range == "10A");
        Assert.Equal(runs.Select(r => r.Result.Range("10A").ResistanceOhms.Value), tenAmp.Readings.Select(r => r.ResistanceOhms));
        Assert.Equal("Completed", history.Runs[0].RunEnd);
        Assert.Empty((await archive.HistoryAsync("NO-SUCH-SERIAL", TestContext.Current.CancellationToken)).Runs);
        foreach (var r in runs)
        {
            r.Dispose();
        }
    }

    [Fact]
    public async Task Drift_FlagsOnlyTheRunThatMovedBeyondTheLimit()
    {
        using var db = new TempSqlite();
        await using var archive = await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
        var runs = await RecordThreeRunsAsync(archive);
        var history = await archive.HistoryAsync("TW18-240417", TestContext.Current.CancellationToken);
        var tenAmp = history.Ranges.Single(r => r.Range == "10A");

        var at1Percent = Drift.Assess(tenAmp, DriftLimit.Parse("1%"));
        Assert.Equal([false, false, true], at1Percent.Select(p => p.BeyondLimit)); // the third run was moved +2 %
        Assert.Equal(0.02, at1Percent[2].ChangeFraction, 1e-12);
        Assert.All(Drift.Assess(tenAmp, DriftLimit.Parse("5%")), p => Assert.False(p.BeyondLimit));
        var absolute = DriftLimit.Parse("0.5 mohm");
        Assert.Equal(0.5e-3, absolute.AbsoluteOhms!.Value, 1e-15);
        foreach (var r in runs)
        {
            r.Dispose();
        }
    }

    [Fact]
    public async Task History_IsTheSameOnPostgreSqlAsOnSqlite()
    {
        var server = Environment.GetEnvironmentVariable(PostgresVariable);
        if (string.IsNullOrEmpty(server))
        {
            Assert.Skip($"{PostgresVariable} is not set: no PostgreSQL server to test against (.ci/run starts one and sets it).");
        }

        var schema = $"t_{Guid.NewGuid():N}";
        await using (var admin = new NpgsqlConnection(server))
        {
            await admin.OpenAsync(TestContext.Current.CancellationToken);
            await using var create = new NpgsqlCommand($"CREATE SCHEMA {schema}", admin);
            await create.ExecuteNonQueryAsync(TestContext.Current.CancellationToken);
        }

        try
        {
            var pg = ArchiveLocation.Resolve($"{server};Search Path={schema}");
            Assert.Equal(ArchiveKind.PostgreSql, pg.Kind);
            using var db = new TempSqlite();
            await using var onSqlite = await db.Location.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
            await using var onPostgres = await pg.OpenAsync(cancellationToken: TestContext.Current.CancellationToken);
            Assert.Equal([1, 2, 3], await ((SqlArchive)onPostgres).AppliedVersionsAsync(TestContext.Current.CancellationToken));
            var runs = await RecordThreeRunsAsync(onSqlite);
            foreach (var r in runs)
            {
                await onPostgres.RecordRunAsync(r.Directory, TestContext.Current.CancellationToken);
            }

            var a = JsonSerializer.Serialize(await onSqlite.HistoryAsync("TW18-240417", TestContext.Current.CancellationToken));
            var b = JsonSerializer.Serialize(await onPostgres.HistoryAsync("TW18-240417", TestContext.Current.CancellationToken));
            Assert.Equal(a, b);
            Assert.Contains("\"Readings\"", a, StringComparison.Ordinal);
            foreach (var r in runs)
            {
                r.Dispose();
            }
        }
        finally
        {
            await using var admin = new NpgsqlConnection(server);
            await admin.OpenAsync(TestContext.Current.CancellationToken);
            await using var drop = new NpgsqlCommand($"DROP SCHEMA {schema} CASCADE", admin);
            await drop.ExecuteNonQueryAsync(TestContext.Current.CancellationToken);
        }
    }

    [Fact]
    public void Resolve_ChoosesTheDatabaseFromOptionThenEnvironmentThenDefault()
    {
        var pg = ArchiveLocation.Resolve("Host=db.lab.invalid;Username=u;Password=secret;Database=archive", _ => null);
        Assert.Equal(ArchiveKind.PostgreSql, pg.Kind);
        Assert.DoesNotContain("secret", pg.Display, StringComparison.Ordinal);

        var file = ArchiveLocation.Resolve("lab/archive.db", _ => "Host=ignored");
        Assert.Equal(ArchiveKind.Sqlite, file.Kind);
        Assert.Contains(Path.GetFullPath("lab/archive.db"), file.ConnectionString, StringComparison.Ordinal);

        var fromEnvironment = ArchiveLocation.Resolve(null, name => name == ArchiveLocation.EnvironmentVariable ? "Server=pg.lab.invalid;Database=a" : null);
        Assert.Equal(ArchiveKind.PostgreSql, fromEnvironment.Kind);

        var fallback = ArchiveLocation.Resolve(null, _ => null);
        Assert.Equal(ArchiveKind.Sqlite, fallback.Kind);
        Assert.Contains(ArchiveLocation.DefaultSqlitePath, fallback.ConnectionString, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("")]
    [InlineData("-1%")]
    [InlineData("fast")]
    [InlineData("2 V")]
    [InlineData("2")]
    public void DriftLimit_Parse_RejectsWhatIsNotAPercentageOrResistance_AndABareNumber(string text) =>
        Assert.Throws<FormatException>(() => DriftLimit.Parse(text));

    /// <summary>Three runs of the demo UUT a month apart; the third has every resistance moved up by 2 %.</summary>
    private static async Task<List<DemoRun>> RecordThreeRunsAsync(IArchive archive)
    {
        var baseline = DemoRun.Create(First);
        var runs = new List<DemoRun>
        {
            baseline,
            DemoRun.Create(First.AddDays(30), baseline.Result),
            DemoRun.Create(First.AddDays(60), DemoRun.ScaleResistance(baseline.Result, 1.02)),
        };

        // Recorded out of order: history sorts by start, not by arrival.
        foreach (var r in new[] { runs[2], runs[0], runs[1] })
        {
            await archive.RecordRunAsync(r.Directory, TestContext.Current.CancellationToken);
        }

        return runs;
    }

    private sealed class TempSqlite : IDisposable
    {
        private readonly string _path = Path.Combine(Path.GetTempPath(), "shuntsweep-archive-tests", Guid.NewGuid().ToString("N"), "archive.db");

        public TempSqlite() => Directory.CreateDirectory(Path.GetDirectoryName(_path)!);

        public ArchiveLocation Location => ArchiveLocation.Resolve(_path, _ => null);

        public void Dispose()
        {
            SqliteConnection.ClearAllPools();
            Directory.Delete(Path.GetDirectoryName(_path)!, recursive: true);
        }
    }
}

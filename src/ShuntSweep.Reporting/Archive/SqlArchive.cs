using System.Data.Common;
using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using Microsoft.Data.Sqlite;
using Npgsql;
using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Reporting.Archive;

/// <summary>The archive on SQLite or PostgreSQL: one schema, plain SQL both accept, named parameters, timestamps as sortable UTC text.</summary>
internal sealed class SqlArchive(ArchiveLocation location, TimeProvider time) : IArchive
{
    private readonly ArchiveLocation _location = location;
    private readonly TimeProvider _time = time;

    /// <summary>The schema version this build writes.</summary>
    public static int CurrentVersion => Migrations.All[^1].Version;

    /// <summary>Creates the version table and applies, in order and each in its own transaction, every migration the database lacks.</summary>
    public async Task MigrateAsync(CancellationToken ct)
    {
        await using var connection = await OpenAsync(ct).ConfigureAwait(false);
        await ExecuteAsync(connection, null, Migrations.VersionTable, ct).ConfigureAwait(false);
        foreach (var migration in Migrations.All)
        {
            await using var tx = await connection.BeginTransactionAsync(ct).ConfigureAwait(false);
            if (_location.Kind == ArchiveKind.PostgreSql)
            {
                // Two benches opening a shared archive at once: the second waits, then sees the migration applied.
                await ExecuteAsync(connection, tx, "LOCK TABLE schema_version IN EXCLUSIVE MODE", ct).ConfigureAwait(false);
            }

            var applied = await ScalarAsync(connection, tx, "SELECT COUNT(*) FROM schema_version WHERE version = @v", ct, ("v", migration.Version)).ConfigureAwait(false);
            if (Convert.ToInt64(applied, CultureInfo.InvariantCulture) > 0)
            {
                await tx.CommitAsync(ct).ConfigureAwait(false);
                continue;
            }

            foreach (var statement in migration.Statements)
            {
                await ExecuteAsync(connection, tx, statement, ct).ConfigureAwait(false);
            }

            await ExecuteAsync(connection, tx, "INSERT INTO schema_version (version, description, applied_at) VALUES (@v, @d, @t)", ct,
                ("v", migration.Version), ("d", migration.Description), ("t", Timestamp(_time.GetUtcNow()))).ConfigureAwait(false);
            await tx.CommitAsync(ct).ConfigureAwait(false);
        }
    }

    /// <summary>The schema versions applied, in order.</summary>
    public async Task<IReadOnlyList<int>> AppliedVersionsAsync(CancellationToken ct)
    {
        await using var connection = await OpenAsync(ct).ConfigureAwait(false);
        await using var cmd = Command(connection, null, "SELECT version FROM schema_version ORDER BY version");
        await using var reader = await cmd.ExecuteReaderAsync(ct).ConfigureAwait(false);
        var versions = new List<int>();
        while (await reader.ReadAsync(ct).ConfigureAwait(false))
        {
            versions.Add(Convert.ToInt32(reader.GetValue(0), CultureInfo.InvariantCulture));
        }

        return versions;
    }

    /// <inheritdoc />
    public async Task<ArchivedRun> RecordRunAsync(string runDirectory, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(runDirectory);
        var dir = Path.GetFullPath(runDirectory);
        if (!File.Exists(Path.Combine(dir, RunManifest.FileName)))
        {
            throw new FileNotFoundException($"'{dir}' has no {RunManifest.FileName}: a run can only be archived with the UUT identity it records.", Path.Combine(dir, RunManifest.FileName));
        }

        var manifest = RunManifest.Read(dir);
        var resultPath = Path.Combine(dir, RunRecords.ResultFile);
        var events = RunEvent.ReadAll(Path.Combine(dir, RunRecords.EventsFile));
        var runEnd = events.LastOrDefault(e => e.Name == "run-end")?.Field("end") ?? (events.Count > 0 ? RunEndWords.CutOff : null);
        var result = ResultJson.Read(resultPath);
        if (result.RunEnd is null && runEnd is not null)
        {
            // A result fitted before the run's end was recorded in it still takes the end from the event log: a stopped run is never archived as a pass.
            result = result with { RunEnd = runEnd };
        }

        var verdict = Verdicts.Token(result.Verdict);
        var runId = RunId(manifest);
        var ct = cancellationToken;

        await using var connection = await OpenAsync(ct).ConfigureAwait(false);
        await using var tx = await connection.BeginTransactionAsync(ct).ConfigureAwait(false);
        await ExecuteAsync(connection, tx, "DELETE FROM range_results WHERE run_id = @id", ct, ("id", runId)).ConfigureAwait(false);
        await ExecuteAsync(connection, tx, "DELETE FROM runs WHERE run_id = @id", ct, ("id", runId)).ConfigureAwait(false);
        await ExecuteAsync(connection, tx, """
            INSERT INTO runs (run_id, uut_serial, uut_manufacturer, uut_model, uut_asset_id, bench_name, started_at, simulated, seed, software,
                sequence_file, sequence_sha256, bench_file, bench_sha256, manifest_json, result_json, recorded_at, source_directory, run_end, verdict)
            VALUES (@id, @serial, @maker, @model, @asset, @bench, @start, @sim, @seed, @software,
                @seqFile, @seqSha, @benchFile, @benchSha, @manifest, @result, @recorded, @dir, @end, @verdict)
            """, ct,
            ("id", runId), ("serial", manifest.UutSerial), ("maker", manifest.UutManufacturer), ("model", manifest.UutModel), ("asset", manifest.UutAssetId),
            ("bench", manifest.BenchName), ("start", Timestamp(manifest.Start)), ("sim", manifest.Simulated ? 1 : 0), ("seed", manifest.Seed), ("software", manifest.Software),
            ("seqFile", manifest.SequenceFile), ("seqSha", manifest.SequenceSha256), ("benchFile", manifest.BenchFile), ("benchSha", manifest.BenchSha256),
            ("manifest", File.ReadAllText(Path.Combine(dir, RunManifest.FileName))), ("result", File.ReadAllText(resultPath)),
            ("recorded", Timestamp(_time.GetUtcNow())), ("dir", dir), ("end", runEnd), ("verdict", verdict)).ConfigureAwait(false);
        for (var i = 0; i < result.Ranges.Count; i++)
        {
            var r = result.Ranges[i];
            await ExecuteAsync(connection, tx, """
                INSERT INTO range_results (run_id, range_name, position, jack, model, full_scale_a, resistance_ohms, resistance_u_ohms, offset_volts, burden_fs_volts, verdict)
                VALUES (@id, @range, @pos, @jack, @model, @fs, @r, @ur, @offset, @burden, @verdict)
                """, ct,
                ("id", runId), ("range", r.Name), ("pos", i), ("jack", r.Jack), ("model", r.Model), ("fs", r.FullScaleA), ("r", r.ResistanceOhms.Value),
                ("ur", r.ResistanceOhms.StandardUncertainty), ("offset", r.OffsetVolts.Value), ("burden", r.BurdenAtFullScaleVolts),
                ("verdict", Verdicts.Token(Verdicts.Of(result, r)))).ConfigureAwait(false);
        }

        await tx.CommitAsync(ct).ConfigureAwait(false);
        return new ArchivedRun(runId, manifest.Start, manifest.UutManufacturer, manifest.UutModel, manifest.UutSerial, manifest.UutAssetId, manifest.BenchName, manifest.Simulated, runEnd, verdict, manifest.Context?.Condition);
    }

    /// <inheritdoc />
    public async Task<RunHistory> HistoryAsync(string serial, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(serial);
        var ct = cancellationToken;
        await using var connection = await OpenAsync(ct).ConfigureAwait(false);
        var runs = new List<ArchivedRun>();
        await using (var cmd = Command(connection, null, """
            SELECT run_id, started_at, uut_manufacturer, uut_model, uut_serial, uut_asset_id, bench_name, simulated, run_end, verdict, manifest_json
            FROM runs WHERE uut_serial = @serial
            """, ("serial", serial)))
        await using (var reader = await cmd.ExecuteReaderAsync(ct).ConfigureAwait(false))
        {
            while (await reader.ReadAsync(ct).ConfigureAwait(false))
            {
                runs.Add(new ArchivedRun(
                    reader.GetString(0), ParseTimestamp(reader.GetString(1)), reader.GetString(2), reader.GetString(3), reader.GetString(4),
                    Text(reader, 5), reader.GetString(6), Convert.ToInt64(reader.GetValue(7), CultureInfo.InvariantCulture) != 0, Text(reader, 8), Text(reader, 9),
                    ConditionOf(Text(reader, 10))));
            }
        }

        runs.Sort((a, b) => a.Start != b.Start ? a.Start.CompareTo(b.Start) : string.CompareOrdinal(a.RunId, b.RunId));
        var order = runs.Select((r, i) => (r.RunId, i)).ToDictionary(x => x.RunId, x => x.i, StringComparer.Ordinal);
        var rows = new List<(string RunId, string Range, int Position, string Jack, string Model, double R, double U)>();
        await using (var cmd = Command(connection, null, """
            SELECT rr.run_id, rr.range_name, rr.position, rr.jack, rr.model, rr.resistance_ohms, rr.resistance_u_ohms
            FROM range_results rr JOIN runs r ON r.run_id = rr.run_id WHERE r.uut_serial = @serial
            """, ("serial", serial)))
        await using (var reader = await cmd.ExecuteReaderAsync(ct).ConfigureAwait(false))
        {
            while (await reader.ReadAsync(ct).ConfigureAwait(false))
            {
                rows.Add((reader.GetString(0), reader.GetString(1), Convert.ToInt32(reader.GetValue(2), CultureInfo.InvariantCulture), reader.GetString(3), reader.GetString(4), Number(reader, 5), Number(reader, 6)));
            }
        }

        var ranges = rows
            .GroupBy(x => x.Range, StringComparer.Ordinal)
            .Select(g => (First: g.Min(x => (order[x.RunId], x.Position)), History: new RangeHistory(
                g.Key,
                g.OrderBy(x => order[x.RunId]).Last().Jack,
                g.OrderBy(x => order[x.RunId]).Select(x => new RangeReading(x.RunId, runs[order[x.RunId]].Start, x.Model, x.R, x.U)).ToList())))
            .OrderBy(x => x.First)
            .ThenBy(x => x.History.Range, StringComparer.Ordinal)
            .Select(x => x.History)
            .ToList();
        return new RunHistory(serial, runs, ranges);
    }

    /// <summary>The as-found / as-left condition the run's stored manifest records (null for older manifests and runs without one).</summary>
    private static string? ConditionOf(string? manifestJson)
    {
        if (manifestJson is null)
        {
            return null;
        }

        try
        {
            using var doc = System.Text.Json.JsonDocument.Parse(manifestJson);
            return doc.RootElement.TryGetProperty("context", out var context) && context.ValueKind == System.Text.Json.JsonValueKind.Object
                && context.TryGetProperty("condition", out var condition) && condition.ValueKind == System.Text.Json.JsonValueKind.String
                ? condition.GetString()
                : null;
        }
        catch (System.Text.Json.JsonException)
        {
            return null;
        }
    }

    /// <inheritdoc />
    public ValueTask DisposeAsync() => ValueTask.CompletedTask;

    /// <summary>The stable id of a run: the same UUT, start, sequence, bench and seed give the same id, so re-recording replaces.</summary>
    internal static string RunId(RunManifest manifest)
    {
        var key = string.Join('\n', manifest.UutSerial, Timestamp(manifest.Start), manifest.SequenceSha256, manifest.BenchSha256, manifest.Seed.ToString(CultureInfo.InvariantCulture));
        return Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(key)))[..24];
    }

    private async Task<DbConnection> OpenAsync(CancellationToken ct)
    {
        DbConnection connection;
        if (_location.Kind == ArchiveKind.PostgreSql)
        {
            connection = new NpgsqlConnection(_location.ConnectionString);
        }
        else
        {
            var file = new SqliteConnectionStringBuilder(_location.ConnectionString).DataSource;
            if (!string.IsNullOrEmpty(file) && file != ":memory:" && Path.GetDirectoryName(Path.GetFullPath(file)) is { Length: > 0 } folder)
            {
                Directory.CreateDirectory(folder);
            }

            connection = new SqliteConnection(_location.ConnectionString);
        }

        await connection.OpenAsync(ct).ConfigureAwait(false);
        return connection;
    }

    private static DbCommand Command(DbConnection connection, DbTransaction? tx, string sql, params (string Name, object? Value)[] parameters)
    {
        var cmd = connection.CreateCommand();
        cmd.Transaction = tx;
#pragma warning disable CA2100 // The SQL is our own constant text; every value goes in as a parameter.
        cmd.CommandText = sql;
#pragma warning restore CA2100
        foreach (var (name, value) in parameters)
        {
            var p = cmd.CreateParameter();
            p.ParameterName = name;
            p.Value = value switch
            {
                null => DBNull.Value,
                double d when !double.IsFinite(d) => DBNull.Value,
                _ => value,
            };
            cmd.Parameters.Add(p);
        }

        return cmd;
    }

    private static async Task ExecuteAsync(DbConnection connection, DbTransaction? tx, string sql, CancellationToken ct, params (string Name, object? Value)[] parameters)
    {
        await using var cmd = Command(connection, tx, sql, parameters);
        await cmd.ExecuteNonQueryAsync(ct).ConfigureAwait(false);
    }

    private static async Task<object?> ScalarAsync(DbConnection connection, DbTransaction? tx, string sql, CancellationToken ct, params (string Name, object? Value)[] parameters)
    {
        await using var cmd = Command(connection, tx, sql, parameters);
        return await cmd.ExecuteScalarAsync(ct).ConfigureAwait(false);
    }

    private static string Timestamp(DateTimeOffset t) => t.ToUniversalTime().ToString("yyyy-MM-dd'T'HH:mm:ss.fffffff'Z'", CultureInfo.InvariantCulture);

    private static DateTimeOffset ParseTimestamp(string text) => DateTimeOffset.Parse(text, CultureInfo.InvariantCulture, DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal);

    private static string? Text(DbDataReader reader, int i) => reader.IsDBNull(i) ? null : reader.GetString(i);

    private static double Number(DbDataReader reader, int i) => reader.IsDBNull(i) ? double.NaN : Convert.ToDouble(reader.GetValue(i), CultureInfo.InvariantCulture);
}

namespace ShuntSweep.Reporting.Archive;

/// <summary>One schema change: its version number, what it does, and the statements that do it (plain SQL both SQLite and PostgreSQL accept).</summary>
/// <param name="Version">The schema version after the migration; versions are applied in increasing order, each once.</param>
/// <param name="Description">What the migration changes, stored in the version table.</param>
/// <param name="Statements">The SQL statements, run in one transaction.</param>
internal sealed record Migration(int Version, string Description, IReadOnlyList<string> Statements);

/// <summary>The archive's schema as an ordered list of migrations; add a new one at the end, never edit one that has shipped.</summary>
/// <remarks>Numbers that may be NaN are nullable columns: SQLite stores NaN as NULL, so both databases store it that way.</remarks>
internal static class Migrations
{
    /// <summary>The version table every archive has; it records which migrations were applied.</summary>
    public const string VersionTable = """
        CREATE TABLE IF NOT EXISTS schema_version (
            version INTEGER PRIMARY KEY,
            description TEXT NOT NULL,
            applied_at TEXT NOT NULL)
        """;

    /// <summary>Every migration, oldest first.</summary>
    public static IReadOnlyList<Migration> All { get; } =
    [
        new(1, "runs: one row per recorded run with the UUT identity, manifest and result",
        [
            """
            CREATE TABLE runs (
                run_id TEXT PRIMARY KEY,
                uut_serial TEXT NOT NULL,
                uut_manufacturer TEXT NOT NULL,
                uut_model TEXT NOT NULL,
                uut_asset_id TEXT NULL,
                bench_name TEXT NOT NULL,
                started_at TEXT NOT NULL,
                simulated INTEGER NOT NULL,
                seed INTEGER NOT NULL,
                software TEXT NOT NULL,
                sequence_file TEXT NOT NULL,
                sequence_sha256 TEXT NOT NULL,
                bench_file TEXT NOT NULL,
                bench_sha256 TEXT NOT NULL,
                manifest_json TEXT NOT NULL,
                result_json TEXT NOT NULL,
                recorded_at TEXT NOT NULL,
                source_directory TEXT NOT NULL)
            """,
            "CREATE INDEX runs_by_serial ON runs (uut_serial, started_at)",
        ]),
        new(2, "range_results: each range's model, resistance, offset and burden per run, for history and drift",
        [
            """
            CREATE TABLE range_results (
                run_id TEXT NOT NULL REFERENCES runs (run_id) ON DELETE CASCADE,
                range_name TEXT NOT NULL,
                position INTEGER NOT NULL,
                jack TEXT NOT NULL,
                model TEXT NOT NULL,
                full_scale_a DOUBLE PRECISION NULL,
                resistance_ohms DOUBLE PRECISION NULL,
                resistance_u_ohms DOUBLE PRECISION NULL,
                offset_volts DOUBLE PRECISION NULL,
                burden_fs_volts DOUBLE PRECISION NULL,
                verdict TEXT NULL,
                PRIMARY KEY (run_id, range_name))
            """,
        ]),
        new(3, "runs: how the run ended and the UUT's worst verdict",
        [
            "ALTER TABLE runs ADD COLUMN run_end TEXT NULL",
            "ALTER TABLE runs ADD COLUMN verdict TEXT NULL",
        ]),
    ];
}

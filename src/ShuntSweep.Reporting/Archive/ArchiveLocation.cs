using Microsoft.Data.Sqlite;
using Npgsql;

namespace ShuntSweep.Reporting.Archive;

/// <summary>The database an archive lives in.</summary>
public enum ArchiveKind
{
    /// <summary>An embedded SQLite file (the default).</summary>
    Sqlite,

    /// <summary>A PostgreSQL server, for benches that share one archive.</summary>
    PostgreSql,
}

/// <summary>Where the archive is: an SQLite file by default, or a PostgreSQL server chosen by a connection string.</summary>
/// <param name="Kind">Which database.</param>
/// <param name="ConnectionString">The ADO.NET connection string.</param>
/// <param name="Display">The location for people, without a password.</param>
public sealed record ArchiveLocation(ArchiveKind Kind, string ConnectionString, string Display)
{
    /// <summary>The environment variable that names the archive when no option does.</summary>
    public const string EnvironmentVariable = "SHUNTSWEEP_ARCHIVE";

    /// <summary>The default SQLite file: <c>shuntsweep/archive.db</c> under the user's local application data folder.</summary>
    public static string DefaultSqlitePath =>
        Path.Combine(Environment.GetFolderPath(Environment.SpecialFolder.LocalApplicationData, Environment.SpecialFolderOption.DoNotVerify), "shuntsweep", "archive.db");

    /// <summary>Chooses the archive: <paramref name="option"/>, else <see cref="EnvironmentVariable"/>, else <see cref="DefaultSqlitePath"/>.</summary>
    /// <remarks>A value with <c>Host=</c> or <c>Server=</c> is a PostgreSQL (Npgsql) connection string; a value with <c>Data Source=</c> is an SQLite
    /// connection string; anything else is the path of an SQLite file.</remarks>
    /// <param name="option">The <c>--archive</c> value, or null.</param>
    /// <param name="environment">Reads an environment variable; <see cref="Environment.GetEnvironmentVariable(string)"/> when null.</param>
    public static ArchiveLocation Resolve(string? option, Func<string, string?>? environment = null)
    {
        environment ??= Environment.GetEnvironmentVariable;
        var value = !string.IsNullOrWhiteSpace(option) ? option.Trim() : environment(EnvironmentVariable)?.Trim();
        if (string.IsNullOrEmpty(value))
        {
            value = DefaultSqlitePath;
        }

        if (HasKey(value, "Host") || HasKey(value, "Server"))
        {
            try
            {
                var pg = new NpgsqlConnectionStringBuilder(value);
                return new ArchiveLocation(ArchiveKind.PostgreSql, pg.ConnectionString, $"PostgreSQL {pg.Host}:{pg.Port}/{pg.Database}");
            }
            catch (ArgumentException e)
            {
                throw new FormatException($"The archive connection string is not valid for PostgreSQL: {e.Message}", e);
            }
        }

        SqliteConnectionStringBuilder sqlite;
        try
        {
            sqlite = HasKey(value, "Data Source") ? new SqliteConnectionStringBuilder(value) : new SqliteConnectionStringBuilder { DataSource = Path.GetFullPath(value) };
        }
        catch (ArgumentException e)
        {
            throw new FormatException($"The archive connection string is not valid for SQLite: {e.Message}", e);
        }

        sqlite.ForeignKeys = true;
        return new ArchiveLocation(ArchiveKind.Sqlite, sqlite.ConnectionString, $"SQLite {sqlite.DataSource}");
    }

    /// <summary>Opens the archive, creating the SQLite file if needed and applying any schema migrations it lacks.</summary>
    public async Task<IArchive> OpenAsync(TimeProvider? time = null, CancellationToken cancellationToken = default)
    {
        var archive = new SqlArchive(this, time ?? TimeProvider.System);
        await archive.MigrateAsync(cancellationToken).ConfigureAwait(false);
        return archive;
    }

    private static bool HasKey(string value, string key) =>
        value.Split(';').Any(part => part.Split('=', 2) is [var k, _] && string.Equals(k.Trim(), key, StringComparison.OrdinalIgnoreCase));
}

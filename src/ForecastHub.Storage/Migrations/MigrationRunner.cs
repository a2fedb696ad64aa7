using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage.Migrations;

/// <summary>Brings the file to the newest schema: switches it to WAL, then applies each missing
/// migration in its own IMMEDIATE transaction and records it in <c>schema_migrations</c>.</summary>
public sealed class MigrationRunner(SqliteDatabase database, IReadOnlyList<Migration> migrations)
{
    public MigrationRunner(SqliteDatabase database)
        : this(database, Migration.All)
    {
    }

    private bool appliedLatest;

    /// <summary>The newest version this build knows.</summary>
    public int LatestVersion => migrations.Count == 0 ? 0 : migrations[^1].Version;

    /// <summary>Applies migrations up to <paramref name="targetVersion"/> (default: all) and
    /// answers the resulting schema version.</summary>
    public async Task<int> ApplyAsync(int? targetVersion = null, CancellationToken cancellationToken = default)
    {
        // The checks read the whole file once; a second call in the same process (the host's start after Program's) skips them.
        if (targetVersion is null && appliedLatest)
        {
            return LatestVersion;
        }
        try
        {
            CheckBeforeMigrating();
            var version = await MigrateAsync(targetVersion, cancellationToken).ConfigureAwait(false);
            appliedLatest = version == LatestVersion;
            return version;
        }
        catch (Exception error) when (error is SqliteException or IOException or UnauthorizedAccessException)
        {
            throw StorageStartupException.From(database.FilePath, error);
        }
    }

    /// <summary>Refuses a file this build cannot trust: one written by a newer build (a schema
    /// version above <see cref="LatestVersion"/>), or one SQLite's quick check finds damaged.
    /// The quick check reads every page once without checking indexes against tables (see
    /// docs/operations.md for its cost); <c>check-storage</c> runs the full check.</summary>
    private void CheckBeforeMigrating()
    {
        var current = CurrentVersion();
        if (current > LatestVersion)
        {
            throw new StorageStartupException(database.FilePath,
                $"its schema version is {current}, but this build knows versions up to {LatestVersion}: a newer ForecastHub wrote it. " +
                "Run that build (or a newer one) on it, or restore a backup taken before the upgrade.");
        }
        var problems = database.Check(quick: true, maxProblems: 1);
        if (problems.Count > 0)
        {
            throw new StorageStartupException(database.FilePath,
                $"SQLite's quick check found damage ({problems[0].ReplaceLineEndings(" ")}); run 'ForecastHub.Api check-storage' for a full report, then restore it from a backup.");
        }
    }

    private async Task<int> MigrateAsync(int? targetVersion, CancellationToken cancellationToken)
    {
        using (var connection = database.Open())
        {
            using var wal = connection.CreateCommand();
            // WAL is a property of the file; it lets readers go on while the single writer commits.
            wal.CommandText = "PRAGMA journal_mode = WAL;";
            var mode = wal.ExecuteScalar() as string;
            if (!string.Equals(mode, "wal", StringComparison.OrdinalIgnoreCase))
            {
                throw new InvalidOperationException($"The database did not switch to WAL mode (it reports '{mode}').");
            }
        }
        var target = targetVersion ?? LatestVersion;
        // Read first, so a start on a current file opens no write transaction (a migration that turns foreign keys
        // off checks every reading's key afterwards); each pending one is checked again inside its transaction.
        var current = CurrentVersion();
        foreach (var migration in migrations.Where(m => m.Version > current && m.Version <= target))
        {
            Func<SqliteConnection, SqliteTransaction, int> apply = (connection, transaction) =>
            {
                EnsureHistoryTable(connection, transaction);
                if (CurrentVersion(connection, transaction) >= migration.Version)
                {
                    return 0;
                }
                using (var apply = connection.Command(transaction, migration.Sql))
                {
                    apply.ExecuteNonQuery();
                }
                using var record = connection.Command(transaction,
                        "INSERT INTO schema_migrations (version, name, applied_at_ms) VALUES ($v, $n, $t);")
                    .With("$v", migration.Version)
                    .With("$n", migration.Name)
                    .With("$t", DateTimeOffset.UtcNow.ToUnixTimeMilliseconds());
                record.ExecuteNonQuery();
                return 1;
            };
            await (migration.ForeignKeysOff
                ? database.WriteWithoutForeignKeysAsync(apply, cancellationToken)
                : database.WriteAsync(apply, cancellationToken)).ConfigureAwait(false);
        }
        return CurrentVersion();
    }

    /// <summary>The schema version of the file (0 when nothing was applied yet).</summary>
    public int CurrentVersion() => database.Read(CurrentVersion);

    private static int CurrentVersion(SqliteConnection connection, SqliteTransaction transaction)
    {
        using var exists = connection.Command(transaction,
            "SELECT count(*) FROM sqlite_master WHERE type = 'table' AND name = 'schema_migrations';");
        if (Convert.ToInt64(exists.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture) == 0)
        {
            return 0;
        }
        using var version = connection.Command(transaction, "SELECT coalesce(max(version), 0) FROM schema_migrations;");
        return Convert.ToInt32(version.ExecuteScalar(), System.Globalization.CultureInfo.InvariantCulture);
    }

    private static void EnsureHistoryTable(SqliteConnection connection, SqliteTransaction transaction)
    {
        using var create = connection.Command(transaction, """
            CREATE TABLE IF NOT EXISTS schema_migrations (
                version       INTEGER PRIMARY KEY,
                name          TEXT    NOT NULL,
                applied_at_ms INTEGER NOT NULL
            );
            """);
        create.ExecuteNonQuery();
    }
}

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

    /// <summary>The newest version this build knows.</summary>
    public int LatestVersion => migrations.Count == 0 ? 0 : migrations[^1].Version;

    /// <summary>Applies migrations up to <paramref name="targetVersion"/> (default: all) and
    /// answers the resulting schema version.</summary>
    public async Task<int> ApplyAsync(int? targetVersion = null, CancellationToken cancellationToken = default)
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
        foreach (var migration in migrations.Where(m => m.Version <= target))
        {
            await database.WriteAsync((connection, transaction) =>
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
            }, cancellationToken).ConfigureAwait(false);
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

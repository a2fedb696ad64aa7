using ForecastHub.Storage.Migrations;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage;

/// <summary>The SQLite file's schema: the embedded migrations, and readiness from <c>schema_migrations</c>.</summary>
public sealed class SqliteStorageSchema(MigrationRunner migrations) : IStorageSchema
{
    public Task<int> MigrateAsync(CancellationToken cancellationToken = default) =>
        migrations.ApplyAsync(cancellationToken: cancellationToken);

    public StorageReadiness CheckReadiness()
    {
        try
        {
            var version = migrations.CurrentVersion();
            return version < migrations.LatestVersion
                ? new StorageReadiness(false, version, $"Storage schema is at version {version}; this build needs {migrations.LatestVersion}.")
                : new StorageReadiness(true, version, null);
        }
        catch (SqliteException e)
        {
            return new StorageReadiness(false, 0, $"Storage is not reachable (SQLite error {e.SqliteErrorCode}).");
        }
    }
}

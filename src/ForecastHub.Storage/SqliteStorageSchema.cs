using ForecastHub.Storage.Migrations;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage;

/// <summary>The SQLite file's schema: the embedded migrations, and readiness from <c>schema_migrations</c>.</summary>
public sealed class SqliteStorageSchema(MigrationRunner migrations) : IStorageSchema
{
    public Task<int> MigrateAsync(CancellationToken cancellationToken = default) =>
        migrations.ApplyAsync(cancellationToken: cancellationToken);

    public Task<StorageReadiness> CheckReadinessAsync(CancellationToken cancellationToken = default)
    {
        try
        {
            return Task.FromResult(StorageReadiness.OfVersion(migrations.CurrentVersion(), migrations.LatestVersion));
        }
        catch (SqliteException e)
        {
            return Task.FromResult(new StorageReadiness(false, 0, $"Storage is not reachable (SQLite error {e.SqliteErrorCode})."));
        }
    }
}

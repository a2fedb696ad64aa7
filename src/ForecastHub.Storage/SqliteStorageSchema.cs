using ForecastHub.Storage.Migrations;
using Microsoft.Data.Sqlite;

namespace ForecastHub.Storage;

/// <summary>The SQLite file's schema: the embedded migrations, and readiness from the file's health
/// (damage or a full disk met by the requests) and <c>schema_migrations</c>.</summary>
public sealed class SqliteStorageSchema(SqliteDatabase database, MigrationRunner migrations) : IStorageSchema
{
    public Task<int> MigrateAsync(CancellationToken cancellationToken = default) =>
        migrations.ApplyAsync(cancellationToken: cancellationToken);

    public Task<StorageReadiness> CheckReadinessAsync(CancellationToken cancellationToken = default)
    {
        if (database.Health.Damage is { } damage)
        {
            return Task.FromResult(new StorageReadiness(false, 0,
                $"Storage is damaged ({damage}); stop the service, run 'ForecastHub.Api check-storage' on the file and restore it from a backup."));
        }
        if (database.Health.IsFull)
        {
            return Task.FromResult(new StorageReadiness(false, 0,
                "Storage is full: the last write failed for lack of space; ready again once a write succeeds."));
        }
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

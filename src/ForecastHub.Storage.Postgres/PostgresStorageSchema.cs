using ForecastHub.Storage.Postgres.Migrations;

namespace ForecastHub.Storage.Postgres;

/// <summary>The PostgreSQL database's schema: its own migrations, and readiness from the trouble the
/// server reported (damage, no space) and <c>schema_migrations</c>.</summary>
public sealed class PostgresStorageSchema(PostgresDatabase database, PostgresMigrationRunner migrations) : IStorageSchema
{
    public Task<int> MigrateAsync(CancellationToken cancellationToken = default) =>
        migrations.ApplyAsync(cancellationToken: cancellationToken);

    public async Task<StorageReadiness> CheckReadinessAsync(CancellationToken cancellationToken = default)
    {
        if (database.Health.Damage is { } damage)
        {
            return new StorageReadiness(false, 0,
                $"Storage is damaged ({damage}); the database's operator has to repair it (REINDEX for a damaged index, a restore from backup for damaged data), then restart the service.");
        }
        if (database.Health.IsFull)
        {
            return new StorageReadiness(false, 0,
                "Storage is full: the last write failed for lack of space or memory on the database server; ready again once a write succeeds.");
        }
        try
        {
            var version = await migrations.CurrentVersionAsync(cancellationToken).ConfigureAwait(false);
            return StorageReadiness.OfVersion(version, migrations.LatestVersion);
        }
        catch (Exception e) when (e is System.Data.Common.DbException or TimeoutException or System.Net.Sockets.SocketException)
        {
            return new StorageReadiness(false, 0, $"Storage is not reachable ({e.GetType().Name}).");
        }
    }
}

using ForecastHub.Storage.Postgres.Migrations;

namespace ForecastHub.Storage.Postgres;

/// <summary>The PostgreSQL database's schema: its own migrations, and readiness from <c>schema_migrations</c>.</summary>
public sealed class PostgresStorageSchema(PostgresMigrationRunner migrations) : IStorageSchema
{
    public Task<int> MigrateAsync(CancellationToken cancellationToken = default) =>
        migrations.ApplyAsync(cancellationToken: cancellationToken);

    public async Task<StorageReadiness> CheckReadinessAsync(CancellationToken cancellationToken = default)
    {
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

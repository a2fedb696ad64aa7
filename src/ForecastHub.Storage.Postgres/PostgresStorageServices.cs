using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Cluster;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Postgres.Alerts;
using ForecastHub.Storage.Postgres.Cluster;
using ForecastHub.Storage.Postgres.Health;
using ForecastHub.Storage.Postgres.Keys;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.Storage.Postgres.Models;
using ForecastHub.Storage.Postgres.Readings;
using ForecastHub.Storage.Postgres.Sites;
using ForecastHub.Storage.Postgres.Verification;
using ForecastHub.Storage.Postgres.Webhooks;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Storage.Postgres;

public static class PostgresStorageServices
{
    /// <summary>
    /// Registers the PostgreSQL backend: its database, migrations, every store and the shared work
    /// leases, each keyed by <see cref="StorageOptions.Postgres"/>; the host forwards the interfaces to
    /// the key it runs. No connection is opened until a store is first resolved.
    /// </summary>
    public static IServiceCollection AddPostgresStorage(this IServiceCollection services, Func<IServiceProvider, StorageOptions> options)
    {
        const string Key = StorageOptions.Postgres;
        services.AddSingleton(sp => new PostgresDatabase(options(sp).ConnectionString!));
        services.AddSingleton(sp => new PostgresMigrationRunner(Database(sp)));
        services.AddKeyedSingleton<ISiteStore>(Key, (sp, _) => new PostgresSiteStore(Database(sp), sp.GetRequiredService<TimeProvider>()));
        services.AddKeyedSingleton<IReadingStore>(Key, (sp, _) => new PostgresReadingStore(Database(sp)));
        services.AddKeyedSingleton<IApiKeyStore>(Key, (sp, _) => new PostgresApiKeyStore(Database(sp)));
        services.AddKeyedSingleton<IModelStore>(Key, (sp, _) => new PostgresModelStore(Database(sp)));
        services.AddKeyedSingleton<IForecastArchive>(Key, (sp, _) => new PostgresForecastArchive(Database(sp)));
        services.AddKeyedSingleton<IReadingSummaryStore>(Key, (sp, _) => new PostgresReadingSummaryStore(Database(sp)));
        services.AddKeyedSingleton<IWebhookStore>(Key, (sp, _) => new PostgresWebhookStore(Database(sp)));
        services.AddKeyedSingleton<IAlertStore>(Key, (sp, _) => new PostgresAlertStore(Database(sp)));
        services.AddKeyedSingleton<IWorkLeases>(Key, (sp, _) => new PostgresWorkLeases(Database(sp)));
        services.AddKeyedSingleton<IStorageSchema>(Key, (sp, _) => new PostgresStorageSchema(Database(sp), sp.GetRequiredService<PostgresMigrationRunner>()));
        return services;
    }

    private static PostgresDatabase Database(IServiceProvider sp) => sp.GetRequiredService<PostgresDatabase>();
}

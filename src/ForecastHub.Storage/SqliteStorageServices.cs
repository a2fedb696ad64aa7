using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Cluster;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Storage;

public static class SqliteStorageServices
{
    /// <summary>
    /// Registers the SQLite backend: its database, migrations and every store, each keyed by
    /// <see cref="StorageOptions.Sqlite"/>; the host forwards the interfaces to the key it runs.
    /// Nothing is opened until a store is first resolved.
    /// </summary>
    public static IServiceCollection AddSqliteStorage(this IServiceCollection services, Func<IServiceProvider, StorageOptions> options)
    {
        const string Key = StorageOptions.Sqlite;
        services.AddSingleton(sp => new SqliteDatabase(options(sp)));
        services.AddSingleton(sp => new MigrationRunner(Database(sp)));
        services.AddKeyedSingleton<ISiteStore>(Key, (sp, _) => new SqliteSiteStore(Database(sp), sp.GetRequiredService<TimeProvider>()));
        services.AddKeyedSingleton<IReadingStore>(Key, (sp, _) => new SqliteReadingStore(Database(sp)));
        services.AddKeyedSingleton<IApiKeyStore>(Key, (sp, _) => new SqliteApiKeyStore(Database(sp)));
        services.AddKeyedSingleton<IModelStore>(Key, (sp, _) => new SqliteModelStore(Database(sp)));
        services.AddKeyedSingleton<IForecastArchive>(Key, (sp, _) => new SqliteForecastArchive(Database(sp)));
        services.AddKeyedSingleton<IReadingSummaryStore>(Key, (sp, _) => new SqliteReadingSummaryStore(Database(sp)));
        services.AddKeyedSingleton<IWebhookStore>(Key, (sp, _) => new SqliteWebhookStore(Database(sp)));
        services.AddKeyedSingleton<IAlertStore>(Key, (sp, _) => new SqliteAlertStore(Database(sp)));
        // One process owns the file, so its leases live in memory.
        services.AddKeyedSingleton<IWorkLeases>(Key, (sp, _) => new LocalWorkLeases(sp.GetRequiredService<TimeProvider>()));
        services.AddKeyedSingleton<IStorageSchema>(Key, (sp, _) => new SqliteStorageSchema(Database(sp), sp.GetRequiredService<MigrationRunner>()));
        return services;
    }

    private static SqliteDatabase Database(IServiceProvider sp) => sp.GetRequiredService<SqliteDatabase>();
}

using ForecastHub.Storage;
using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Cluster;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Postgres;
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
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

public static class StorageSetup
{
    /// <summary>
    /// The stores of the backend <c>Storage:Provider</c> names (the SQLite file of <c>Storage:Path</c>,
    /// or the PostgreSQL database of <c>Storage:ConnectionString</c>), the work leases, and the
    /// migrations that run before the server starts listening. Each store is chosen when first
    /// resolved, so the decorators added later wrap whichever backend runs.
    /// </summary>
    public static IServiceCollection AddForecastHubStorage(this IServiceCollection services)
    {
        services.TryAddSingletonTimeProvider();
        services.AddOptions<StorageOptions>()
            .BindConfiguration(StorageOptions.SectionName)
            .Validate(o => o.Provider is StorageOptions.Sqlite or StorageOptions.Postgres, "Storage:Provider must be 'sqlite' or 'postgres'.")
            .Validate(o => o.IsPostgres || !string.IsNullOrWhiteSpace(o.Path), "Storage:Path must name a file.")
            .Validate(o => o.BusyTimeoutMs > 0, "Storage:BusyTimeoutMs must be positive.")
            .Validate(o => o.MaxSizeMb is null or > 0, "Storage:MaxSizeMb must be positive (leave it out for no cap).")
            .Validate(o => !o.IsPostgres || !string.IsNullOrWhiteSpace(o.ConnectionString),
                "Storage:ConnectionString must name the PostgreSQL database when Storage:Provider is 'postgres'.")
            .ValidateOnStart();
        services.AddSingleton(sp => new SqliteDatabase(Options(sp)));
        services.AddSingleton(sp => new MigrationRunner(sp.GetRequiredService<SqliteDatabase>()));
        services.AddSingleton(sp => new PostgresDatabase(Options(sp).ConnectionString!));
        services.AddSingleton(sp => new PostgresMigrationRunner(sp.GetRequiredService<PostgresDatabase>()));

        Add<ISiteStore>(services, sp => new SqliteSiteStore(Sqlite(sp), Clock(sp)), sp => new PostgresSiteStore(Postgres(sp), Clock(sp)));
        Add<IReadingStore>(services, sp => new SqliteReadingStore(Sqlite(sp)), sp => new PostgresReadingStore(Postgres(sp)));
        Add<IApiKeyStore>(services, sp => new SqliteApiKeyStore(Sqlite(sp)), sp => new PostgresApiKeyStore(Postgres(sp)));
        Add<IModelStore>(services, sp => new SqliteModelStore(Sqlite(sp)), sp => new PostgresModelStore(Postgres(sp)));
        Add<IForecastArchive>(services, sp => new SqliteForecastArchive(Sqlite(sp)), sp => new PostgresForecastArchive(Postgres(sp)));
        Add<IReadingSummaryStore>(services, sp => new SqliteReadingSummaryStore(Sqlite(sp)), sp => new PostgresReadingSummaryStore(Postgres(sp)));
        Add<IWebhookStore>(services, sp => new SqliteWebhookStore(Sqlite(sp)), sp => new PostgresWebhookStore(Postgres(sp)));
        Add<IAlertStore>(services, sp => new SqliteAlertStore(Sqlite(sp)), sp => new PostgresAlertStore(Postgres(sp)));
        Add<IWorkLeases>(services, sp => new LocalWorkLeases(Clock(sp)), sp => new PostgresWorkLeases(Postgres(sp)));
        Add<IStorageSchema>(services, sp => new SqliteStorageSchema(Sqlite(sp), sp.GetRequiredService<MigrationRunner>()),
            sp => new PostgresStorageSchema(sp.GetRequiredService<PostgresDatabase>(), sp.GetRequiredService<PostgresMigrationRunner>()));
        services.AddHostedService<MigrationStartup>();
        return services;
    }

    private static StorageOptions Options(IServiceProvider sp) => sp.GetRequiredService<IOptions<StorageOptions>>().Value;

    private static SqliteDatabase Sqlite(IServiceProvider sp) => sp.GetRequiredService<SqliteDatabase>();

    private static PostgresDatabase Postgres(IServiceProvider sp) => sp.GetRequiredService<PostgresDatabase>();

    private static TimeProvider Clock(IServiceProvider sp) => sp.GetRequiredService<TimeProvider>();

    private static void Add<T>(IServiceCollection services, Func<IServiceProvider, T> sqlite, Func<IServiceProvider, T> postgres)
        where T : class =>
        services.AddSingleton(sp => Options(sp).IsPostgres ? postgres(sp) : sqlite(sp));

    private static void TryAddSingletonTimeProvider(this IServiceCollection services)
    {
        if (services.All(d => d.ServiceType != typeof(TimeProvider)))
        {
            services.AddSingleton(TimeProvider.System);
        }
    }
}

/// <summary>Applies migrations in the host's starting phase, before any request is served.</summary>
internal sealed class MigrationStartup(IStorageSchema schema, ILogger<MigrationStartup> logger) : IHostedLifecycleService
{
    public async Task StartingAsync(CancellationToken cancellationToken)
    {
        var version = await schema.MigrateAsync(cancellationToken).ConfigureAwait(false);
        if (logger.IsEnabled(LogLevel.Information))
        {
            logger.LogInformation("Storage schema at version {SchemaVersion}", version);
        }
    }

    public Task StartAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StartedAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppingAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppedAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}

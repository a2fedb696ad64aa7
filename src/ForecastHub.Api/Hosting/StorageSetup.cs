using ForecastHub.Storage;
using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Cluster;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Postgres;
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
    /// migrations that run before the server starts listening. Each backend registers its own
    /// stores under its name; each interface is forwarded when first resolved, so the decorators
    /// added later wrap whichever backend runs.
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
        services.AddSqliteStorage(Options).AddPostgresStorage(Options);
        Forward<ISiteStore>(services);
        Forward<IReadingStore>(services);
        Forward<IApiKeyStore>(services);
        Forward<IModelStore>(services);
        Forward<IForecastArchive>(services);
        Forward<IReadingSummaryStore>(services);
        Forward<IWebhookStore>(services);
        Forward<IAlertStore>(services);
        Forward<IWorkLeases>(services);
        Forward<IStorageSchema>(services);
        services.AddHostedService<MigrationStartup>();
        return services;
    }

    private static StorageOptions Options(IServiceProvider sp) => sp.GetRequiredService<IOptions<StorageOptions>>().Value;

    // The interface resolves to the store of the backend Storage:Provider names.
    private static void Forward<T>(IServiceCollection services)
        where T : class =>
        services.AddSingleton(sp => sp.GetRequiredKeyedService<T>(Options(sp).Provider));

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

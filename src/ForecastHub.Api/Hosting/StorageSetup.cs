using ForecastHub.Storage;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Hosting;

public static class StorageSetup
{
    /// <summary>The SQLite file from <c>Storage:Path</c>, the stores, and the migrations that run
    /// before the server starts listening.</summary>
    public static IServiceCollection AddForecastHubStorage(this IServiceCollection services)
    {
        services.TryAddSingletonTimeProvider();
        services.AddOptions<StorageOptions>()
            .BindConfiguration(StorageOptions.SectionName)
            .Validate(o => !string.IsNullOrWhiteSpace(o.Path), "Storage:Path must name a file.")
            .Validate(o => o.BusyTimeoutMs > 0, "Storage:BusyTimeoutMs must be positive.")
            .Validate(o => o.MaxSizeMb is null or > 0, "Storage:MaxSizeMb must be positive (leave it out for no cap).")
            .ValidateOnStart();
        services.AddSingleton(sp => new SqliteDatabase(sp.GetRequiredService<IOptions<StorageOptions>>().Value));
        services.AddSingleton(sp => new MigrationRunner(sp.GetRequiredService<SqliteDatabase>()));
        services.AddSingleton<ISiteStore, SqliteSiteStore>();
        services.AddSingleton<IReadingStore, SqliteReadingStore>();
        services.AddHostedService<MigrationStartup>();
        return services;
    }

    private static void TryAddSingletonTimeProvider(this IServiceCollection services)
    {
        if (services.All(d => d.ServiceType != typeof(TimeProvider)))
        {
            services.AddSingleton(TimeProvider.System);
        }
    }
}

/// <summary>Applies migrations in the host's starting phase, before any request is served.</summary>
internal sealed class MigrationStartup(MigrationRunner runner, ILogger<MigrationStartup> logger) : IHostedLifecycleService
{
    public async Task StartingAsync(CancellationToken cancellationToken)
    {
        var version = await runner.ApplyAsync(cancellationToken: cancellationToken).ConfigureAwait(false);
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

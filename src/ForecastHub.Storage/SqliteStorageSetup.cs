using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;

namespace ForecastHub.Storage;

public static class SqliteStorageSetup
{
    /// <summary>The SQLite backend: the file from <c>Storage:Path</c>, every store interface, and the
    /// schema (<see cref="IStorageSchema"/>), migrated in the host's starting phase, before the
    /// server listens. Register it before anything that reads storage at start.</summary>
    public static IServiceCollection AddSqliteStorage(this IServiceCollection services)
    {
        services.TryAddSingleton(TimeProvider.System);
        services.AddOptions<StorageOptions>()
            .BindConfiguration(StorageOptions.SectionName)
            .Validate(o => !string.IsNullOrWhiteSpace(o.Path), "Storage:Path must name a file.")
            .Validate(o => o.BusyTimeoutMs > 0, "Storage:BusyTimeoutMs must be positive.")
            .ValidateOnStart();
        services.AddSingleton(sp => new SqliteDatabase(sp.GetRequiredService<IOptions<StorageOptions>>().Value));
        services.AddSingleton(sp => new MigrationRunner(sp.GetRequiredService<SqliteDatabase>()));
        services.AddSingleton<IStorageSchema, SqliteStorageSchema>();
        services.AddSingleton<ISiteStore, SqliteSiteStore>();
        services.AddSingleton<IReadingStore, SqliteReadingStore>();
        services.AddSingleton<IReadingSummaryStore, SqliteReadingSummaryStore>();
        services.AddSingleton<IModelStore, SqliteModelStore>();
        services.AddSingleton<IForecastArchive, SqliteForecastArchive>();
        services.AddSingleton<IApiKeyStore, SqliteApiKeyStore>();
        services.AddHostedService<SchemaMigrationStartup>();
        return services;
    }
}

/// <summary>Applies migrations in the host's starting phase, before any request is served.</summary>
internal sealed partial class SchemaMigrationStartup(IStorageSchema schema, ILogger<SchemaMigrationStartup> logger) : IHostedLifecycleService
{
    public async Task StartingAsync(CancellationToken cancellationToken)
    {
        var version = await schema.MigrateAsync(cancellationToken).ConfigureAwait(false);
        LogSchemaVersion(logger, version);
    }

    public Task StartAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StartedAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppingAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppedAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    [LoggerMessage(Level = LogLevel.Information, Message = "Storage schema at version {SchemaVersion}")]
    private static partial void LogSchemaVersion(ILogger logger, int schemaVersion);
}

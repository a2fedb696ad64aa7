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
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>Every store of one backend on a fresh, migrated database, so one test runs on both.</summary>
public sealed class Backend : IAsyncDisposable
{
    private readonly Func<ValueTask> dispose;

    private Backend(string name, ISiteStore sites, IReadingStore readings, IApiKeyStore keys, IModelStore models,
        IForecastArchive archive, IReadingSummaryStore summaries, IWorkLeases leases, IWebhookStore webhooks, IAlertStore alerts,
        PostgresDatabase? postgres, Func<ValueTask> dispose)
    {
        Name = name;
        Sites = sites;
        Readings = readings;
        Keys = keys;
        Models = models;
        Archive = archive;
        Summaries = summaries;
        Leases = leases;
        Webhooks = webhooks;
        Alerts = alerts;
        Postgres = postgres;
        this.dispose = dispose;
    }

    public static TheoryData<string> Names => new("sqlite", "postgres");

    public string Name { get; }

    public ISiteStore Sites { get; }

    public IReadingStore Readings { get; }

    public IApiKeyStore Keys { get; }

    public IModelStore Models { get; }

    public IForecastArchive Archive { get; }

    public IReadingSummaryStore Summaries { get; }

    public IWorkLeases Leases { get; }

    public IWebhookStore Webhooks { get; }

    public IAlertStore Alerts { get; }

    /// <summary>The PostgreSQL database, for tests that open a second store on it as another node would; null on SQLite.</summary>
    public PostgresDatabase? Postgres { get; }

    public static async Task<Backend> CreateAsync(string name, TimeProvider? clock = null)
    {
        // The stores come from the backend's own registration, as in the service.
        var services = new ServiceCollection().AddSingleton(clock ?? TimeProvider.System);
        if (name == StorageOptions.Sqlite)
        {
            var file = new TestDatabase();
            return await FromAsync(name, services.AddSqliteStorage(_ => new StorageOptions { Path = file.Path }).BuildServiceProvider(), null,
                () =>
                {
                    file.Dispose();
                    return ValueTask.CompletedTask;
                });
        }

        var pg = await PostgresTestDatabase.CreateAsync(migrated: false);
        var options = new StorageOptions { Provider = StorageOptions.Postgres, ConnectionString = pg.ConnectionString };
        return await FromAsync(name, services.AddPostgresStorage(_ => options).BuildServiceProvider(), pg.Database, pg.DisposeAsync);
    }

    private static async Task<Backend> FromAsync(string name, ServiceProvider services, PostgresDatabase? postgres, Func<ValueTask> disposeDatabase)
    {
        T Get<T>()
            where T : notnull => services.GetRequiredKeyedService<T>(name);
        await Get<IStorageSchema>().MigrateAsync();
        return new Backend(name, Get<ISiteStore>(), Get<IReadingStore>(), Get<IApiKeyStore>(), Get<IModelStore>(), Get<IForecastArchive>(),
            Get<IReadingSummaryStore>(), Get<IWorkLeases>(), Get<IWebhookStore>(), Get<IAlertStore>(), postgres,
            async () =>
            {
                // The provider closes the connections it opened before the database goes.
                await services.DisposeAsync();
                await disposeDatabase();
            });
    }

    public ValueTask DisposeAsync() => dispose();
}

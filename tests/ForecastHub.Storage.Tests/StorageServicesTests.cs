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

namespace ForecastHub.Storage.Tests;

/// <summary>Each backend registers every store interface under its own name, and only its own stores.</summary>
public sealed class StorageServicesTests
{
    private static readonly Type[] StoreInterfaces =
    [
        typeof(ISiteStore), typeof(IReadingStore), typeof(IApiKeyStore), typeof(IModelStore), typeof(IForecastArchive),
        typeof(IReadingSummaryStore), typeof(IWebhookStore), typeof(IAlertStore), typeof(IWorkLeases), typeof(IStorageSchema),
    ];

    [Fact]
    public void EachBackendRegistersEveryStoreUnderItsName()
    {
        using var folder = new TestDatabase();
        var options = new StorageOptions { Path = folder.Path, ConnectionString = "Host=127.0.0.1;Database=unused" };
        using var provider = new ServiceCollection()
            .AddSingleton(TimeProvider.System)
            .AddSqliteStorage(_ => options)
            .AddPostgresStorage(_ => options)
            .BuildServiceProvider();

        foreach (var store in StoreInterfaces)
        {
            var sqlite = provider.GetRequiredKeyedService(store, StorageOptions.Sqlite);
            var postgres = provider.GetRequiredKeyedService(store, StorageOptions.Postgres);
            Assert.True(store.IsInstanceOfType(sqlite) && store.IsInstanceOfType(postgres), store.Name);
            Assert.Equal("ForecastHub.Storage", sqlite.GetType().Assembly.GetName().Name);
            Assert.Equal("ForecastHub.Storage.Postgres", postgres.GetType().Assembly.GetName().Name);
        }
    }
}

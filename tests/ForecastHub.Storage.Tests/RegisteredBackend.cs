using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Contract;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.DependencyInjection;

namespace ForecastHub.Storage.Tests;

/// <summary>
/// A backend's stores as its own registration makes them (<c>AddSqliteStorage</c>, <c>AddPostgresStorage</c>),
/// so the contract suite tests what the service runs; migrated and ready before a test gets it.
/// </summary>
internal sealed class RegisteredBackend : IStorageBackend
{
    private readonly ServiceProvider services;
    private readonly string provider;
    private readonly Func<ValueTask> disposeDatabase;

    private RegisteredBackend(ServiceProvider services, string provider, Func<ValueTask> disposeDatabase)
    {
        this.services = services;
        this.provider = provider;
        this.disposeDatabase = disposeDatabase;
    }

    public IStorageSchema Schema => Get<IStorageSchema>();

    public ISiteStore Sites => Get<ISiteStore>();

    public IReadingStore Readings => Get<IReadingStore>();

    public IReadingSummaryStore Summaries => Get<IReadingSummaryStore>();

    public IModelStore Models => Get<IModelStore>();

    public IForecastArchive Archive => Get<IForecastArchive>();

    public IApiKeyStore Keys => Get<IApiKeyStore>();

    public IWebhookStore Webhooks => Get<IWebhookStore>();

    public IAlertStore Alerts => Get<IAlertStore>();

    /// <summary>Registers the backend with <paramref name="register"/> on <paramref name="clock"/>; checks it is not ready before its migrations and ready after.</summary>
    public static async Task<IStorageBackend> CreateAsync(string provider, TimeProvider clock,
        Func<IServiceCollection, IServiceCollection> register, Func<ValueTask> disposeDatabase)
    {
        var backend = new RegisteredBackend(register(new ServiceCollection().AddSingleton(clock)).BuildServiceProvider(), provider, disposeDatabase);
        Assert.False((await backend.Schema.CheckReadinessAsync()).Ready);
        await backend.Schema.MigrateAsync();
        Assert.True((await backend.Schema.CheckReadinessAsync()).Ready);
        return backend;
    }

    public async ValueTask DisposeAsync()
    {
        // The provider closes the connections it opened before the database goes.
        await services.DisposeAsync();
        await disposeDatabase();
    }

    private T Get<T>()
        where T : notnull => services.GetRequiredKeyedService<T>(provider);
}

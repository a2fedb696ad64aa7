using ForecastHub.Core.Grid;
using ForecastHub.Core.Modeling;
using ForecastHub.Core.Quality;
using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;
using ForecastHub.Storage.Webhooks;
using Microsoft.Extensions.Time.Testing;

namespace ForecastHub.Storage.Contract;

/// <summary>
/// One storage backend, fresh, empty and migrated, for one test: every store interface over the
/// same database. A backend's test project implements <see cref="StorageContract.CreateBackendAsync"/>
/// once and derives one class from each contract; the backend is done when all of them pass.
/// </summary>
public interface IStorageBackend : IAsyncDisposable
{
    IStorageSchema Schema { get; }

    ISiteStore Sites { get; }

    IReadingStore Readings { get; }

    IReadingSummaryStore Summaries { get; }

    IModelStore Models { get; }

    IForecastArchive Archive { get; }

    IApiKeyStore Keys { get; }

    IWebhookStore Webhooks { get; }

    IAlertStore Alerts { get; }
}

/// <summary>The base of every contract: a backend per test, built on a fake clock the test moves.</summary>
public abstract class StorageContract : IAsyncLifetime
{
    protected static readonly DateTimeOffset Start = new(2026, 3, 1, 0, 0, 0, TimeSpan.Zero);

    private IStorageBackend? backend;

    protected FakeTimeProvider Clock { get; } = new(Start);

    protected IStorageBackend Backend => backend ?? throw new InvalidOperationException("The backend is made in InitializeAsync.");

    /// <summary>A fresh, empty backend whose migrations are applied, reading time from <paramref name="clock"/>.</summary>
    protected abstract Task<IStorageBackend> CreateBackendAsync(TimeProvider clock);

    public async Task InitializeAsync() => backend = await CreateBackendAsync(Clock);

    public async Task DisposeAsync()
    {
        if (backend is not null)
        {
            await backend.DisposeAsync();
        }
    }

    /// <summary>An hourly site with default settings (quality limits -60..60 C, spikes above 10 C per hour).</summary>
    protected static SiteRecord Site(string id = "site-a", GridCadence cadence = GridCadence.Hourly) => new(
        id, $"Site {id}", "Europe/Berlin", cadence, cadence == GridCadence.Daily ? DailyStatistic.Max : null,
        52.5, 13.4, 34, QualityLimits.Default, ModelSettings.DefaultFor(cadence), Start, Start);

    /// <summary>Creates <see cref="Site"/> and answers it as stored, with the internal key the store gave it.</summary>
    protected async Task<SiteRecord> CreateSiteAsync(string id = "site-a", GridCadence cadence = GridCadence.Hourly)
    {
        var site = Site(id, cadence);
        Assert.True(await Backend.Sites.CreateAsync(site));
        var stored = await Backend.Sites.GetAsync(id);
        Assert.True(stored!.Key > 0);
        Assert.Equal(site with { Key = stored.Key }, stored);
        return stored;
    }

    protected static long Ms(DateTimeOffset time) => time.ToUnixTimeMilliseconds();

    /// <summary>Readings in degrees C at <paramref name="first"/> plus i hours.</summary>
    protected static IncomingReading[] Hourly(DateTimeOffset first, params double[] values) =>
        [.. values.Select((v, i) => new IncomingReading(i, Ms(first.AddHours(i)), v, v, "C"))];
}

using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Webhooks;
using ForecastHub.Storage.Postgres.Alerts;
using ForecastHub.Storage.Postgres.Webhooks;
using ForecastHub.Storage.Contract;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Postgres;
using ForecastHub.Storage.Postgres.Health;
using ForecastHub.Storage.Postgres.Keys;
using ForecastHub.Storage.Postgres.Migrations;
using ForecastHub.Storage.Postgres.Models;
using ForecastHub.Storage.Postgres.Readings;
using ForecastHub.Storage.Postgres.Sites;
using ForecastHub.Storage.Postgres.Verification;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>The PostgreSQL backend on a fresh database of the test server per test, migrated by its schema.</summary>
internal sealed class PostgresBackend : IStorageBackend
{
    private readonly PostgresTestDatabase database;

    private PostgresBackend(PostgresTestDatabase database, TimeProvider clock)
    {
        this.database = database;
        var db = database.Database;
        Schema = new PostgresStorageSchema(db, new PostgresMigrationRunner(db));
        Sites = new PostgresSiteStore(db, clock);
        Readings = new PostgresReadingStore(db);
        Summaries = new PostgresReadingSummaryStore(db);
        Models = new PostgresModelStore(db);
        Archive = new PostgresForecastArchive(db);
        Keys = new PostgresApiKeyStore(db);
        Webhooks = new PostgresWebhookStore(db);
        Alerts = new PostgresAlertStore(db);
    }

    public IStorageSchema Schema { get; }

    public ISiteStore Sites { get; }

    public IReadingStore Readings { get; }

    public IReadingSummaryStore Summaries { get; }

    public IModelStore Models { get; }

    public IForecastArchive Archive { get; }

    public IApiKeyStore Keys { get; }

    public IWebhookStore Webhooks { get; }

    public IAlertStore Alerts { get; }

    public static async Task<IStorageBackend> CreateAsync(TimeProvider clock)
    {
        var backend = new PostgresBackend(await PostgresTestDatabase.CreateAsync(migrated: false), clock);
        Assert.False((await backend.Schema.CheckReadinessAsync()).Ready);
        await backend.Schema.MigrateAsync();
        Assert.True((await backend.Schema.CheckReadinessAsync()).Ready);
        return backend;
    }

    public ValueTask DisposeAsync() => database.DisposeAsync();
}

public sealed class PostgresSiteStoreContractTests : SiteStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

public sealed class PostgresReadingStoreContractTests : ReadingStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

public sealed class PostgresReadingSummaryStoreContractTests : ReadingSummaryStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

public sealed class PostgresModelStoreContractTests : ModelStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

public sealed class PostgresForecastArchiveContractTests : ForecastArchiveContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

public sealed class PostgresApiKeyStoreContractTests : ApiKeyStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

public sealed class PostgresWebhookAndAlertStoreContractTests : WebhookAndAlertStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => PostgresBackend.CreateAsync(clock);
}

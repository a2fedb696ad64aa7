using ForecastHub.Storage.Alerts;
using ForecastHub.Storage.Webhooks;
using ForecastHub.Storage.Contract;
using ForecastHub.Storage.Health;
using ForecastHub.Storage.Keys;
using ForecastHub.Storage.Migrations;
using ForecastHub.Storage.Models;
using ForecastHub.Storage.Readings;
using ForecastHub.Storage.Sites;
using ForecastHub.Storage.Verification;

namespace ForecastHub.Storage.Tests;

/// <summary>The SQLite backend on a fresh file per test, migrated as the service migrates it at start.</summary>
internal sealed class SqliteBackend : IStorageBackend
{
    private readonly TestDatabase database;

    private SqliteBackend(TestDatabase database, TimeProvider clock)
    {
        this.database = database;
        Schema = new SqliteStorageSchema(database.Database, new MigrationRunner(database.Database));
        Sites = new SqliteSiteStore(database.Database, clock);
        Readings = new SqliteReadingStore(database.Database);
        Summaries = new SqliteReadingSummaryStore(database.Database);
        Models = new SqliteModelStore(database.Database);
        Archive = new SqliteForecastArchive(database.Database);
        Keys = new SqliteApiKeyStore(database.Database);
        Webhooks = new SqliteWebhookStore(database.Database);
        Alerts = new SqliteAlertStore(database.Database);
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
        var backend = new SqliteBackend(new TestDatabase(), clock);
        await backend.Schema.MigrateAsync();
        Assert.True((await backend.Schema.CheckReadinessAsync()).Ready);
        return backend;
    }

    public ValueTask DisposeAsync()
    {
        database.Dispose();
        return ValueTask.CompletedTask;
    }
}

public sealed class SqliteSiteStoreContractTests : SiteStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

public sealed class SqliteReadingStoreContractTests : ReadingStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

public sealed class SqliteReadingSummaryStoreContractTests : ReadingSummaryStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

public sealed class SqliteModelStoreContractTests : ModelStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

public sealed class SqliteForecastArchiveContractTests : ForecastArchiveContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

public sealed class SqliteApiKeyStoreContractTests : ApiKeyStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

public sealed class SqliteWebhookAndAlertStoreContractTests : WebhookAndAlertStoreContract
{
    protected override Task<IStorageBackend> CreateBackendAsync(TimeProvider clock) => SqliteBackend.CreateAsync(clock);
}

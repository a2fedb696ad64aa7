using ForecastHub.Storage.Contract;
using ForecastHub.Storage.Postgres;

namespace ForecastHub.Storage.Tests.Postgres;

/// <summary>The PostgreSQL backend on a fresh database of the test server per test, registered and migrated as the service does at start.</summary>
internal static class PostgresBackend
{
    public static async Task<IStorageBackend> CreateAsync(TimeProvider clock)
    {
        var database = await PostgresTestDatabase.CreateAsync(migrated: false);
        return await RegisteredBackend.CreateAsync(StorageOptions.Postgres, clock,
            services => services.AddPostgresStorage(_ => new StorageOptions { Provider = StorageOptions.Postgres, ConnectionString = database.ConnectionString }),
            database.DisposeAsync);
    }
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

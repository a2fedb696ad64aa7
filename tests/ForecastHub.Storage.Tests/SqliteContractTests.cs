using ForecastHub.Storage.Contract;

namespace ForecastHub.Storage.Tests;

/// <summary>The SQLite backend on a fresh file per test, registered and migrated as the service does at start.</summary>
internal static class SqliteBackend
{
    public static Task<IStorageBackend> CreateAsync(TimeProvider clock)
    {
        var file = new TestDatabase();
        return RegisteredBackend.CreateAsync(StorageOptions.Sqlite, clock,
            services => services.AddSqliteStorage(_ => new StorageOptions { Path = file.Path }),
            () =>
            {
                file.Dispose();
                return ValueTask.CompletedTask;
            });
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

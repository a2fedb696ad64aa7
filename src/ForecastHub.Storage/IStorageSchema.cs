namespace ForecastHub.Storage;

/// <summary>Whether storage can serve requests: reachable, and its schema at this build's version.
/// <c>Problem</c> says why not, in words fit for a 503 answer.</summary>
public sealed record StorageReadiness(bool Ready, int SchemaVersion, string? Problem)
{
    /// <summary>Ready when the schema is at <paramref name="latest"/>; otherwise not, saying which version it is at.</summary>
    public static StorageReadiness OfVersion(int version, int latest) => version < latest
        ? new StorageReadiness(false, version, $"Storage schema is at version {version}; this build needs {latest}.")
        : new StorageReadiness(true, version, null);
}

/// <summary>The schema of a storage backend: brought up to date before the server listens, and
/// checked by the readiness probe.</summary>
public interface IStorageSchema
{
    /// <summary>Applies every pending migration; answers the schema version reached.</summary>
    Task<int> MigrateAsync(CancellationToken cancellationToken = default);

    Task<StorageReadiness> CheckReadinessAsync(CancellationToken cancellationToken = default);
}

namespace ForecastHub.Storage.Keys;

/// <summary>API keys, found by the digest of their secret. Revoked keys stay listed with their
/// revocation time and never authenticate again.</summary>
public interface IApiKeyStore
{
    /// <summary>Stores a new key; false when its id or digest is taken.</summary>
    Task<bool> CreateAsync(ApiKeyRecord key, CancellationToken cancellationToken = default);

    /// <summary>Stores <paramref name="key"/> only when no active admin key exists, as one step across every
    /// process sharing the storage, so nodes starting together generate one first admin key; false when one exists.</summary>
    Task<bool> CreateFirstAdminAsync(ApiKeyRecord key, CancellationToken cancellationToken = default);

    /// <summary>The key whose secret has this SHA-256 digest, revoked or not; null when none.</summary>
    Task<ApiKeyRecord?> FindBySecretAsync(byte[] secretSha256, CancellationToken cancellationToken = default);

    Task<ApiKeyRecord?> GetAsync(string id, CancellationToken cancellationToken = default);

    /// <summary>Keys ordered by id, starting after <paramref name="afterId"/> (exclusive).</summary>
    Task<IReadOnlyList<ApiKeyRecord>> ListAsync(string? afterId, int limit, CancellationToken cancellationToken = default);

    /// <summary>Marks the key revoked at <paramref name="at"/>; answers the stored key (already
    /// revoked keys keep their first revocation time) and what this call did, or null when it does
    /// not exist. With <paramref name="keepAnActiveAdmin"/>, an active admin key is left alone when no
    /// other active admin key would remain; the check and the revocation are one step across nodes.</summary>
    Task<KeyRevocation?> RevokeAsync(string id, DateTimeOffset at, bool keepAnActiveAdmin = false, CancellationToken cancellationToken = default);

    /// <summary>Whether any admin key other than <paramref name="exceptId"/> is still active.</summary>
    Task<bool> HasActiveAdminAsync(string? exceptId = null, CancellationToken cancellationToken = default);
}

/// <summary>The key after a revocation, and what the revocation did.</summary>
public sealed record KeyRevocation(ApiKeyRecord Key, KeyRevocationOutcome Outcome)
{
    public bool Revoked => Outcome == KeyRevocationOutcome.Revoked;
}

public enum KeyRevocationOutcome
{
    Revoked,
    AlreadyRevoked,

    /// <summary>Left active: it is the last active admin key.</summary>
    LastActiveAdmin,
}

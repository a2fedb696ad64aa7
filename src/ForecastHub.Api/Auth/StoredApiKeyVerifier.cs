using System.Security.Cryptography;
using ForecastHub.Storage.Keys;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

/// <summary>
/// Accepts the configured admin key (<c>Auth:AdminKey</c>) and every active stored key. The stored
/// key is found by the digest of the presented secret; the digests are then compared again in
/// constant time, so no step's timing depends on how much of a guess was right.
/// </summary>
public sealed class StoredApiKeyVerifier(IApiKeyStore keys, ApiKeyCache cache, IOptionsMonitor<AuthOptions> options) : IApiKeyVerifier
{
    public const string ConfiguredAdminKeyId = "configured-admin";

    public async ValueTask<ApiKeyIdentity?> VerifyAsync(string presentedKey, CancellationToken cancellationToken)
    {
        if (string.IsNullOrEmpty(presentedKey) || presentedKey.Length > ApiKeySecrets.MaxPresentedLength)
        {
            return null;
        }
        var configured = options.CurrentValue.AdminKey;
        if (!string.IsNullOrEmpty(configured) && ApiKeySecrets.SecretsEqual(presentedKey, configured))
        {
            return new ApiKeyIdentity(ConfiguredAdminKeyId, ApiKeyScopes.Admin, []);
        }
        var digest = ApiKeySecrets.Digest(presentedKey);
        if (cache.Find(digest) is { } cached)
        {
            return cached;
        }
        var generation = cache.Generation;
        var stored = await keys.FindBySecretAsync(digest, cancellationToken).ConfigureAwait(false);
        if (stored is null || !stored.IsActive || !CryptographicOperations.FixedTimeEquals(stored.SecretSha256, digest))
        {
            return null;
        }
        var identity = new ApiKeyIdentity(stored.Id, stored.Scope, stored.SiteIds);
        cache.Add(digest, identity, generation);
        return identity;
    }
}

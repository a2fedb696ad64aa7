namespace ForecastHub.Api.Auth;

/// <summary>Who a presented key belongs to: its id (never the secret), its scope, and the sites it is
/// limited to (empty: all sites).</summary>
public sealed record ApiKeyIdentity(string KeyId, string Scope, IReadOnlyList<string> SiteIds);

/// <summary>Turns a presented secret into an identity, or null when no key matches. Replace this
/// service to check keys kept elsewhere.</summary>
public interface IApiKeyVerifier
{
    ValueTask<ApiKeyIdentity?> VerifyAsync(string presentedKey, CancellationToken cancellationToken);
}

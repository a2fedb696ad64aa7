namespace ForecastHub.Storage.Keys;

/// <summary>A stored API key. The secret itself is never stored: only its SHA-256 digest.
/// <paramref name="SiteIds"/> limits an ingest key to those sites; empty means all sites.</summary>
public sealed record ApiKeyRecord(
    string Id,
    byte[] SecretSha256,
    string Scope,
    IReadOnlyList<string> SiteIds,
    string? Label,
    DateTimeOffset CreatedAt,
    DateTimeOffset? RevokedAt)
{
    public bool IsActive => RevokedAt is null;
}

using ForecastHub.Storage.Keys;

namespace ForecastHub.Api.Keys;

/// <summary>Body of <c>POST /api/v1/keys</c>. <c>siteIds</c> applies to ingest keys only; left out
/// or empty, an ingest key may post to every site.</summary>
public sealed record KeyBody(string? Scope, IReadOnlyList<string>? SiteIds, string? Label);

/// <summary>The answer to creating a key: the only time its secret <c>key</c> is shown.</summary>
public sealed record CreatedKeyResponse(string Id, string Key, string Scope, IReadOnlyList<string> SiteIds, string? Label, DateTimeOffset CreatedAt);

/// <summary>A stored key as listed: never its secret.</summary>
public sealed record KeyResponse(string Id, string Scope, IReadOnlyList<string> SiteIds, string? Label, DateTimeOffset CreatedAt, DateTimeOffset? RevokedAt)
{
    public static KeyResponse From(ApiKeyRecord key)
    {
        ArgumentNullException.ThrowIfNull(key);
        return new(key.Id, key.Scope, key.SiteIds, key.Label, key.CreatedAt, key.RevokedAt);
    }
}

/// <summary>One page of keys; <c>next</c> is the link to the following page, null on the last.</summary>
public sealed record KeyList(IReadOnlyList<KeyResponse> Keys, string? Next) : Http.IPagedList;
